import { beforeAll, describe, expect, it } from "vitest";
import { GET as exportRoute } from "@/app/api/homes/[homeId]/backup/route";
import { POST as previewRoute } from "@/app/api/homes/[homeId]/backup/preview/route";
import { POST as restoreRoute } from "@/app/api/homes/[homeId]/backup/restore/route";
import { DELETE as deleteZoneRoute } from "@/app/api/zones/[zoneId]/route";
import { PATCH as patchHomeRoute } from "@/app/api/homes/[homeId]/route";
import { backupContentHash, type BackupFile } from "@/lib/validation/backup";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { query } from "./helpers/database";
import { actorFor, editZone, fingerprint, homeId as homeIdOf, sendRaw, versionOf, zoneIn } from "./helpers/history";
import { callRoute, people, signInAs } from "./helpers/http";

// Home backup: export, hash stability, preview, restore in one transaction,
// round trip, and curves/templates matched by content or created.

async function download(homeId: string, cookie: string) {
  const res = await sendRaw(exportRoute, { method: "GET", path: `/api/homes/${homeId}/backup`, params: { homeId }, cookie });
  return { ...res, file: res.json as unknown as BackupFile };
}

function post(route: typeof previewRoute, homeId: string, cookie: string, body: string, extra: { qs?: string; contentType?: string } = {}) {
  const kind = route === previewRoute ? "preview" : "restore";
  return sendRaw(route, {
    path: `/api/homes/${homeId}/backup/${kind}${extra.qs ?? ""}`,
    params: { homeId },
    cookie,
    body,
    headers: { "content-type": extra.contentType ?? "application/json" },
  });
}

/** Re-seal a hand-edited file with a correct hash, as a careful editor would. */
function reseal(file: BackupFile): string {
  return JSON.stringify({ ...file, contentHash: backupContentHash(file) });
}

/** Every object's keys in reverse order, all the way down. */
function reverseKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(reverseKeys);
  if (v && typeof v === "object") return Object.fromEntries(Object.entries(v).reverse().map(([k, x]) => [k, reverseKeys(x)]));
  return v;
}

async function latestRevision(zoneId: string) {
  const [row] = await query<{ number: number; content_hash: string; config: ZoneConfig }>(
    "select number, content_hash, config from zone_revisions where zone_id = $1 order by number desc limit 1",
    [zoneId],
  );
  return row;
}

describe("downloading a home backup", () => {
  let lindqvist: string;
  beforeAll(async () => {
    lindqvist = await homeIdOf("Lindqvist residence");
  });

  it("is a versioned JSON file with a content hash, every zone, its curves and templates", async () => {
    const res = await download(lindqvist, await signInAs(people.integrator));
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="zonewright-backup-lindqvist-residence-\d{4}-\d{2}-\d{2}\.json"$/);
    const file = res.file;
    expect(file).toMatchObject({ format: "zonewright-home-backup", schemaVersion: 1, home: { name: "Lindqvist residence", servicePlan: "priority" } });
    expect(file.contentHash).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(backupContentHash(file)).toBe(file.contentHash);
    expect(file.zones.map((z) => z.config.name)).toEqual(["Family room", "Kitchen", "Patio", "Primary suite"]);
    // Each zone's configuration is its current revision (hash equal to the stored one).
    for (const z of file.zones) expect((await latestRevision(z.id)).content_hash).toBe(z.revision!.contentHash);
    expect(file.curves.map((c) => c.name).sort()).toEqual(
      ["Bright hard-surfaced room", "In-ceiling speaker voicing", "Small outdoor speakers – bass lift", "TV dialogue lift", "Turntable warmth"].sort(),
    );
    expect(file.templates.map((t) => t.name).sort()).toEqual(["Family room with TV and subwoofer", "Outdoor pair with bass lift"]);
    expect(file.zones[0].device).toMatchObject({ fleetDeviceId: "fd-lindqvist-family", serial: "FW4-10231" });
    const [audit] = await query<{ kind: string; actor_role: string }>("select kind, actor_role from audit_events where home_id = $1 order by id desc limit 1", [lindqvist]);
    expect(audit).toEqual({ kind: "home.backup-exported", actor_role: "integrator" });
  });

  it("hash is stable: same content, same hash, whatever the time or key order", async () => {
    const a = (await download(lindqvist, await signInAs(people.owner))).file;
    const b = (await download(lindqvist, await signInAs(people.support))).file;
    expect(b.createdAt >= a.createdAt).toBe(true);
    expect(b.contentHash).toBe(a.contentHash);
    const shuffled = reverseKeys(a) as BackupFile;
    expect(Object.keys(shuffled)[0]).not.toBe("format");
    expect(backupContentHash(shuffled)).toBe(a.contentHash);
    // And the server accepts the reordered file as untouched.
    const res = await post(previewRoute, lindqvist, await signInAs(people.integrator), JSON.stringify(shuffled));
    expect(res.status).toBe(200);
    expect((res.json.zones as { action: string }[]).map((z) => z.action)).toEqual(["unchanged", "unchanged", "unchanged", "unchanged"]);
  });

  it("support may download (to re-push a known-good state) but not restore; installers neither; other companies get 404", async () => {
    expect((await download(lindqvist, await signInAs(people.support))).status).toBe(200);
    expect((await download(lindqvist, await signInAs(people.installer))).status).toBe(403);
    expect((await download(lindqvist, await signInAs(people.otherCompanyOwner))).status).toBe(404);
    expect((await download(lindqvist, await signInAs(people.otherHomeowner))).status).toBe(404);
    const file = (await download(lindqvist, await signInAs(people.owner))).file;
    const before = await fingerprint();
    expect((await post(restoreRoute, lindqvist, await signInAs(people.support), JSON.stringify(file))).status).toBe(403);
    expect((await post(previewRoute, lindqvist, await signInAs(people.installer), JSON.stringify(file))).status).toBe(403);
    expect((await post(restoreRoute, lindqvist, await signInAs(people.otherCompanyOwner), JSON.stringify(file))).status).toBe(404);
    expect(await fingerprint()).toBe(before);
  });
});

