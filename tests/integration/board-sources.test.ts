import { describe, expect, it } from "vitest";
import { POST as createRoute } from "@/app/api/zones/[zoneId]/sources/route";
import { DELETE as deleteRoute, PATCH as updateRoute } from "@/app/api/zones/[zoneId]/sources/[sourceId]/route";
import { PUT as orderRoute } from "@/app/api/zones/[zoneId]/sources/order/route";
import { PUT as attachRoute } from "@/app/api/zones/[zoneId]/attach-curve/route";
import { POST as lockRoute } from "@/app/api/zones/[zoneId]/guest-lock/route";
import type { BoardWriteResult } from "@/lib/board/types";
import { query } from "./helpers/database";
import { as, curveIdByName, sourcesOf, zoneByName, zoneFingerprint, zoneVersion } from "./helpers/board";
import { people } from "./helpers/http";

const newSource = { label: "Record player", kind: "analog", enabled: true, loudnessOffsetDb: 2.5, toneCurveId: null, subsonic: true };

function create(email: string, zoneId: string, body: unknown) {
  return as(email, createRoute, { method: "POST", path: `/api/zones/${zoneId}/sources`, params: { zoneId }, body });
}
function update(email: string, zoneId: string, sourceId: string, body: unknown) {
  return as(email, updateRoute, { method: "PATCH", path: `/api/zones/${zoneId}/sources/${sourceId}`, params: { zoneId, sourceId }, body });
}
function remove(email: string, zoneId: string, sourceId: string, version: number | string) {
  return as(email, deleteRoute, { method: "DELETE", path: `/api/zones/${zoneId}/sources/${sourceId}?version=${version}`, params: { zoneId, sourceId } });
}
function reorder(email: string, zoneId: string, body: unknown) {
  return as(email, orderRoute, { method: "PUT", path: `/api/zones/${zoneId}/sources/order`, params: { zoneId }, body });
}
function attach(email: string, zoneId: string, body: unknown) {
  return as(email, attachRoute, { method: "PUT", path: `/api/zones/${zoneId}/attach-curve`, params: { zoneId }, body });
}

