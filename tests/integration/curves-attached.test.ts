// Editing a curve that is attached changes those zones' desired configuration:
// in the same transaction every zone using it gets a new revision (with the
// new bands resolved into it), a new version and an audit event. Band count
// against the model profile: an edit that would give a device more bands than
// it has is refused; the pure check lib/zones/curve-fit.ts also serves attach.
import { describe, expect, it } from "vitest";
import { GET as listRoute } from "@/app/api/curves/route";
import { GET as getRoute, PATCH as patchRoute } from "@/app/api/curves/[curveId]/route";
import { curveAttachProblem, zoneBandProblem } from "@/lib/zones/curve-fit";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";
import { count, curveByName, zoneId } from "./helpers/audio";

async function patch(email: string, curveId: string, body: unknown) {
  return callRoute(patchRoute, { method: "PATCH", path: `/api/curves/${curveId}`, params: { curveId }, body, cookie: await signInAs(email) });
}

async function latestRevision(zone: string) {
  const [row] = await query<{ number: number; message: string; config: { sources: { label: string; toneCurve: { name: string; bands: { gainDb: number }[] } | null }[] } }>(
    "select number, message, config from zone_revisions where zone_id = $1 order by number desc limit 1",
    [zone],
  );
  return row;
}

describe("editing an attached curve", () => {
  it("snapshots a new revision and bumps the version of every zone using it, audited per zone", async () => {
    const curve = await curveByName("TV dialogue lift");
    const family = await zoneId("Lindqvist residence", "Family room");
    const great = await zoneId("Marchetti lake house", "Great room");
    const unrelated = await zoneId("Lindqvist residence", "Kitchen");
    const revisionsBefore = await Promise.all([family, great, unrelated].map((z) => count("select 1 from zone_revisions where zone_id = $1", [z.id])));

    const res = await patch(people.integrator, curve.id, {
      version: curve.version,
      bands: [
        { type: "peaking", frequencyHz: 2000, gainDb: 4, q: 0.9 },
        { type: "lowshelf", frequencyHz: 150, gainDb: -2, q: 0.707 },
      ],
    });
    expect(res.status).toBe(200);
    const zonesChanged = res.json.zones as { zoneId: string; version: number; revisionNumber: number }[];
    expect(zonesChanged.map((z) => z.zoneId).sort()).toEqual([family.id, great.id].sort());

    const after = await Promise.all([family, great, unrelated].map((z) => count("select 1 from zone_revisions where zone_id = $1", [z.id])));
    expect(after).toEqual([revisionsBefore[0]! + 1, revisionsBefore[1]! + 1, revisionsBefore[2]]);
    for (const z of [family, great]) {
      const [row] = await query<{ version: number }>("select version from zones where id = $1", [z.id]);
      expect(row!.version).toBe(z.version + 1);
      const rev = await latestRevision(z.id);
      expect(rev!.message).toBe("Tone curve “TV dialogue lift” edited in the library");
      const tv = rev!.config.sources.find((s) => s.label === "TV")!;
      expect(tv.toneCurve!.bands[0]!.gainDb).toBe(4);
      const [audit] = await query<{ kind: string; changes: { field: string }[] }>(
        "select kind, changes from audit_events where zone_id = $1 order by created_at desc limit 1",
        [z.id],
      );
      expect(audit!.kind).toBe("zone.curve-updated");
      expect(audit!.changes[0]!.field).toBe(`curve.${curve.id}.bands`);
    }
    expect(await count("select 1 from audit_events where kind = 'curve.updated'")).toBeGreaterThanOrEqual(1);
  });

  it("a description-only edit changes no zone configuration, so no revision", async () => {
    const curve = await curveByName("Gym punch");
    const gym = await zoneId("Aalto townhouse", "Gym");
    const before = await count("select 1 from zone_revisions where zone_id = $1", [gym.id]);
    const res = await patch(people.owner, curve.id, { version: curve.version, description: "Bass and upper-mid lift; keep the ceiling modest." });
    expect(res.status).toBe(200);
    expect(res.json.zones).toEqual([]);
    expect(await count("select 1 from zone_revisions where zone_id = $1", [gym.id])).toBe(before);
    const [row] = await query<{ version: number }>("select version from zones where id = $1", [gym.id]);
    expect(row!.version).toBe(gym.version);
  });

  it("refuses more bands than an attached zone's device has (outdoor amplifier: 5 EQ bands) and changes nothing", async () => {
    const curve = await curveByName("Small outdoor speakers – bass lift");
    const patio = await zoneId("Lindqvist residence", "Patio");
    const revisions = await count("select 1 from zone_revisions");
    const bands = [
      { type: "highpass", frequencyHz: 55, gainDb: 0, q: 0.707 },
      { type: "lowshelf", frequencyHz: 120, gainDb: 4, q: 0.707 },
      { type: "peaking", frequencyHz: 3000, gainDb: -1.5, q: 1.2 },
      { type: "peaking", frequencyHz: 500, gainDb: -1, q: 1 },
      { type: "peaking", frequencyHz: 800, gainDb: -1, q: 1 },
      { type: "highshelf", frequencyHz: 9000, gainDb: 1, q: 0.707 },
    ];
    const res = await patch(people.integrator, curve.id, { version: curve.version, bands });
    expect(res.status).toBe(422);
    expect(res.json.error?.code).toBe("curve:does-not-fit");
    expect(res.json.error?.message).toMatch(/“Patio” needs 6 EQ bands; its device \(Outdoor-rated amplifier, 2 × 50 W\) has 5/);
    expect(await count("select 1 from tone_curve_bands where curve_id = $1", [curve.id])).toBe(3);
    expect(await count("select 1 from zone_revisions")).toBe(revisions);
    const [row] = await query<{ version: number }>("select version from tone_curves where id = $1", [curve.id]);
    expect(row!.version).toBe(curve.version);
    const [z] = await query<{ version: number }>("select version from zones where id = $1", [patio.id]);
    expect(z!.version).toBe(patio.version);
  });

  it("the library says so when a zone's device has fewer bands than its curves need", async () => {
    // A state the library must show even though no edit can create it: the kitchen's amplifier was
    // swapped for an outdoor model (5 EQ bands) while its zone curve had grown to 6 bands.
    const curve = await curveByName("Bright hard-surfaced room");
    await query("update devices set model_profile_id = 'amp-outdoor-2x50' where fleet_device_id = 'fd-lindqvist-kitchen'");
    await query(
      `insert into tone_curve_bands (curve_id, position, type, frequency_hz, gain_db, q)
       select $1, 1 + g, 'peaking', 400 * g, -1, 1 from generate_series(1, 4) g`,
      [curve.id],
    );
    const cookie = await signInAs(people.support);
    const res = await callRoute(getRoute, { path: `/api/curves/${curve.id}`, params: { curveId: curve.id }, cookie });
    const attachments = res.json.attachments as { zoneName: string; fitProblem: string | null }[];
    expect(attachments.find((a) => a.zoneName === "Kitchen")!.fitProblem).toBe(
      "“Kitchen” needs 6 EQ bands; its device (Outdoor-rated amplifier, 2 × 50 W) has 5.",
    );
    expect(attachments.find((a) => a.zoneName === "Studio")!.fitProblem).toBeNull();
    expect(res.json.misfitZoneCount).toBe(1);
    const list = await callRoute(listRoute, { path: "/api/curves", cookie });
    const items = list.json.items as { name: string; misfitZoneCount: number }[];
    expect(items.find((i) => i.name === "Bright hard-surfaced room")!.misfitZoneCount).toBe(1);
    expect(items.find((i) => i.name === "Gym punch")!.misfitZoneCount).toBe(0);
  });
});

