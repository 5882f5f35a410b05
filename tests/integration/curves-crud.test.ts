// The tone-curve library's route handlers with real sessions and the real
// database: who may read and write, compare-and-set on the curve's version,
// duplicate, delete only while unused, and export.
import { describe, expect, it } from "vitest";
import { GET as listRoute, POST as createRoute } from "@/app/api/curves/route";
import { DELETE as deleteRoute, GET as getRoute, PATCH as patchRoute } from "@/app/api/curves/[curveId]/route";
import { POST as duplicateRoute } from "@/app/api/curves/[curveId]/duplicate/route";
import { GET as exportRoute } from "@/app/api/curves/[curveId]/export/route";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";
import { count, curveByName, latestAudit } from "./helpers/audio";

async function as(email: string, handler: Parameters<typeof callRoute>[0], options: Omit<Parameters<typeof callRoute>[1], "cookie">) {
  return callRoute(handler, { ...options, cookie: await signInAs(email) });
}

const shelf = { type: "lowshelf", frequencyHz: 100, gainDb: 3, q: 0.707, enabled: true } as const;
const dip = { type: "peaking", frequencyHz: 2500, gainDb: -2, q: 1.4, enabled: true } as const;

async function createAs(email: string, body: unknown) {
  return as(email, createRoute, { method: "POST", path: "/api/curves", body });
}

describe("reading the library", () => {
  it("staff see the company's curves with band count, largest boost and attachment count", async () => {
    for (const email of [people.owner, people.integrator, people.installer, people.support]) {
      const res = await as(email, listRoute, { path: "/api/curves" });
      expect(res.status).toBe(200);
      const items = res.json.items as { name: string; bandCount: number; attachedCount: number; largestBoostDb: number }[];
      expect(items.map((i) => i.name)).toContain("TV dialogue lift");
      const dialogue = items.find((i) => i.name === "TV dialogue lift")!;
      expect(dialogue.bandCount).toBe(2);
      // Seed: attached to the TV sources of the Lindqvist family room and the Marchetti great room.
      expect(dialogue.attachedCount).toBe(2);
      // +3 dB peaking at 2 kHz and a −2 dB low shelf: the combined boost is close to +3 dB.
      expect(dialogue.largestBoostDb).toBeGreaterThan(2.5);
      expect(dialogue.largestBoostDb).toBeLessThan(3.1);
    }
  });

  it("a homeowner may not read the library; another company sees none of it", async () => {
    expect((await as(people.homeowner, listRoute, { path: "/api/curves" })).status).toBe(403);
    const other = await as(people.otherCompanyOwner, listRoute, { path: "/api/curves" });
    expect(other.status).toBe(200);
    expect(other.json.items).toEqual([]);
    const { id } = await curveByName("TV dialogue lift");
    const res = await as(people.otherCompanyOwner, getRoute, { path: `/api/curves/${id}`, params: { curveId: id } });
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.json)).not.toContain("dialogue");
  });

  it("one curve lists where it is attached, with home and zone", async () => {
    const { id } = await curveByName("TV dialogue lift");
    const res = await as(people.support, getRoute, { path: `/api/curves/${id}`, params: { curveId: id } });
    expect(res.status).toBe(200);
    const attachments = res.json.attachments as { kind: string; label: string; zoneName: string; homeName: string }[];
    expect(attachments.map((a) => `${a.homeName} / ${a.zoneName} / ${a.kind} ${a.label}`)).toEqual([
      "Lindqvist residence / Family room / source TV",
      "Marchetti lake house / Great room / source TV",
    ]);
    expect(res.json.may).toEqual({ edit: false });
  });
});

