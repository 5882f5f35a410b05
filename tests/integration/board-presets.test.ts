import { describe, expect, it } from "vitest";
import { POST as createRoute } from "@/app/api/zones/[zoneId]/presets/route";
import { DELETE as deleteRoute, PATCH as updateRoute } from "@/app/api/zones/[zoneId]/presets/[presetId]/route";
import { PUT as orderRoute } from "@/app/api/zones/[zoneId]/presets/order/route";
import { POST as transferRoute } from "@/app/api/zones/[zoneId]/presets/[presetId]/transfer/route";
import { PUT as attachRoute } from "@/app/api/zones/[zoneId]/attach-curve/route";
import { POST as lockRoute } from "@/app/api/zones/[zoneId]/guest-lock/route";
import type { BoardWriteResult } from "@/lib/board/types";
import { query } from "./helpers/database";
import { as, curveIdByName, presetsOf, zoneByName, zoneFingerprint, zoneVersion } from "./helpers/board";
import { people } from "./helpers/http";

const station = { name: "Cloudberry Chamber Hour", streamUrl: "https://stream.example.net/cloudberry", genre: "classical", loudnessOffsetDb: 1, toneCurveId: null };

function create(email: string, zoneId: string, body: unknown) {
  return as(email, createRoute, { method: "POST", path: `/api/zones/${zoneId}/presets`, params: { zoneId }, body });
}
function update(email: string, zoneId: string, presetId: string, body: unknown) {
  return as(email, updateRoute, { method: "PATCH", path: `/api/zones/${zoneId}/presets/${presetId}`, params: { zoneId, presetId }, body });
}
function reorder(email: string, zoneId: string, body: unknown) {
  return as(email, orderRoute, { method: "PUT", path: `/api/zones/${zoneId}/presets/order`, params: { zoneId }, body });
}
function transfer(email: string, zoneId: string, presetId: string, body: unknown) {
  return as(email, transferRoute, { method: "POST", path: `/api/zones/${zoneId}/presets/${presetId}/transfer`, params: { zoneId, presetId }, body });
}