describe("round trip: backup → wipe → restore", () => {
  it("gives back identical revisions, one transaction, audited", async () => {
    const homeId = await homeIdOf("Lindqvist residence");
    const owner = await signInAs(people.owner);
    const file = (await download(homeId, owner)).file;

    // Wipe: empty three zones (no sources, presets or curves, other levels), delete the fourth, rename the city.
    const theo = await actorFor(people.integrator);
    const [family, kitchen, patio, suite] = file.zones;
    for (const z of [family, kitchen, patio]) {
      await editZone(theo, z.id, { volumeCeiling: 99, turnOnVolume: 5, dropSources: true, dropPresets: true, detachCurves: true });
    }
    const del = await callRoute(deleteZoneRoute, {
      method: "DELETE",
      path: `/api/zones/${suite.id}?expectedVersion=${await versionOf(suite.id)}`,
      params: { zoneId: suite.id },
      cookie: owner,
    });
    expect(del.status).toBe(200);
    const [home] = await query<{ version: number }>("select version from homes where id = $1", [homeId]);
    expect((await callRoute(patchHomeRoute, { method: "PATCH", path: `/api/homes/${homeId}`, params: { homeId }, cookie: owner, body: { city: "Elsewhere", version: home.version } })).status).toBe(200);

    // Preview: per zone what would change; nothing written.
    const before = await fingerprint();
    const preview = await post(previewRoute, homeId, owner, JSON.stringify(file));
    expect(preview.status).toBe(200);
    expect(await fingerprint()).toBe(before);
    const zonesPreview = preview.json.zones as { name: string; action: string; summary: string; diff: { changes: { text: string }[] } | null }[];
    expect(zonesPreview.map((z) => [z.name, z.action])).toEqual([
      ["Family room", "update"],
      ["Kitchen", "update"],
      ["Patio", "update"],
      ["Primary suite", "revive"],
    ]);
    expect(zonesPreview[1].diff!.changes.map((c) => c.text)).toEqual(
      expect.arrayContaining(["Zone: volume ceiling 99 % → 65 %", "Zone: tone curve none → “Bright hard-surfaced room” (peaking 2.5 kHz \u22122 dB Q 1.4; high shelf 6 kHz \u22123 dB Q 0.71)"]),
    );
    expect((preview.json.home as { changes: unknown[] }).changes).toEqual(expect.arrayContaining([{ field: "city", before: "Elsewhere", after: "Alder Bay" }]));
    expect(preview.json.canApply).toBe(true);
    expect((preview.json.curves as { outcome: string }[]).every((c) => c.outcome === "reattached")).toBe(true);

    // Restore with the preview's token.
    const auditBefore = await query<{ id: number }>("select coalesce(max(id), 0)::int as id from audit_events");
    const res = await post(restoreRoute, homeId, owner, JSON.stringify(file), { qs: `?previewToken=${preview.json.previewToken}` });
    expect(res.status).toBe(200);
    for (const z of file.zones) {
      const latest = await latestRevision(z.id);
      expect(latest.content_hash, z.config.name).toBe(z.revision!.contentHash);
      expect(latest.config).toEqual(z.config);
    }
    expect(await query("select deleted_at, device_id is not null as bound from zones where id = $1", [suite.id])).toEqual([{ deleted_at: null, bound: true }]);
    expect(await query("select city from homes where id = $1", [homeId])).toEqual([{ city: "Alder Bay" }]);
    const kinds = await query<{ kind: string; actor_role: string; zone_id: string | null }>(
      "select kind, actor_role, zone_id from audit_events where id > $1 order by id",
      [auditBefore[0].id],
    );
    expect(kinds.map((k) => k.kind)).toEqual([
      "home.updated",
      "zone.restored-from-backup",
      "zone.restored-from-backup",
      "zone.restored-from-backup",
      "zone.revived",
      "zone.restored-from-backup",
      "home.backup-restored",
    ]);
    expect(kinds.every((k) => k.actor_role === "owner")).toBe(true);

    // Restoring the same file again changes nothing and makes no revision.
    const revisionsBefore = await query("select count(*)::int as n from zone_revisions");
    const again = await post(restoreRoute, homeId, owner, JSON.stringify(file));
    expect(again.status).toBe(200);
    expect((again.json.zones as { action: string }[]).map((z) => z.action)).toEqual(["unchanged", "unchanged", "unchanged", "unchanged"]);
    expect(await query("select count(*)::int as n from zone_revisions")).toEqual(revisionsBefore);
  });

  it("a preview that went stale (someone edited since) refuses the restore", async () => {
    const homeId = await homeIdOf("Aalto townhouse");
    const cookie = await signInAs(people.integrator);
    const file = (await download(homeId, cookie)).file;
    const preview = await post(previewRoute, homeId, cookie, JSON.stringify(file));
    await editZone(await actorFor(people.integrator), file.zones[0].id, { volumeCeiling: 33 });
    const before = await fingerprint();
    const res = await post(restoreRoute, homeId, cookie, JSON.stringify(file), { qs: `?previewToken=${preview.json.previewToken}` });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("backup:stale-preview");
    expect(await fingerprint()).toBe(before);
  });

  it("a file broken in its last zone changes nothing — not even the zones before it", async () => {
    const homeId = await homeIdOf("Lindqvist residence");
    const cookie = await signInAs(people.integrator);
    const file = (await download(homeId, cookie)).file;
    // Valid by schema, so the restore starts: the home, the first zones change…
    file.home.notes = "Restored by the atomicity test";
    file.zones[0].config.volumeCeiling = 50;
    file.zones[1].config.sources[0].loudnessOffsetDb = -6;
    // …but the last zone's device (a 2 × 60 W amplifier) has no HDMI ARC input.
    const last = file.zones.at(-1)!;
    last.config.sources.push({ key: "tv-new", label: "Bedroom TV", kind: "hdmi_arc", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null });
    const body = reseal(file);

    const preview = await post(previewRoute, homeId, cookie, body);
    expect(preview.status).toBe(200);
    expect(preview.json.canApply).toBe(false);
    expect((preview.json.zones as { problems: string[] }[]).at(-1)!.problems[0]).toMatch(/Bedroom TV.*HDMI ARC/);

    const before = await fingerprint();
    const res = await post(restoreRoute, homeId, cookie, body);
    expect(res.status).toBe(422);
    expect(res.json.error?.code).toBe("zone:rule");
    expect(res.json.error?.message).toContain("Primary suite");
    expect(await fingerprint()).toBe(before);
  });
});