describe("the band-count check (pure, lib/zones/curve-fit.ts; our rule: zone curve + largest card curve share the device's bands)", () => {
  const outdoor = { name: "Outdoor-rated amplifier, 2 × 50 W", eqBands: 5 };
  it("refuses attaching a 3-band source curve to a zone whose zone curve already uses 3 of 5 bands", () => {
    expect(curveAttachProblem({ target: "source", curveName: "Vinyl", curveBands: 3, profile: outdoor, use: { zoneCurveBands: 3, cardCurveBands: [] } })).toBe(
      "“Vinyl” has 3 bands; with the zone curve (3) that is 6, and the device (Outdoor-rated amplifier, 2 × 50 W) has 5 EQ bands.",
    );
    expect(curveAttachProblem({ target: "source", curveName: "Vinyl", curveBands: 2, profile: outdoor, use: { zoneCurveBands: 3, cardCurveBands: [2] } })).toBeNull();
  });
  it("as a zone curve it runs with the largest source or station curve", () => {
    expect(curveAttachProblem({ target: "zone", curveName: "Z", curveBands: 2, profile: outdoor, use: { zoneCurveBands: 0, cardCurveBands: [1, 4] } })).toMatch(/that is 6/);
    expect(zoneBandProblem("Patio", outdoor, { zoneCurveBands: 2, cardCurveBands: [3] })).toBeNull();
    expect(zoneBandProblem("Patio", outdoor, { zoneCurveBands: 2, cardCurveBands: [4] })).toBe(
      "“Patio” needs 6 EQ bands (zone curve 2 + source or station curve 4); its device (Outdoor-rated amplifier, 2 × 50 W) has 5.",
    );
  });
});
