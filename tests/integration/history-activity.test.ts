import { beforeAll, describe, expect, it } from "vitest";
import { GET as activityRoute } from "@/app/api/activity/route";
import { GET as exportRoute } from "@/app/api/activity/export/route";
import { GET as backupRoute } from "@/app/api/homes/[homeId]/backup/route";
import { POST as backupRestoreRoute } from "@/app/api/homes/[homeId]/backup/restore/route";
import { POST as createHomeRoute } from "@/app/api/homes/route";
import { PATCH as patchHomeRoute } from "@/app/api/homes/[homeId]/route";
import { POST as restoreRoute } from "@/app/api/zones/[zoneId]/revisions/[revisionId]/restore/route";
import { DELETE as deleteZoneRoute } from "@/app/api/zones/[zoneId]/route";
import { activityBatches } from "@/db/queries/history";
import { backupContentHash, type BackupFile } from "@/lib/validation/backup";
import { query } from "./helpers/database";
import { actorFor, editZone, homeId as homeIdOf, sendRaw, versionOf, zoneIn } from "./helpers/history";
import { callRoute, people, signInAs } from "./helpers/http";

// The audit trail: every kind of change this issue adds writes an audit event
// (who, role, when, home/zone, field-by-field changes); the activity API
// filters and pages it; the CSV export escapes it properly.

type Item = {
  id: number;
  kind: string;
  actorName: string;
  actorRole: string;
  homeName: string | null;
  zoneName: string | null;
  zoneDeleted: boolean;
  summary: string;
  createdAt: string;
  changes: { field: string; before: unknown; after: unknown }[];
};

async function activity(qs: string, email: string = people.owner) {
  const res = await callRoute(activityRoute, { path: `/api/activity${qs}`, cookie: await signInAs(email) });
  return res as typeof res & { json: { items: Item[]; total: number; page: number; pageSize: number } };
}

describe("audit rows for every kind of change", () => {
  const lindqvistName = "Lindqvist residence";
  let lindqvist: string;

  beforeAll(async () => {
    lindqvist = await homeIdOf(lindqvistName);
    const owner = await signInAs(people.owner);
    const theo = await signInAs(people.integrator);

    // home.created, home.updated (the homes API)
    const created = await callRoute(createHomeRoute, { method: "POST", path: "/api/homes", cookie: theo, body: { name: "Quarry Lane barn", householdName: "Adebayo family" } });
    await callRoute(patchHomeRoute, { method: "PATCH", path: `/api/homes/${created.json.id}`, params: { homeId: created.json.id as string }, cookie: theo, body: { city: "Millbrook", version: 1 } });
    // a zone edit, then zone.restored
    const patio = await zoneIn(lindqvistName, "Patio");
    await editZone(await actorFor(people.integrator), patio.id, { volumeCeiling: 66 });
    const [r1] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [patio.id]);
    await callRoute(restoreRoute, { method: "POST", path: "/x", params: { zoneId: patio.id, revisionId: r1.id }, cookie: theo, body: { expectedVersion: await versionOf(patio.id) } });
    // home.backup-exported, then a backup restore that recreates a deleted zone:
    // zone.deleted, zone.revived, zone.restored-from-backup, home.backup-restored, curve.created, template.created
    const backup = await sendRaw(backupRoute, { method: "GET", path: "/x", params: { homeId: lindqvist }, cookie: owner });
    const file = JSON.parse(backup.text) as BackupFile;
    const suite = await zoneIn(lindqvistName, "Primary suite");
    await callRoute(deleteZoneRoute, { method: "DELETE", path: `/x?expectedVersion=${suite.version}`, params: { zoneId: suite.id }, cookie: owner });
    const kitchen = file.zones.find((z) => z.config.name === "Kitchen")!;
    kitchen.config.zoneCurve = { id: null, name: "Kitchen glass", bands: [{ type: "highshelf", frequencyHz: 7000, gainDb: -2, q: 0.707, enabled: true }] };
    const family = file.zones.find((z) => z.config.name === "Family room")!;
    const tpl = file.templates.find((t) => t.id === family.template!.id)!;
    tpl.id = "66666666-6666-4666-8666-666666666666";
    tpl.name = "Family room, 2025 edition";
    tpl.config = { ...tpl.config, turnOnVolume: 22 };
    family.template = { id: tpl.id, version: 1 };
    const body = JSON.stringify({ ...file, contentHash: backupContentHash(file) });
    const res = await sendRaw(backupRestoreRoute, { path: "/x", params: { homeId: lindqvist }, cookie: owner, body, headers: { "content-type": "application/json" } });
    expect(res.status, res.text).toBe(200);
  });

  it.each([
    ["home.created", "integrator", null],
    ["home.updated", "integrator", null],
    ["zone.settings-updated", "integrator", "Patio"],
    ["zone.restored", "integrator", "Patio"],
    ["home.backup-exported", "owner", null],
    ["zone.deleted", "owner", "Primary suite"],
    ["zone.revived", "owner", "Primary suite"],
    ["zone.restored-from-backup", "owner", "Kitchen"],
    ["curve.created", "owner", null],
    ["template.created", "owner", null],
    ["home.backup-restored", "owner", null],
  ])("%s is recorded with who, role, when, where and what", async (kind, role, zoneName) => {
    const res = await activity(`?kind=${kind}`);
    expect(res.status).toBe(200);
    const item = zoneName ? res.json.items.find((i) => i.zoneName === zoneName) : res.json.items[0];
    expect(item, `${kind} in ${JSON.stringify(res.json.items.map((i) => i.zoneName))}`).toBeDefined();
    expect(item!.actorRole).toBe(role);
    expect(item!.actorName).toBe(role === "owner" ? "Mira Castellanos" : "Theo Banerjee");
    expect(Date.now() - Date.parse(item!.createdAt)).toBeLessThan(5 * 60_000);
    expect(item!.summary.length).toBeGreaterThan(5);
    if (!["curve.created", "template.created", "home.created"].includes(kind)) expect(item!.changes.length).toBeGreaterThan(0);
    if (kind.startsWith("zone.")) expect(item!.homeName).toBe(lindqvistName);
  });

  it("a backup restore's zone event lists the changes field by field, before → after", async () => {
    const res = await activity("?kind=zone.restored-from-backup");
    const kitchen = res.json.items.find((i) => i.zoneName === "Kitchen")!;
    expect(kitchen.changes).toEqual(
      expect.arrayContaining([{ field: "Zone · Tone curve", before: expect.stringContaining("Bright hard-surfaced room"), after: expect.stringContaining("Kitchen glass") }]),
    );
  });

  it("audit events are written in the same transaction: a refused change leaves none", async () => {
    const before = await query<{ n: number }>("select count(*)::int as n from audit_events");
    const patio = await zoneIn(lindqvistName, "Patio");
    const [r1] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [patio.id]);
    const stale = await callRoute(restoreRoute, { method: "POST", path: "/x", params: { zoneId: patio.id, revisionId: r1.id }, cookie: await signInAs(people.integrator), body: { expectedVersion: 1 } });
    expect(stale.status).toBe(409);
    expect(await query("select count(*)::int as n from audit_events")).toEqual(before);
  });
});

