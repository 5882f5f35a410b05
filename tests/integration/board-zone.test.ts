import { describe, expect, it } from "vitest";
import { PATCH as settingsRoute } from "@/app/api/zones/[zoneId]/settings/route";
import { DELETE as unlockRoute, POST as lockRoute } from "@/app/api/zones/[zoneId]/guest-lock/route";
import type { BoardWriteResult } from "@/lib/board/types";
import { query } from "./helpers/database";
import { as, auditCount, revisionCount, zoneByName, zoneFingerprint, zoneVersion } from "./helpers/board";
import { people } from "./helpers/http";

function patch(email: string, zoneId: string, body: unknown) {
  return as(email, settingsRoute, { method: "PATCH", path: `/api/zones/${zoneId}/settings`, params: { zoneId }, body });
}
function lock(email: string, zoneId: string, body: unknown) {
  return as(email, lockRoute, { method: "POST", path: `/api/zones/${zoneId}/guest-lock`, params: { zoneId }, body });
}
function unlock(email: string, zoneId: string, body: unknown) {
  return as(email, unlockRoute, { method: "DELETE", path: `/api/zones/${zoneId}/guest-lock`, params: { zoneId }, body });
}

describe("PATCH /api/zones/:zoneId/settings", () => {
  it("an integrator changes name, ceiling, turn-on volume and device settings; version, revision and audit follow", async () => {
    const zone = await zoneByName("Brightwater loft", "Studio");
    const revisionsBefore = await revisionCount(zone.id);
    const res = await patch(people.integrator, zone.id, {
      version: zone.version,
      volumeCeiling: 72,
      turnOnVolume: 18,
      deviceSettings: { standbyMinutes: 30, displayBrightness: 40, cecPower: true, cecVolume: false, trigger12v: true },
    });
    expect(res.status).toBe(200);
    const result = res.json as unknown as BoardWriteResult;
    expect(result.zones[0]).toMatchObject({ id: zone.id, version: zone.version + 1, volumeCeiling: 72, turnOnVolume: 18 });
    expect(result.zones[0].deviceSettings).toEqual({ standbyMinutes: 30, displayBrightness: 40, cecPower: true, cecVolume: false, trigger12v: true });
    expect(await revisionCount(zone.id)).toBe(revisionsBefore + 1);
    const [audit] = await query<{ kind: string; actor_role: string; changes: { field: string; before: unknown; after: unknown }[] }>(
      "select kind, actor_role, changes from audit_events where zone_id = $1 order by created_at desc limit 1",
      [zone.id],
    );
    expect(audit.kind).toBe("zone.settings-changed");
    expect(audit.actor_role).toBe("integrator");
    expect(audit.changes).toContainEqual({ field: "zone.volumeCeiling", before: 70, after: 72 });
  });

  it("records only the fields that changed, whatever key order the stored device settings come back in", async () => {
    const zone = await zoneByName("Brightwater loft", "Studio");
    const version = (await query<{ version: number }>("select version from zones where id = $1", [zone.id]))[0].version;
    // The form sends every setting back; only the ceiling differs.
    const [row] = await query<{ device_settings: Record<string, unknown> }>("select device_settings from zones where id = $1", [zone.id]);
    const res = await patch(people.integrator, zone.id, { version, volumeCeiling: 66, deviceSettings: { ...row.device_settings } });
    expect(res.status).toBe(200);
    const [audit] = await query<{ changes: { field: string }[] }>("select changes from audit_events where zone_id = $1 order by id desc limit 1", [zone.id]);
    expect(audit.changes.map((c) => c.field)).toEqual(["zone.volumeCeiling"]);
  });

  it("refuses a turn-on volume above the ceiling with a field error and writes nothing", async () => {
    const zone = await zoneByName("Brightwater loft", "Bedroom");
    const before = await zoneFingerprint(zone.id);
    const res = await patch(people.integrator, zone.id, { version: zone.version, volumeCeiling: 40, turnOnVolume: 45 });
    expect(res.status).toBe(400);
    expect(res.json.error?.fieldErrors?.turnOnVolume?.[0]).toMatch(/cannot be above the ceiling \(40 %\)/);
    // Also when only one side is sent: the server checks the merged settings.
    const onlyTurnOn = await patch(people.integrator, zone.id, { version: zone.version, turnOnVolume: 90 });
    expect(onlyTurnOn.status).toBe(400);
    expect(onlyTurnOn.json.error?.fieldErrors?.turnOnVolume).toBeDefined();
    const badTypes = await patch(people.integrator, zone.id, { version: zone.version, volumeCeiling: "loud", name: "" });
    expect(badTypes.status).toBe(400);
    expect(Object.keys(badTypes.json.error!.fieldErrors!)).toEqual(expect.arrayContaining(["volumeCeiling", "name"]));
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("answers 409 on a stale version and changes nothing", async () => {
    const zone = await zoneByName("Nakagawa cottage", "Den");
    const first = await patch(people.integrator, zone.id, { version: zone.version, name: "Den (reading corner)" });
    expect(first.status).toBe(200);
    const before = await zoneFingerprint(zone.id);
    const stale = await patch(people.owner, zone.id, { version: zone.version, name: "Den (music)" });
    expect(stale.status).toBe(409);
    expect(stale.json.error?.code).toBe("zone:stale");
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("allows the installer on assigned homes only, and refuses support and homeowners", async () => {
    const own = await zoneByName("Aalto townhouse", "Gym");
    const ok = await patch(people.installer, own.id, { version: own.version, volumeCeiling: 76 });
    expect(ok.status).toBe(200);

    const notAssigned = await zoneByName("Brightwater loft", "Studio");
    const before = await zoneFingerprint(notAssigned.id);
    const version = await zoneVersion(notAssigned.id);
    expect((await patch(people.installer, notAssigned.id, { version, volumeCeiling: 60 })).status).toBe(403);
    expect((await patch(people.support, notAssigned.id, { version, volumeCeiling: 60 })).status).toBe(403);
    expect((await patch(people.support, notAssigned.id, { version, guestControls: { volume: false, source: true, wake: true } })).status).toBe(403);
    expect(await zoneFingerprint(notAssigned.id)).toBe(before);

    const household = await zoneByName("Lindqvist residence", "Kitchen");
    expect((await patch(people.homeowner, household.id, { version: household.version, volumeCeiling: 90 })).status).toBe(403);
    expect((await patch(people.otherHomeowner, household.id, { version: household.version, volumeCeiling: 90 })).status).toBe(404);
    expect((await patch(people.otherCompanyOwner, household.id, { version: household.version, volumeCeiling: 90 })).status).toBe(404);
  });
});

describe("guest-control lock", () => {
  it("support locks with a reason (optionally setting the controls); it is audited and snapshotted", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const res = await lock(people.support, zone.id, {
      version: zone.version,
      reason: "Neighbours complained about late-night volume",
      guestControls: { volume: false, source: true, wake: false },
    });
    expect(res.status).toBe(200);
    const column = (res.json as unknown as BoardWriteResult).zones[0];
    expect(column.guest).toMatchObject({ locked: true, volume: false, source: true, wake: false, lockedByName: "Priya Raman", lockReason: "Neighbours complained about late-night volume" });
    expect(Date.parse(column.guest.lockedAt!)).toBeGreaterThan(Date.now() - 60_000);
    const [audit] = await query<{ kind: string; summary: string; actor_role: string }>(
      "select kind, summary, actor_role from audit_events where zone_id = $1 order by created_at desc limit 1",
      [zone.id],
    );
    expect(audit).toMatchObject({ kind: "zone.guest-locked", actor_role: "support" });
    expect(audit.summary).toContain("Neighbours complained");
    const [revision] = await query<{ config: { guestControls: { locked: boolean; volume: boolean } } }>(
      "select config from zone_revisions where zone_id = $1 order by number desc limit 1",
      [zone.id],
    );
    expect(revision.config.guestControls).toMatchObject({ locked: true, volume: false });
  });

  it("while locked, an installer can change neither the guest controls nor anything else of the zone (423, who, when, why)", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const before = await zoneFingerprint(zone.id);
    const version = await zoneVersion(zone.id);
    const guest = await patch(people.installer, zone.id, { version, guestControls: { volume: true, source: true, wake: true } });
    expect(guest.status).toBe(423);
    expect(guest.json.error?.code).toBe("zone:locked");
    expect(guest.json.error?.message).toContain("Priya Raman");
    expect(guest.json.error?.message).toContain("Neighbours complained");
    const other = await patch(people.installer, zone.id, { version, volumeCeiling: 65 });
    expect(other.status).toBe(423);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });

  it("an installer may neither lock nor unlock; locking twice is refused", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const version = await zoneVersion(zone.id);
    expect((await unlock(people.installer, zone.id, { version, reason: "I am on site now" })).status).toBe(403);
    const other = await zoneByName("Aalto townhouse", "Roof terrace");
    expect((await lock(people.installer, other.id, { version: other.version, reason: "Trying to lock" })).status).toBe(403);
    expect((await lock(people.homeowner, zone.id, { version, reason: "Trying to lock" })).status).toBe(403);
    const again = await lock(people.support, zone.id, { version, reason: "Lock it again" });
    expect(again.status).toBe(422);
    expect(again.json.error?.message).toMatch(/Already locked/);
  });

  it("an integrator may still change guest controls of a locked zone (they may unlock it)", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const version = await zoneVersion(zone.id);
    const res = await patch(people.integrator, zone.id, { version, guestControls: { volume: false, source: false, wake: false } });
    expect(res.status).toBe(200);
    expect((res.json as unknown as BoardWriteResult).zones[0].guest).toMatchObject({ locked: true, source: false });
  });

  it("unlocking needs a reason and is audited; afterwards the installer may edit again", async () => {
    const zone = await zoneByName("Lindqvist residence", "Patio");
    const version = await zoneVersion(zone.id);
    const noReason = await unlock(people.support, zone.id, { version, reason: "" });
    expect(noReason.status).toBe(400);
    expect(noReason.json.error?.fieldErrors?.reason).toBeDefined();
    const audits = await auditCount(zone.id);
    const res = await unlock(people.support, zone.id, { version, reason: "Household asked to restore guest volume" });
    expect(res.status).toBe(200);
    expect((res.json as unknown as BoardWriteResult).zones[0].guest).toMatchObject({ locked: false, lockedByName: null, lockReason: null });
    expect(await auditCount(zone.id)).toBe(audits + 1);
    const [audit] = await query<{ kind: string; changes: { field: string; after: unknown }[] }>(
      "select kind, changes from audit_events where zone_id = $1 order by created_at desc limit 1",
      [zone.id],
    );
    expect(audit.kind).toBe("zone.guest-unlocked");
    expect(audit.changes).toContainEqual({ field: "zone.unlockReason", before: null, after: "Household asked to restore guest volume" });
    const after = await patch(people.installer, zone.id, { version: version + 1, guestControls: { volume: true, source: true, wake: false } });
    expect(after.status).toBe(200);
    const again = await unlock(people.support, zone.id, { version: version + 2, reason: "Not locked any more" });
    expect(again.status).toBe(422);
  });

  it("a stale lock is refused with 409 and nothing changes", async () => {
    const zone = await zoneByName("Aalto townhouse", "Living room");
    const before = await zoneFingerprint(zone.id);
    const res = await lock(people.support, zone.id, { version: zone.version + 5, reason: "Stale attempt here" });
    expect(res.status).toBe(409);
    expect(await zoneFingerprint(zone.id)).toBe(before);
  });
});