describe("sources", () => {
  it("an integrator adds a source at the end; the answer carries the fresh column", async () => {
    const zone = await zoneByName("Lindqvist residence", "Kitchen");
    const res = await create(people.integrator, zone.id, { ...newSource, version: zone.version });
    expect(res.status).toBe(201);
    const column = (res.json as unknown as BoardWriteResult).zones[0];
    expect(column.version).toBe(zone.version + 1);
    expect(column.sources.at(-1)).toMatchObject({ label: "Record player", kind: "analog", loudnessOffsetDb: 2.5, subsonic: true });
    expect((await sourcesOf(zone.id)).map((s) => s.position)).toEqual([0, 1, 2, 3]);
  });

  it("validates the form with the shared schema and writes nothing on bad input", async () => {
    const zone = await zoneByName("Lindqvist residence", "Kitchen");
    const version = await zoneVersion(zone.id);
    const before = await zoneFingerprint(zone.id);
    const offStep = await create(people.integrator, zone.id, { ...newSource, loudnessOffsetDb: 1.3, version });
    expect(offStep.status).toBe(400);
    expect(offStep.json.error?.fieldErrors?.loudnessOffsetDb?.[0]).toMatch(/steps of 0.5 dB/);
    const outOfRange = await create(people.integrator, zone.id, { ...newSource, loudnessOffsetDb: 13, label: "", kind: "cassette", version });
    expect(outOfRange.status).toBe(400);
    expect(Object.keys(outOfRange.json.error!.fieldErrors!)).toEqual(expect.arrayContaining(["loudnessOffsetDb", "label", "kind"]));
    const noVersion = await create(people.integrator, zone.id, newSource);
    expect(noVersion.status).toBe(400);
    const badJson = await as(people.integrator, createRoute, { method: "POST", path: `/api/zones/${zone.id}/sources`, params: { zoneId: zone.id } });
    expect(badJson.status).toBe(400);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("refuses an input the device's model profile does not have", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const before = await zoneFingerprint(zone.id);
    const res = await create(people.integrator, zone.id, { ...newSource, kind: "hdmi_arc", label: "TV", subsonic: false, version: zone.version });
    expect(res.status).toBe(422);
    expect(res.json.error?.message).toMatch(/no HDMI ARC input/);
    expect(res.json.error?.fieldErrors?.kind).toBeDefined();
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("edits the offset, the curve and the subsonic filter; 409 when stale", async () => {
    const zone = await zoneByName("Aalto townhouse", "Living room");
    const [, computer] = await sourcesOf(zone.id);
    const curve = await curveIdByName("Bright hard-surfaced room");
    const res = await update(people.installer, zone.id, computer.id, { version: zone.version, loudnessOffsetDb: -3.5, toneCurveId: curve, subsonic: true });
    expect(res.status).toBe(200);
    const after = (await sourcesOf(zone.id)).find((s) => s.id === computer.id)!;
    expect(after).toMatchObject({ loudness_offset_db: -3.5, tone_curve_id: curve, subsonic: true });
    const before = await zoneFingerprint(zone.id);
    const stale = await update(people.integrator, zone.id, computer.id, { version: zone.version, loudnessOffsetDb: 0 });
    expect(stale.status).toBe(409);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("refuses a curve from another company's library (404) and a curve that needs more EQ bands than the device has", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const [streaming] = await sourcesOf(zone.id);
    const before = await zoneFingerprint(zone.id);
    const [{ org }] = await query<{ org: string }>("select id as org from organization where name = 'Tidewater Home Tech'");
    const [foreign] = await query<{ id: string }>("insert into tone_curves (organization_id, name) values ($1, 'Foreign curve') returning id", [org]);
    const notOurs = await attach(people.integrator, zone.id, { version: zone.version, target: { type: "source", id: streaming.id }, toneCurveId: foreign.id });
    expect(notOurs.status).toBe(404);
    // The patio's outdoor amplifier has 5 EQ bands; its zone curve uses 3, this one needs 3.
    const tooMany = await attach(people.integrator, zone.id, {
      version: zone.version,
      target: { type: "source", id: streaming.id },
      toneCurveId: await curveIdByName("In-ceiling speaker voicing"),
    });
    expect(tooMany.status).toBe(422);
    expect(tooMany.json.error?.message).toMatch(/5 EQ bands/);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("attaches and detaches a curve by drop", async () => {
    const zone = await zoneByName("Lindqvist residence", "Family room");
    const sources = await sourcesOf(zone.id);
    const phone = sources.find((s) => s.label === "Phone")!;
    const curve = await curveIdByName("Bright hard-surfaced room");
    const res = await attach(people.integrator, zone.id, { version: zone.version, target: { type: "source", id: phone.id }, toneCurveId: curve });
    expect(res.status).toBe(200);
    expect((res.json as unknown as BoardWriteResult).zones[0].sources.find((s) => s.id === phone.id)?.toneCurveId).toBe(curve);
    const detach = await attach(people.integrator, zone.id, { version: zone.version + 1, target: { type: "source", id: phone.id }, toneCurveId: null });
    expect(detach.status).toBe(200);
    expect((await sourcesOf(zone.id)).find((s) => s.id === phone.id)?.tone_curve_id).toBeNull();
    const [audit] = await query<{ kind: string }>("select kind from audit_events where zone_id = $1 order by created_at desc limit 1", [zone.id]);
    expect(audit.kind).toBe("zone.curve-detached");
  });

  it("reorders sources; a list that does not match the zone is refused", async () => {
    const zone = await zoneByName("Lindqvist residence", "Family room");
    const version = await zoneVersion(zone.id);
    const ids = (await sourcesOf(zone.id)).map((s) => s.id);
    const wanted = [ids[2], ids[0], ids[3], ids[1]];
    const before = await zoneFingerprint(zone.id);
    const partial = await reorder(people.integrator, zone.id, { version, ids: ids.slice(1) });
    expect(partial.status).toBe(422);
    const duplicated = await reorder(people.integrator, zone.id, { version, ids: [ids[0], ids[0], ids[1], ids[2]] });
    expect(duplicated.status).toBe(422);
    expect((await reorder(people.support, zone.id, { version, ids: wanted })).status).toBe(403);
    expect((await reorder(people.homeowner, zone.id, { version, ids: wanted })).status).toBe(403);
    expect(await zoneFingerprint(zone.id)).toBe(before);
    const ok = await reorder(people.installer, zone.id, { version, ids: wanted });
    expect(ok.status).toBe(200);
    expect((await sourcesOf(zone.id)).map((s) => s.id)).toEqual(wanted);
    const stale = await reorder(people.integrator, zone.id, { version, ids });
    expect(stale.status).toBe(409);
    expect((await sourcesOf(zone.id)).map((s) => s.id)).toEqual(wanted);
  });

  it("removes a source and closes the gap; DELETE needs ?version", async () => {
    const zone = await zoneByName("Brightwater loft", "Studio");
    const [mixer] = await sourcesOf(zone.id);
    expect((await remove(people.integrator, zone.id, mixer.id, "x")).status).toBe(400);
    expect((await remove(people.support, zone.id, mixer.id, zone.version)).status).toBe(403);
    const res = await remove(people.integrator, zone.id, mixer.id, zone.version);
    expect(res.status).toBe(200);
    const left = await sourcesOf(zone.id);
    expect(left.map((s) => s.label)).toEqual(["Computer", "Streaming"]);
    expect(left.map((s) => s.position)).toEqual([0, 1]);
    expect((await remove(people.integrator, zone.id, mixer.id, zone.version + 1)).status).toBe(404);
  });

  it("a locked zone refuses the installer's source edits and drops", async () => {
    const zone = await zoneByName("Aalto townhouse", "Gym");
    const locked = await as(people.support, lockRoute, {
      method: "POST",
      path: `/api/zones/${zone.id}/guest-lock`,
      params: { zoneId: zone.id },
      body: { version: zone.version, reason: "Volume complaints from the flat below" },
    });
    expect(locked.status).toBe(200);
    const version = zone.version + 1;
    const before = await zoneFingerprint(zone.id);
    const [streaming] = await sourcesOf(zone.id);
    expect((await update(people.installer, zone.id, streaming.id, { version, loudnessOffsetDb: 1 })).status).toBe(423);
    const drop = await attach(people.installer, zone.id, { version, target: { type: "source", id: streaming.id }, toneCurveId: await curveIdByName("Gym punch") });
    expect(drop.status).toBe(423);
    expect(drop.json.error?.message).toMatch(/Priya Raman locked “Gym”.*Volume complaints/);
    expect(await zoneFingerprint(zone.id)).toBe(before);
    // An integrator (who may unlock) still can.
    expect((await update(people.integrator, zone.id, streaming.id, { version, loudnessOffsetDb: 1 })).status).toBe(200);
  });
});