describe("creating and editing", () => {
  it("an integrator creates a curve (201, audited); installers and support may not", async () => {
    const res = await createAs(people.integrator, { name: "Deck speakers", description: "Outdoor deck", bands: [shelf, dip] });
    expect(res.status).toBe(201);
    expect(res.json).toMatchObject({ name: "Deck speakers", version: 1, bandCount: 2, attachedCount: 0 });
    const audit = await latestAudit("curve.created");
    expect(audit.summary).toContain("Deck speakers");
    expect(audit.actor_role).toBe("integrator");
    const before = await count("select 1 from tone_curves");
    expect((await createAs(people.installer, { name: "Nope", bands: [] })).status).toBe(403);
    expect((await createAs(people.support, { name: "Nope", bands: [] })).status).toBe(403);
    expect(await count("select 1 from tone_curves")).toBe(before);
  });

  it("refuses bands outside the limits with a field error naming the band and field, and saves nothing", async () => {
    const before = await count("select 1 from tone_curves");
    const res = await createAs(people.owner, {
      name: "Broken",
      bands: [shelf, { ...dip, frequencyHz: 5 }, { ...dip, gainDb: 13 }, { ...dip, q: 25 }],
    });
    expect(res.status).toBe(400);
    const errors = res.json.error!.fieldErrors!;
    expect(errors["bands.1.frequencyHz"]?.[0]).toMatch(/at least 10 Hz/);
    expect(errors["bands.2.gainDb"]?.[0]).toMatch(/at most \+12 dB/);
    expect(errors["bands.3.q"]?.[0]).toMatch(/at most 20/);
    const tooMany = await createAs(people.owner, { name: "Eleven", bands: Array.from({ length: 11 }, () => dip) });
    expect(tooMany.status).toBe(400);
    expect(tooMany.json.error!.fieldErrors!.bands?.[0]).toMatch(/at most 10 bands/);
    expect(await count("select 1 from tone_curves")).toBe(before);
  });

  it("edits with the version it read; a stale version gets 409 and changes nothing", async () => {
    const created = await createAs(people.integrator, { name: "Study nook", bands: [shelf] });
    const id = created.json.id as string;
    const first = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/curves/${id}`,
      params: { curveId: id },
      body: { version: 1, bands: [shelf, dip], name: "Study nook v2" },
    });
    expect(first.status).toBe(200);
    expect((first.json.curve as { version: number; bandCount: number }).version).toBe(2);
    const stale = await as(people.owner, patchRoute, {
      method: "PATCH",
      path: `/api/curves/${id}`,
      params: { curveId: id },
      body: { version: 1, bands: [] },
    });
    expect(stale.status).toBe(409);
    expect(stale.json.error?.code).toBe("curve:stale");
    const bands = await query<{ n: number }>("select count(*)::int as n from tone_curve_bands where curve_id = $1", [id]);
    expect(bands[0]!.n).toBe(2);
    const [row] = await query<{ name: string; version: number }>("select name, version from tone_curves where id = $1", [id]);
    expect(row).toEqual({ name: "Study nook v2", version: 2 });
  });

  it("support may not edit; the refusal comes from the server", async () => {
    const { id, version } = await curveByName("Gym punch");
    const res = await as(people.support, patchRoute, { method: "PATCH", path: `/api/curves/${id}`, params: { curveId: id }, body: { version, bands: [] } });
    expect(res.status).toBe(403);
    expect(await count("select 1 from tone_curve_bands where curve_id = $1", [id])).toBe(2);
  });

  it("duplicates a curve as an unattached copy", async () => {
    const { id } = await curveByName("Bright hard-surfaced room");
    const res = await as(people.integrator, duplicateRoute, { method: "POST", path: `/api/curves/${id}/duplicate`, params: { curveId: id }, body: {} });
    expect(res.status).toBe(201);
    expect(res.json).toMatchObject({ name: "Bright hard-surfaced room (copy)", bandCount: 2, attachedCount: 0 });
    const again = await as(people.integrator, duplicateRoute, { method: "POST", path: `/api/curves/${id}/duplicate`, params: { curveId: id }, body: {} });
    expect(again.json.name).toBe("Bright hard-surfaced room (copy 2)");
    expect((await latestAudit("curve.duplicated")).summary).toContain("Bright hard-surfaced room");
  });
});

describe("deleting", () => {
  it("is refused while the curve is attached (409 naming where) and deletes nothing", async () => {
    const { id, version } = await curveByName("Turntable warmth");
    const res = await as(people.owner, deleteRoute, { method: "DELETE", path: `/api/curves/${id}?version=${version}`, params: { curveId: id } });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("curve:in-use");
    expect(res.json.error?.message).toMatch(/Lindqvist residence \/ Family room \/ Turntable/);
    expect(await count("select 1 from tone_curves where id = $1", [id])).toBe(1);
  });

  it("deletes an unused curve with its bands when the version matches; a stale version is refused", async () => {
    const created = await createAs(people.integrator, { name: "Short-lived", bands: [shelf, dip] });
    const id = created.json.id as string;
    const stale = await as(people.integrator, deleteRoute, { method: "DELETE", path: `/api/curves/${id}?version=7`, params: { curveId: id } });
    expect(stale.status).toBe(409);
    expect(stale.json.error?.code).toBe("curve:stale");
    const missingVersion = await as(people.integrator, deleteRoute, { method: "DELETE", path: `/api/curves/${id}`, params: { curveId: id } });
    expect(missingVersion.status).toBe(400);
    const res = await as(people.integrator, deleteRoute, { method: "DELETE", path: `/api/curves/${id}?version=1`, params: { curveId: id } });
    expect(res.status).toBe(200);
    expect(await count("select 1 from tone_curves where id = $1", [id])).toBe(0);
    expect(await count("select 1 from tone_curve_bands where curve_id = $1", [id])).toBe(0);
    expect((await latestAudit("curve.deleted")).summary).toContain("Short-lived");
  });
});

describe("export", () => {
  it("downloads JSON and CSV in our formats", async () => {
    const { id } = await curveByName("In-ceiling speaker voicing");
    const cookie = await signInAs(people.support);
    const json = await exportRoute(new Request(`http://localhost:3000/api/curves/${id}/export?format=json`, { headers: { cookie } }), {
      params: Promise.resolve({ curveId: id }),
    });
    expect(json.status).toBe(200);
    expect(json.headers.get("content-disposition")).toBe('attachment; filename="in-ceiling-speaker-voicing.json"');
    const parsed = JSON.parse(await json.text()) as { bands: unknown[] };
    expect(parsed.bands).toEqual([
      { type: "lowshelf", frequencyHz: 90, gainDb: 3, q: 0.707, enabled: true },
      { type: "peaking", frequencyHz: 400, gainDb: -2, q: 1, enabled: true },
      { type: "highshelf", frequencyHz: 10000, gainDb: 1.5, q: 0.707, enabled: true },
    ]);
    const csv = await exportRoute(new Request(`http://localhost:3000/api/curves/${id}/export?format=csv`, { headers: { cookie } }), {
      params: Promise.resolve({ curveId: id }),
    });
    expect(csv.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(await csv.text()).toBe("type,frequency_hz,gain_db,q\nlowshelf,90,3,0.707\npeaking,400,-2,1\nhighshelf,10000,1.5,0.707\n");
  });
});