describe("stream presets", () => {
  it("adds a preset (with its directory id) at the end", async () => {
    const zone = await zoneByName("Marchetti lake house", "Great room");
    const res = await create(people.integrator, zone.id, { ...station, directoryId: "st-0013", version: zone.version });
    expect(res.status).toBe(201);
    const column = (res.json as unknown as BoardWriteResult).zones[0];
    expect(column.presets.at(-1)).toMatchObject({ name: "Cloudberry Chamber Hour", directoryId: "st-0013", loudnessOffsetDb: 1, genre: "classical" });
  });

  it("accepts http and https stream URLs only, and writes nothing otherwise", async () => {
    const zone = await zoneByName("Marchetti lake house", "Great room");
    const version = await zoneVersion(zone.id);
    const before = await zoneFingerprint(zone.id);
    for (const streamUrl of ["ftp://stream.example.net/a", "javascript:alert(1)", "stream.example.net/a", ""]) {
      const res = await create(people.integrator, zone.id, { ...station, streamUrl, version });
      expect(res.status, streamUrl).toBe(400);
      expect(res.json.error?.fieldErrors?.streamUrl?.[0]).toMatch(/http:\/\/ or https:\/\//);
    }
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("refuses more presets than the device's model profile has slots", async () => {
    // The outdoor amplifier on the dock has 6 preset slots and holds 2.
    const zone = await zoneByName("Marchetti lake house", "Dock");
    let version = zone.version;
    for (let i = 0; i < 4; i++) {
      const res = await create(people.integrator, zone.id, { ...station, name: `Station ${i}`, version });
      expect(res.status).toBe(201);
      version += 1;
    }
    const before = await zoneFingerprint(zone.id);
    const full = await create(people.integrator, zone.id, { ...station, name: "One too many", version });
    expect(full.status).toBe(422);
    expect(full.json.error?.message).toMatch(/6 preset slots/);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("edits a preset's offset and curve; support may not", async () => {
    const zone = await zoneByName("Lindqvist residence", "Family room");
    const [jazz] = await presetsOf(zone.id);
    const before = await zoneFingerprint(zone.id);
    expect((await update(people.support, zone.id, jazz.id, { version: zone.version, loudnessOffsetDb: -2 })).status).toBe(403);
    expect(await zoneFingerprint(zone.id)).toBe(before);
    const res = await update(people.integrator, zone.id, jazz.id, { version: zone.version, loudnessOffsetDb: -2, name: "Harbor Lantern Jazz (HD)" });
    expect(res.status).toBe(200);
    expect((await presetsOf(zone.id))[0]).toMatchObject({ loudness_offset_db: -2, name: "Harbor Lantern Jazz (HD)" });
  });

  it("reorders presets: staff who edit, and the household of the home (favourites), but not support or another household", async () => {
    const zone = await zoneByName("Lindqvist residence", "Kitchen");
    const ids = (await presetsOf(zone.id)).map((p) => p.id);
    const wanted = [ids[2], ids[0], ids[1]];
    const before = await zoneFingerprint(zone.id);
    expect((await reorder(people.support, zone.id, { version: zone.version, ids: wanted })).status).toBe(403);
    expect((await reorder(people.otherHomeowner, zone.id, { version: zone.version, ids: wanted })).status).toBe(404);
    expect((await reorder(people.otherCompanyOwner, zone.id, { version: zone.version, ids: wanted })).status).toBe(404);
    expect(await zoneFingerprint(zone.id)).toBe(before);
    const res = await reorder(people.homeowner, zone.id, { version: zone.version, ids: wanted });
    expect(res.status).toBe(200);
    expect((await presetsOf(zone.id)).map((p) => p.id)).toEqual(wanted);
    const integrator = await reorder(people.integrator, zone.id, { version: zone.version + 1, ids });
    expect(integrator.status).toBe(200);
    const stale = await reorder(people.integrator, zone.id, { version: zone.version, ids: wanted });
    expect(stale.status).toBe(409);
    expect((await presetsOf(zone.id)).map((p) => p.id)).toEqual(ids);
  });

  it("moves a preset to another zone of the home in one transaction (both versions bump)", async () => {
    const from = await zoneByName("Lindqvist residence", "Primary suite");
    const to = await zoneByName("Lindqvist residence", "Kitchen");
    const toVersion = await zoneVersion(to.id);
    const [ambient] = await presetsOf(from.id);
    const res = await transfer(people.integrator, from.id, ambient.id, { version: from.version, targetZoneId: to.id, targetVersion: toVersion, mode: "move" });
    expect(res.status).toBe(200);
    const result = res.json as unknown as BoardWriteResult;
    expect(result.zones.map((z) => z.id).sort()).toEqual([from.id, to.id].sort());
    expect((await presetsOf(from.id)).map((p) => p.name)).toEqual(["Quiet Pines Classical"]);
    expect((await presetsOf(from.id)).map((p) => p.position)).toEqual([0]);
    expect((await presetsOf(to.id)).at(-1)?.name).toBe("Tidepool Ambient");
    expect(await zoneVersion(from.id)).toBe(from.version + 1);
    expect(await zoneVersion(to.id)).toBe(toVersion + 1);
    const kinds = await query<{ kind: string }>("select kind from audit_events where zone_id in ($1, $2) order by created_at desc limit 2", [from.id, to.id]);
    expect(kinds.map((k) => k.kind).sort()).toEqual(["zone.preset-moved-in", "zone.preset-moved-out"]);
  });

  it("copies a preset; the source zone stays as it was", async () => {
    const from = await zoneByName("Lindqvist residence", "Family room");
    const to = await zoneByName("Lindqvist residence", "Primary suite");
    const fromVersion = await zoneVersion(from.id);
    const toVersion = await zoneVersion(to.id);
    const fromBefore = await zoneFingerprint(from.id);
    const [, classical] = await presetsOf(from.id);
    const res = await transfer(people.installer, from.id, classical.id, { version: fromVersion, targetZoneId: to.id, targetVersion: toVersion, mode: "copy" });
    expect(res.status).toBe(200);
    expect(await zoneFingerprint(from.id)).toBe(fromBefore);
    expect((await presetsOf(to.id)).at(-1)?.name).toBe("Quiet Pines Classical");
  });

  it("refuses a move into a full zone, a locked zone, another home, a stale zone or a role that may not; nothing changes", async () => {
    const from = await zoneByName("Lindqvist residence", "Family room");
    const patio = await zoneByName("Lindqvist residence", "Patio");
    const fromVersion = await zoneVersion(from.id);
    let patioVersion = await zoneVersion(patio.id);
    const [jazz] = await presetsOf(from.id);
    // Fill the patio (6 slots, 2 used).
    for (let i = 0; i < 4; i++) {
      expect((await create(people.integrator, patio.id, { ...station, name: `Patio ${i}`, version: patioVersion })).status).toBe(201);
      patioVersion += 1;
    }
    const fromBefore = await zoneFingerprint(from.id);
    const patioBefore = await zoneFingerprint(patio.id);
    const full = await transfer(people.integrator, from.id, jazz.id, { version: fromVersion, targetZoneId: patio.id, targetVersion: patioVersion, mode: "move" });
    expect(full.status).toBe(422);
    expect(full.json.error?.message).toMatch(/full/);

    const kitchen = await zoneByName("Lindqvist residence", "Kitchen");
    const kitchenVersion = await zoneVersion(kitchen.id);
    const stale = await transfer(people.integrator, from.id, jazz.id, { version: fromVersion - 1, targetZoneId: kitchen.id, targetVersion: kitchenVersion, mode: "move" });
    expect(stale.status).toBe(409);
    const staleTarget = await transfer(people.integrator, from.id, jazz.id, { version: fromVersion, targetZoneId: kitchen.id, targetVersion: kitchenVersion + 3, mode: "move" });
    expect(staleTarget.status).toBe(409);

    const otherHome = await zoneByName("Aalto townhouse", "Gym");
    const crossHome = await transfer(people.integrator, from.id, jazz.id, { version: fromVersion, targetZoneId: otherHome.id, targetVersion: await zoneVersion(otherHome.id), mode: "copy" });
    expect(crossHome.status).toBe(422);

    expect((await transfer(people.support, from.id, jazz.id, { version: fromVersion, targetZoneId: kitchen.id, targetVersion: kitchenVersion, mode: "move" })).status).toBe(403);
    expect((await transfer(people.homeowner, from.id, jazz.id, { version: fromVersion, targetZoneId: kitchen.id, targetVersion: kitchenVersion, mode: "copy" })).status).toBe(403);

    const lock = await as(people.support, lockRoute, {
      method: "POST",
      path: `/api/zones/${kitchen.id}/guest-lock`,
      params: { zoneId: kitchen.id },
      body: { version: kitchenVersion, reason: "Holding the kitchen as the household asked" },
    });
    expect(lock.status).toBe(200);
    const kitchenBefore = await zoneFingerprint(kitchen.id);
    const locked = await transfer(people.installer, from.id, jazz.id, { version: fromVersion, targetZoneId: kitchen.id, targetVersion: kitchenVersion + 1, mode: "move" });
    expect(locked.status).toBe(423);

    expect(await zoneFingerprint(from.id)).toBe(fromBefore);
    expect(await zoneFingerprint(patio.id)).toBe(patioBefore);
    expect(await zoneFingerprint(kitchen.id)).toBe(kitchenBefore);
  });

  it("attaches a curve to a preset and removes a preset", async () => {
    const zone = await zoneByName("Aalto townhouse", "Gym");
    const [electronica] = await presetsOf(zone.id);
    const curve = await curveIdByName("TV dialogue lift");
    const attach = await as(people.integrator, attachRoute, {
      method: "PUT",
      path: `/api/zones/${zone.id}/attach-curve`,
      params: { zoneId: zone.id },
      body: { version: zone.version, target: { type: "preset", id: electronica.id }, toneCurveId: curve },
    });
    expect(attach.status).toBe(200);
    expect((await presetsOf(zone.id))[0].tone_curve_id).toBe(curve);
    const removed = await as(people.integrator, deleteRoute, {
      method: "DELETE",
      path: `/api/zones/${zone.id}/presets/${electronica.id}?version=${zone.version + 1}`,
      params: { zoneId: zone.id, presetId: electronica.id },
    });
    expect(removed.status).toBe(200);
    expect((await presetsOf(zone.id)).map((p) => [p.name, p.position])).toEqual([["Velvet Hour Soul", 0]]);
  });
});