describe("the activity API", () => {
  it("pages newest first with a total", async () => {
    const all = await activity("?pageSize=5");
    expect(all.json.items).toHaveLength(5);
    expect(all.json.total).toBeGreaterThan(10);
    const times = all.json.items.map((i) => i.createdAt);
    expect([...times].sort().reverse()).toEqual(times);
    const page2 = await activity("?pageSize=5&page=2");
    expect(page2.json.items[0].id).toBeLessThan(all.json.items[4].id);
  });

  it("filters by person, home, kind family and days", async () => {
    const [mira] = await query<{ id: string }>("select id from public.user where email = $1", [people.owner]);
    const byMira = await activity(`?person=${mira.id}&pageSize=100`);
    expect(byMira.json.items.length).toBeGreaterThan(0);
    expect(byMira.json.items.every((i) => i.actorName === "Mira Castellanos")).toBe(true);

    const lindqvist = await homeIdOf("Lindqvist residence");
    const byHome = await activity(`?home=${lindqvist}&pageSize=100`);
    expect(byHome.json.items.every((i) => i.homeName === "Lindqvist residence")).toBe(true);

    const zoneFamily = await activity("?kind=zone.&pageSize=100");
    expect(zoneFamily.json.items.length).toBeGreaterThan(3);
    expect(zoneFamily.json.items.every((i) => i.kind.startsWith("zone."))).toBe(true);

    const today = new Date().toISOString().slice(0, 10);
    const inRange = await activity(`?from=${today}&to=${today}&pageSize=100`);
    expect(inRange.json.total).toBe((await activity("?pageSize=100")).json.total);
    const lastYear = await activity("?from=2001-01-01&to=2001-12-31");
    expect(lastYear.json.total).toBe(0);
    // The viewer's time zone moves the day's edges: 14 hours east, "today" starts 14 hours earlier.
    const event = (await activity("?pageSize=5")).json.items[0];
    const eventDayEast = new Date(Date.parse(event.createdAt) + 14 * 3600_000).toISOString().slice(0, 10);
    const east = await activity(`?from=${eventDayEast}&to=${eventDayEast}&tz=-840&pageSize=5`);
    expect(east.json.items.map((i) => i.id)).toContain(event.id);
  });

  it("rejects bad filters with field errors", async () => {
    const res = await activity("?home=nope&from=2025-02-31x&kind=DROP TABLE&tz=5000");
    expect(res.status).toBe(400);
    expect(Object.keys(res.json.error!.fieldErrors!).sort()).toEqual(["from", "home", "kind", "tz"]);
    const reversed = await activity("?from=2025-03-02&to=2025-03-01");
    expect(reversed.status).toBe(400);
    expect(reversed.json.error?.fieldErrors).toHaveProperty("to");
  });

  it("homeowners may not read the trail; another company sees none of it; no session is a 401", async () => {
    expect((await activity("", people.homeowner)).status).toBe(403);
    const other = await activity("?pageSize=100", people.otherCompanyOwner);
    expect(other.status).toBe(200);
    expect(other.json.items.some((i) => i.homeName === "Lindqvist residence")).toBe(false);
    expect(JSON.stringify(other.json)).not.toContain("Fernhill");
    expect((await callRoute(activityRoute, { path: "/api/activity" })).status).toBe(401);
  });
});

