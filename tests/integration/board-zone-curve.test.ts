import { describe, expect, it } from "vitest";
import { PUT as attachRoute } from "@/app/api/zones/[zoneId]/attach-curve/route";
import { POST as lockRoute } from "@/app/api/zones/[zoneId]/guest-lock/route";
import type { BoardWriteResult } from "@/lib/board/types";
import { query } from "./helpers/database";
import { as, auditCount, curveIdByName, revisionCount, sourcesOf, zoneByName, zoneFingerprint } from "./helpers/board";
import { people } from "./helpers/http";

// A tone curve dropped on a zone's "Zone curve" line becomes the zone curve:
// it runs in series with each card's own curve on the device's EQ bands.

function attach(email: string, zoneId: string, body: unknown) {
  return as(email, attachRoute, { method: "PUT", path: `/api/zones/${zoneId}/attach-curve`, params: { zoneId }, body });
}

async function zoneCurveOf(zoneId: string) {
  const [row] = await query<{ tone_curve_id: string | null }>("select tone_curve_id from zones where id = $1", [zoneId]);
  return row.tone_curve_id;
}

describe("zone curve by drop", () => {
  it("an integrator sets and removes a zone curve; version, revision and audit follow", async () => {
    const zone = await zoneByName("Lindqvist residence", "Family room");
    expect(await zoneCurveOf(zone.id)).toBeNull();
    const curve = await curveIdByName("Bright hard-surfaced room");
    const [audits, revisions] = [await auditCount(zone.id), await revisionCount(zone.id)];
    const res = await attach(people.integrator, zone.id, { version: zone.version, target: { type: "zone" }, toneCurveId: curve });
    expect(res.status).toBe(200);
    const column = (res.json as unknown as BoardWriteResult).zones[0];
    expect(column).toMatchObject({ toneCurveId: curve, version: zone.version + 1 });
    expect(await zoneCurveOf(zone.id)).toBe(curve);
    expect(await auditCount(zone.id)).toBe(audits + 1);
    expect(await revisionCount(zone.id)).toBe(revisions + 1);
    const [audit] = await query<{ kind: string; summary: string; changes: { field: string; after: unknown }[] }>(
      "select kind, summary, changes from audit_events where zone_id = $1 order by id desc limit 1",
      [zone.id],
    );
    expect(audit.kind).toBe("zone.curve-attached");
    expect(audit.summary).toBe("Made “Bright hard-surfaced room” the zone curve of “Family room”");
    expect(audit.changes).toEqual([{ field: "toneCurveId", before: null, after: curve }]);
    const [revision] = await query<{ config: { toneCurveId?: string | null; zoneCurve?: unknown } }>(
      "select config from zone_revisions where zone_id = $1 order by number desc limit 1",
      [zone.id],
    );
    expect(JSON.stringify(revision.config)).toContain("Bright hard-surfaced room");

    const removed = await attach(people.integrator, zone.id, { version: zone.version + 1, target: { type: "zone" }, toneCurveId: null });
    expect(removed.status).toBe(200);
    expect(await zoneCurveOf(zone.id)).toBeNull();
    // Stale: 409, nothing written.
    const before = await zoneFingerprint(zone.id);
    const stale = await attach(people.integrator, zone.id, { version: zone.version, target: { type: "zone" }, toneCurveId: curve });
    expect(stale.status).toBe(409);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("refuses a zone curve that would not fit beside a card's own curve, saying how many bands each uses", async () => {
    // The patio's outdoor amplifier has 5 EQ bands (model profile); its Streaming card gets a 2-band curve.
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const [streaming] = await sourcesOf(zone.id);
    const onCard = await attach(people.integrator, zone.id, {
      version: zone.version,
      target: { type: "source", id: streaming.id },
      toneCurveId: await curveIdByName("Gym punch"),
    });
    expect(onCard.status).toBe(200);
    const version = zone.version + 1;
    const [org] = await query<{ organization_id: string }>("select organization_id from zones where id = $1", [zone.id]);
    const [wide] = await query<{ id: string }>("insert into tone_curves (organization_id, name) values ($1, 'Four-band patio test') returning id", [org.organization_id]);
    await query(
      `insert into tone_curve_bands (curve_id, position, type, frequency_hz, gain_db, q, enabled)
       select $1, g, 'peaking', 250 * (g + 1), 1, 1, true from generate_series(0, 3) g`,
      [wide.id],
    );
    const before = await zoneFingerprint(zone.id);
    const refused = await attach(people.integrator, zone.id, { version, target: { type: "zone" }, toneCurveId: wide.id });
    expect(refused.status).toBe(422);
    expect(refused.json.error?.message).toBe("“Patio” has 5 EQ bands (Outdoor-rated amplifier, 2 × 50 W); a card's own curve uses 2 and this zone curve needs 4.");
    expect(await zoneFingerprint(zone.id)).toBe(before);
    // A 3-band curve fits beside it (3 + 2 = 5).
    const fits = await attach(people.integrator, zone.id, { version, target: { type: "zone" }, toneCurveId: await curveIdByName("In-ceiling speaker voicing") });
    expect(fits.status).toBe(200);
  });

  it("refuses support and homeowners, an installer on a locked zone, bad targets and other companies' curves", async () => {
    const zone = await zoneByName("Aalto townhouse", "Gym");
    const curve = await curveIdByName("Turntable warmth");
    const before = await zoneFingerprint(zone.id);
    expect((await attach(people.support, zone.id, { version: zone.version, target: { type: "zone" }, toneCurveId: curve })).status).toBe(403);
    expect((await attach(people.homeowner, zone.id, { version: zone.version, target: { type: "zone" }, toneCurveId: curve })).status).toBe(404);
    const bad = await attach(people.integrator, zone.id, { version: zone.version, target: { type: "room" }, toneCurveId: curve });
    expect(bad.status).toBe(400);
    const [other] = await query<{ id: string }>(
      "insert into tone_curves (organization_id, name) select id, 'Elsewhere' from organization where slug <> (select o.slug from organization o join zones z on z.organization_id = o.id where z.id = $1) limit 1 returning id",
      [zone.id],
    );
    expect((await attach(people.integrator, zone.id, { version: zone.version, target: { type: "zone" }, toneCurveId: other.id })).status).toBe(404);
    expect(await zoneFingerprint(zone.id)).toBe(before);

    const locked = await as(people.support, lockRoute, {
      method: "POST",
      path: `/api/zones/${zone.id}/guest-lock`,
      params: { zoneId: zone.id },
      body: { version: zone.version, reason: "Late workouts" },
    });
    expect(locked.status).toBe(200);
    const lockedPrint = await zoneFingerprint(zone.id);
    const refused = await attach(people.installer, zone.id, { version: zone.version + 1, target: { type: "zone" }, toneCurveId: curve });
    expect(refused.status).toBe(423);
    expect(await zoneFingerprint(zone.id)).toBe(lockedPrint);
  });
});
