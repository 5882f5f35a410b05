// Output layout of a zone through GET/PUT /api/zones/:zoneId/layout: read with
// the device's limits and the zone's curve, save through changeZone (version,
// revision, audit "zone.layout.updated"), refusals that change nothing.
import { describe, expect, it } from "vitest";
import { GET as getLayout, PUT as putLayout } from "@/app/api/zones/[zoneId]/layout/route";
import type { LayoutDto } from "@/db/queries/layout";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";
import { count, zoneId } from "./helpers/audio";

async function read(zone: string, email: string = people.integrator) {
  const res = await callRoute(getLayout, { path: `/api/zones/${zone}/layout`, params: { zoneId: zone }, cookie: await signInAs(email) });
  return { status: res.status, dto: res.json as unknown as LayoutDto };
}

async function save(email: string, zone: string, body: unknown) {
  return callRoute(putLayout, { method: "PUT", path: `/api/zones/${zone}/layout`, params: { zoneId: zone }, body, cookie: await signInAs(email) });
}

async function layoutOf(zone: string) {
  const [row] = await query<{ output_layout: unknown; version: number }>("select output_layout, version from zones where id = $1", [zone]);
  return row!;
}

const out = (id: string, role: string, value: number, unit = "m", extra: Record<string, unknown> = {}) => ({
  id,
  role,
  label: id,
  distance: { value, unit },
  latencyMs: 0,
  trimDb: 0,
  polarityInverted: false,
  ...extra,
});

describe("GET /api/zones/:zoneId/layout", () => {
  it("returns the layout, the device's output limits and the zone curve", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const { status, dto } = await read(zone.id, people.support);
    expect(status).toBe(200);
    expect(dto.layout.crossover).toEqual({ type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 });
    expect(dto.layout.outputs.map((o) => o.role)).toEqual(["main_left", "main_right", "subwoofer"]);
    expect(dto.profile).toMatchObject({ id: "amp-4x100-sub", subwooferOutputs: 2, hasLineOut: true });
    expect(dto.may.edit).toBe(false);
    const patio = await zoneId("Lindqvist residence", "Patio");
    const p = await read(patio.id);
    expect(p.dto.zoneCurve?.name).toBe("Small outdoor speakers – bass lift");
    expect(p.dto.profile).toMatchObject({ subwooferOutputs: 0, hasLineOut: false });
    const other = await read(zone.id, people.otherCompanyOwner);
    expect(other.status).toBe(404);
  });
});