describe("CSV export", () => {
  it("streams the filtered trail with a filename, escaping quotes, commas, line breaks and formulas", async () => {
    const theo = await signInAs(people.integrator);
    const created = await callRoute(createHomeRoute, {
      method: "POST",
      path: "/api/homes",
      cookie: theo,
      body: { name: '=HYPERLINK("x"), the "quoted", home', householdName: "Comma, family", notes: "line one\nline two" },
    });
    expect(created.status).toBe(201);
    const res = await sendRaw(exportRoute, { method: "GET", path: `/api/activity/export?home=${created.json.id}`, cookie: theo });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="zonewright-activity-home-\d{4}-\d{2}-\d{2}\.csv"$/);
    expect(res.headers.get("x-zonewright-rows")).toBe("1");
    const lines = res.text.replace(/^\uFEFF/, "").split("\r\n");
    expect(lines[0]).toBe("Time (UTC),Person,Role,Home,Zone,Kind,Summary,Changes");
    // RFC 4180 §2.6–2.7: fields with commas, quotes or line breaks are quoted; quotes doubled.
    // The home name starts with "=", so it gets a leading apostrophe (common practice, no source: OWASP CSV injection).
    expect(res.text).toContain(`,"'=HYPERLINK(""x""), the ""quoted"", home",,home.created,`);
    expect(res.text).toContain("notes: none → line one\nline two");
    expect(lines.at(-1)).toBe("");
  });

  it("exports everything the filters match, in batches, newest first", async () => {
    const owner = await signInAs(people.owner);
    const res = await sendRaw(exportRoute, { method: "GET", path: "/api/activity/export", cookie: owner });
    const api = await activity("?pageSize=5");
    expect(Number(res.headers.get("x-zonewright-rows"))).toBe(api.json.total);
    expect(res.headers.get("x-zonewright-truncated")).toBe("false");
    // Rows may hold quoted line breaks; count records by their leading timestamp.
    const records = res.text.match(/\r\n\d{4}-\d{2}-\d{2}T/g) ?? [];
    expect(records.length).toBe(api.json.total);
  });

  it("batches by keyset lose no row, even among events of the same instant (one transaction)", async () => {
    const owner = await actorFor(people.owner);
    const [{ n: sameInstant }] = await query<{ n: number }>(
      "select max(c)::int as n from (select count(*) as c from audit_events group by created_at) t",
    );
    expect(sameInstant, "a backup restore writes several events at one instant").toBeGreaterThan(3);
    const ids: number[] = [];
    for await (const batch of activityBatches({ actor: owner, filters: { tz: 0 }, batchSize: 3 })) ids.push(...batch.map((i) => i.id));
    const all = await activity("?pageSize=100");
    expect(all.json.total).toBeLessThan(100);
    expect(ids).toEqual(all.json.items.map((i) => i.id));
    const capped: number[] = [];
    for await (const batch of activityBatches({ actor: owner, filters: { tz: 0 }, batchSize: 4, limit: 10 })) capped.push(...batch.map((i) => i.id));
    expect(capped).toEqual(ids.slice(0, 10));
  });

  it("homeowners and anonymous visitors get no CSV", async () => {
    expect((await sendRaw(exportRoute, { method: "GET", path: "/api/activity/export", cookie: await signInAs(people.homeowner) })).status).toBe(403);
    expect((await sendRaw(exportRoute, { method: "GET", path: "/api/activity/export" })).status).toBe(401);
  });
});