describe("curves and templates named by the file", () => {
  it("are matched by content, or created when the library has nothing like them", async () => {
    const homeId = await homeIdOf("Marchetti lake house");
    const cookie = await signInAs(people.integrator);
    const file = (await download(homeId, cookie)).file;
    const great = file.zones.find((z) => z.config.name === "Great room")!;

    // 1. A curve the library no longer has under that id, but has by content: matched.
    const tv = great.config.sources.find((s) => s.toneCurve)!;
    const originalCurveId = tv.toneCurve!.id!;
    const foreignId = "11111111-1111-4111-8111-111111111111";
    tv.toneCurve = { ...tv.toneCurve!, id: foreignId, name: "Dialogue (old name)" };
    // 2. A curve nobody has: created.
    great.config.zoneCurve = { id: "22222222-2222-4222-8222-222222222222", name: "Lake reflections", bands: [{ type: "peaking", frequencyHz: 180, gainDb: -3, q: 2, enabled: true }] };
    file.curves.push({ id: "22222222-2222-4222-8222-222222222222", name: "Lake reflections", description: "Tames the boom off the water.", bands: great.config.zoneCurve.bands });
    // 3. A template with a new id but the same configuration as one in the library: matched;
    //    one with a configuration nobody has: created.
    const t0 = file.templates[0];
    expect(t0?.name).toBe("Outdoor pair with bass lift");
    {
      const copy = { ...t0, id: "33333333-3333-4333-8333-333333333333" };
      const changed = { ...t0, id: "44444444-4444-4444-8444-444444444444", name: "Lake house variant", config: { ...t0.config, volumeCeiling: 42 } };
      file.templates = [copy, changed];
      great.template = { id: copy.id, version: 1 };
      const dock = file.zones.find((z) => z.config.name === "Dock")!;
      dock.template = { id: changed.id, version: 3 };
    }
    const body = reseal(file);
    const preview = await post(previewRoute, homeId, cookie, body);
    expect(preview.status).toBe(200);
    expect(preview.json.curves).toEqual(
      expect.arrayContaining([
        { requestedName: "Dialogue (old name)", name: "TV dialogue lift", outcome: "matched" },
        { requestedName: "Lake reflections", name: "Lake reflections", outcome: "created" },
      ]),
    );
    const curvesBefore = await query<{ n: number }>("select count(*)::int as n from tone_curves");
    const res = await post(restoreRoute, homeId, cookie, body);
    expect(res.status).toBe(200);
    expect(await query<{ n: number }>("select count(*)::int as n from tone_curves")).toEqual([{ n: curvesBefore[0].n + 1 }]);
    const [lake] = await query<{ id: string; description: string }>("select id, description from tone_curves where name = 'Lake reflections'");
    expect(lake.description).toBe("Tames the boom off the water.");
    const [greatRow] = await query<{ tone_curve_id: string; template_id: string | null }>("select tone_curve_id, template_id from zones where id = $1", [great.id]);
    expect(greatRow.tone_curve_id).toBe(lake.id);
    const [tvRow] = await query<{ tone_curve_id: string }>("select tone_curve_id from sources where id = $1", [tv.key]);
    expect(tvRow.tone_curve_id).toBe(originalCurveId);
    {
      expect(res.json.templates).toEqual(
        expect.arrayContaining([
          { requestedName: t0.name, name: t0.name, outcome: "matched" },
          { requestedName: "Lake house variant", name: "Lake house variant", outcome: "created" },
        ]),
      );
      expect(greatRow.template_id).toBe(t0.id);
      const [variant] = await query<{ id: string; version: number }>("select id, version from zone_templates where name = 'Lake house variant'");
      expect(await query("select template_id, template_version from zones where name = 'Dock' and home_id = $1", [homeId])).toEqual([
        { template_id: variant.id, template_version: 1 },
      ]);
    }
    const created = await query<{ kind: string }>("select kind from audit_events where kind in ('curve.created', 'template.created') order by id");
    expect(created.map((c) => c.kind)).toEqual(expect.arrayContaining(["curve.created"]));
  });

  it("a backup of another home is refused with the reason", async () => {
    const cookie = await signInAs(people.integrator);
    const file = (await download(await homeIdOf("Nakagawa cottage"), cookie)).file;
    const target = await homeIdOf("Brightwater loft");
    const before = await fingerprint();
    const res = await post(restoreRoute, target, cookie, JSON.stringify(file));
    expect(res.status).toBe(422);
    expect(res.json.error?.message).toMatch(/of the home “Nakagawa cottage”, not “Brightwater loft”/);
    expect(await fingerprint()).toBe(before);
  });

  it("a zone missing from the home is created from the file, keeping its id and device when they are free", async () => {
    const homeId = await homeIdOf("Nakagawa cottage");
    const cookie = await signInAs(people.owner);
    const file = (await download(homeId, cookie)).file;
    const garden = file.zones.find((z) => z.config.name === "Garden")!;
    const copy = structuredClone(garden);
    copy.id = "55555555-5555-4555-8555-555555555555";
    copy.config.name = "Garden shed";
    copy.device = { fleetDeviceId: "fd-spare-03", serial: "FWO-30388", modelProfileId: "amp-outdoor-2x50" };
    // Keys of sources/presets that another zone already uses get new ids.
    file.zones.push(copy);
    const res = await post(restoreRoute, homeId, cookie, reseal(file));
    expect(res.status).toBe(200);
    expect((res.json.zones as { name: string; action: string }[]).at(-1)).toMatchObject({ name: "Garden shed", action: "create" });
    const [row] = await query<{ id: string; serial: string; home_id: string }>(
      "select z.id, d.serial, d.home_id from zones z join devices d on d.id = z.device_id where z.id = $1",
      [copy.id],
    );
    expect(row).toEqual({ id: copy.id, serial: "FWO-30388", home_id: homeId });
    const rev = await latestRevision(copy.id);
    expect(rev.number).toBe(1);
    expect(rev.config.sources.map((s) => s.label)).toEqual(garden.config.sources.map((s) => s.label));
    expect(rev.config.sources.map((s) => s.key)).not.toEqual(garden.config.sources.map((s) => s.key));
  });
});