describe("PUT /api/zones/:zoneId/layout", () => {
  it("saves outputs, crossover, distances in cm and inches, latency, trims and polarity; version, revision and audit follow", async () => {
    const zone = await zoneId("Marchetti lake house", "Great room");
    const revisions = await count("select 1 from zone_revisions where zone_id = $1", [zone.id]);
    const layout = {
      crossover: { type: "butterworth", slopeDbPerOctave: 12, frequencyHz: 100 },
      outputs: [
        out("main-left", "main_left", 400, "cm"),
        out("main-right", "main_right", 161, "in"),
        out("sub-1", "subwoofer", 3, "m", { latencyMs: 6, trimDb: -3, polarityInverted: true }),
        out("sub-2", "subwoofer", 2.5, "m", { latencyMs: 6, trimDb: -3 }),
        out("zone-2", "line_out", 0, "m", { trimDb: -6 }),
      ],
    };
    const res = await save(people.integrator, zone.id, { version: zone.version, layout });
    expect(res.status).toBe(200);
    expect(res.json.version).toBe(zone.version + 1);
    const stored = await layoutOf(zone.id);
    expect(stored.output_layout).toEqual(layout);
    expect(await count("select 1 from zone_revisions where zone_id = $1", [zone.id])).toBe(revisions + 1);
    const [rev] = await query<{ config: { outputLayout: unknown } }>("select config from zone_revisions where zone_id = $1 order by number desc limit 1", [zone.id]);
    expect(rev!.config.outputLayout).toEqual(layout);
    const [audit] = await query<{ kind: string; changes: { field: string }[] }>("select kind, changes from audit_events where zone_id = $1 order by created_at desc limit 1", [zone.id]);
    expect(audit!.kind).toBe("zone.layout.updated");
    expect(audit!.changes.map((c) => c.field)).toEqual(
      expect.arrayContaining(["outputLayout.crossover", "outputLayout.outputs.sub-2", "outputLayout.outputs.zone-2"]),
    );
  });

  it("refuses what the device cannot drive (422) and nonsense values (400), changing nothing", async () => {
    const patio = await zoneId("Lindqvist residence", "Patio");
    const before = await layoutOf(patio.id);
    const sub = await save(people.integrator, patio.id, {
      version: patio.version,
      layout: { crossover: { type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 }, outputs: [out("l", "main_left", 3), out("s", "subwoofer", 3), out("x", "line_out", 3)] },
    });
    expect(sub.status).toBe(422);
    expect(sub.json.error?.fieldErrors?.["outputs.1.role"]?.[0]).toBe("The device (Outdoor-rated amplifier, 2 × 50 W) has no subwoofer output.");
    expect(sub.json.error?.fieldErrors?.["outputs.2.role"]?.[0]).toBe("The device (Outdoor-rated amplifier, 2 × 50 W) has no line out.");

    const bad = await save(people.integrator, patio.id, {
      version: patio.version,
      layout: {
        crossover: { type: "linkwitz_riley", slopeDbPerOctave: 36, frequencyHz: 300 },
        outputs: [out("l", "main_left", 40), out("x", "main_left", 1200, "in"), out("r", "main_right", 3, "m", { trimDb: 20, latencyMs: -1 })],
      },
    });
    expect(bad.status).toBe(400);
    const fe = bad.json.error!.fieldErrors!;
    expect(fe["layout.crossover.slopeDbPerOctave"]?.[0]).toBe("Choose 12, 24 or 48 dB per octave.");
    expect(fe["layout.crossover.frequencyHz"]?.[0]).toBe("The crossover is at most 250 Hz.");
    expect(fe["layout.outputs.0.distance.value"]?.[0]).toBe("That is 40.0 m; the limit is 30 m.");
    expect(fe["layout.outputs.1.distance.value"]?.[0]).toBe("That is 30.5 m; the limit is 30 m.");
    expect(fe["layout.outputs.2.trimDb"]?.[0]).toBe("A trim is at most +12 dB.");
    expect(fe["layout.outputs.2.latencyMs"]?.[0]).toBe("Latency is zero or more.");
    // Rules across outputs are checked once each output is valid on its own.
    const twice = await save(people.integrator, patio.id, { version: patio.version, layout: { crossover: null, outputs: [out("l", "main_left", 3), out("l", "main_left", 3)] } });
    expect(twice.status).toBe(400);
    expect(twice.json.error?.fieldErrors?.["layout.outputs.1.id"]?.[0]).toBe("Each output needs its own id.");
    expect(twice.json.error?.fieldErrors?.["layout.outputs.1.role"]?.[0]).toBe("There is already a main left output.");
    expect(await layoutOf(patio.id)).toEqual(before);
  });

  it("answers 409 on a stale version; support, homeowners and unassigned installers are refused", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const { dto } = await read(zone.id);
    const layout = { ...dto.layout, crossover: { type: "linkwitz_riley", slopeDbPerOctave: 48, frequencyHz: 90 } };
    const first = await save(people.installer, zone.id, { version: dto.zone.version, layout });
    expect(first.status).toBe(200);
    const before = await layoutOf(zone.id);
    const stale = await save(people.owner, zone.id, { version: dto.zone.version, layout: { ...layout, crossover: null } });
    expect(stale.status).toBe(409);
    expect(stale.json.error?.code).toBe("zone:stale");
    expect(await layoutOf(zone.id)).toEqual(before);
    for (const email of [people.support, people.homeowner]) {
      expect((await save(email, zone.id, { version: before.version, layout: { ...layout, crossover: null } })).status).toBe(403);
    }
    const studio = await zoneId("Brightwater loft", "Studio");
    expect((await save(people.installer, studio.id, { version: studio.version, layout: { crossover: null, outputs: [] } })).status).toBe(403);
    expect(await layoutOf(zone.id)).toEqual(before);
  });
});
