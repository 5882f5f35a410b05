import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { POST as webhookRoute } from "@/app/api/fleet/webhook/route";
import { GET as homeDriftRoute } from "@/app/api/fleet/drift/route";
import { POST as bulkFirmwareRoute } from "@/app/api/devices/firmware/route";
import { GET as deviceRoute } from "@/app/api/devices/[deviceId]/route";
import { POST as firmwareRoute } from "@/app/api/devices/[deviceId]/firmware/route";
import { GET as logsRoute } from "@/app/api/devices/[deviceId]/logs/route";
import { POST as cancelRoute } from "@/app/api/pushes/[pushId]/cancel/route";
import { GET as pushDetailRoute } from "@/app/api/pushes/[pushId]/route";
import { POST as retryRoute } from "@/app/api/pushes/[pushId]/retry-failed/route";
import { POST as previewRoute } from "@/app/api/pushes/preview/route";
import { GET as listPushesRoute } from "@/app/api/pushes/route";
import { POST as adoptRoute } from "@/app/api/zones/[zoneId]/adopt-reported/route";
import { GET as driftRoute } from "@/app/api/zones/[zoneId]/drift/route";
import { env } from "@/lib/env";
import { signWebhook } from "@/lib/fleet/webhook-signature";
import { query } from "./helpers/database";
import {
  addPresets,
  createHarness,
  editZoneCeiling,
  fleetIdOfZone,
  freshState,
  homeIdOf,
  sleep,
  startPushAs,
  startPushOk,
  waitForPush,
  expectConverged,
  zoneIdOf,
  type Harness,
} from "./helpers/fleet-harness";
import { callRoute, people, signInAs } from "./helpers/http";

// The push API end to end on the real database: preview and its refusals,
// who may push what, the webhook's guards, drift, adopt reported, push again,
// rollback, cancel and retry, the summary e-mail, firmware and log bundles.

let h: Harness;

beforeAll(async () => {
  h = await createHarness();
});
afterAll(async () => {
  await h.close();
});
beforeEach(async () => {
  await freshState(h);
});
afterEach(async () => {
  await h.stopWorkers();
});

const LINDQVIST = "Lindqvist residence";

async function preview(email: string, scope: object) {
  return callRoute(previewRoute, { method: "POST", path: "/api/pushes/preview", body: { scope }, cookie: await signInAs(email) });
}

async function drift(email: string, zoneId: string) {
  return callRoute(driftRoute, { path: `/api/zones/${zoneId}/drift`, params: { zoneId }, cookie: await signInAs(email) });
}

async function deviceIdOfZone(zoneId: string) {
  const [row] = await query<{ device_id: string }>("select device_id from zones where id = $1", [zoneId]);
  return row.device_id;
}

type PreviewZone = { zoneName: string; outcome: string; reasons: string[]; warnings: string[]; problems: { code: string; requested: number; allowed: number }[]; changes: { field: string; reported: string; pushed: string }[]; firstPush: boolean };

describe("preview", () => {
  it("lists every zone of a selection across homes, refusing what the device cannot take, with the reason", async () => {
    const patio = await zoneIdOf(LINDQVIST, "Patio");
    const gym = await zoneIdOf("Aalto townhouse", "Gym");
    const loft = await zoneIdOf("Marchetti lake house", "Guest loft");
    // The patio's outdoor amplifier has 6 preset slots (lib/devices/model-profiles.ts); 2 + 5 = 7.
    await addPresets(people.integrator, patio, 5);

    const res = await preview(people.integrator, { kind: "selection", zoneIds: [patio, gym, loft] });
    expect(res.status).toBe(200);
    const zones = res.json.zones as PreviewZone[];
    const byName = Object.fromEntries(zones.map((z) => [z.zoneName, z]));
    expect(byName.Patio.outcome).toBe("refused");
    expect(byName.Patio.problems[0]).toMatchObject({ code: "preset-slots", requested: 7, allowed: 6 });
    expect(byName.Patio.reasons[0]).toMatch(/7 stream presets, but the Outdoor-rated amplifier, 2 × 50 W has 6 preset slots/);
    expect(byName.Gym).toMatchObject({ outcome: "push", firstPush: true });
    expect(byName["Guest loft"].outcome).toBe("push");
    expect(byName["Guest loft"].warnings[0]).toMatch(/offline/);
    expect(res.json.counts).toEqual({ push: 2, refused: 1, skipped: 0, unchanged: 0 });
    expect(res.json.scope).toEqual({ kind: "selection", label: "3 zones in 3 homes" });

    // Starting it pushes the two that may go and nothing else.
    const started = await startPushAs(people.integrator, { kind: "selection", zoneIds: [patio, gym, loft] });
    expect(started.status).toBe(201);
    expect(started.json.targetCount).toBe(2);
    const targets = await query<{ zone_id: string }>("select zone_id from push_targets where push_id = $1", [started.json.pushId]);
    expect(targets.map((t) => t.zone_id).sort()).toEqual([gym, loft].sort());
  });

  it("shows desired vs last reported field by field, and leaves in-sync zones out of a home push", async () => {
    await h.startWorker();
    const homeId = await homeIdOf(LINDQVIST);
    await waitForPush(h, await startPushOk(people.integrator, { kind: "home", homeId }));
    const family = await zoneIdOf(LINDQVIST, "Family room");
    await editZoneCeiling(people.integrator, family, 50);

    const res = await preview(people.integrator, { kind: "home", homeId });
    const zones = res.json.zones as PreviewZone[];
    const fam = zones.find((z) => z.zoneName === "Family room")!;
    expect(fam.outcome).toBe("push");
    expect(fam.changes).toContainEqual(expect.objectContaining({ field: "Volume ceiling", reported: "75 %", pushed: "50 %" }));
    expect(zones.filter((z) => z.outcome === "unchanged").map((z) => z.zoneName).sort()).toEqual(["Kitchen", "Patio", "Primary suite"]);

    const pushId = await startPushOk(people.integrator, { kind: "home", homeId });
    const targets = await waitForPush(h, pushId);
    expect(targets).toHaveLength(1);
    expect(targets[0].state).toBe("applied");
    // Now everything is in sync: nothing left to push.
    const again = await startPushAs(people.integrator, { kind: "home", homeId });
    expect(again.status).toBe(422);
    expect(again.json.error!.code).toBe("push:empty");
    expect(again.json.error!.message).toMatch(/already reports this configuration/);
  });

  it("refuses to push a zone whose revision changed since the preview", async () => {
    const kitchen = await zoneIdOf(LINDQVIST, "Kitchen");
    const seen = (await query<{ current_revision_id: string }>("select current_revision_id from zones where id = $1", [kitchen]))[0].current_revision_id;
    await editZoneCeiling(people.integrator, kitchen, 40);
    const res = await startPushAs(people.integrator, { kind: "zone", zoneId: kitchen }, { expectedRevisions: { [kitchen]: seen } });
    expect(res.status).toBe(409);
    expect(res.json.error!.code).toBe("push:stale-preview");
    const [{ n }] = await query<{ n: number }>("select count(*)::int as n from pushes");
    expect(n).toBe(0);
  });

  it("rejects a malformed scope with field errors and changes nothing", async () => {
    const res = await preview(people.integrator, { kind: "selection", zoneIds: ["not-a-uuid"] });
    expect(res.status).toBe(400);
    expect(res.json.error!.code).toBe("request:invalid");
    const bad = await startPushAs(people.integrator, { kind: "everything" } as never);
    expect(bad.status).toBe(400);
  });
});

describe("who may push", () => {
  it("an installer pushes the homes they are assigned to, and only those", async () => {
    const ok = await startPushAs(people.installer, { kind: "home", homeId: await homeIdOf(LINDQVIST) });
    expect(ok.status).toBe(201);
    const refused = await startPushAs(people.installer, { kind: "home", homeId: await homeIdOf("Marchetti lake house") });
    expect(refused.status).toBe(403);
    expect(refused.json.error!.message).toMatch(/not one of the homes you are assigned to/);
  });

  it("support may re-push only a revision the device applied before", async () => {
    await h.startWorker();
    const kitchen = await zoneIdOf(LINDQVIST, "Kitchen");
    const first = await startPushAs(people.support, { kind: "zone", zoneId: kitchen });
    expect(first.status).toBe(422);
    expect(first.json.error!.message).toMatch(/re-push only a revision this device has applied before/);
    await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId: kitchen }));
    const again = await startPushAs(people.support, { kind: "zone", zoneId: kitchen });
    expect(again.status).toBe(201);
    await waitForPush(h, again.json.pushId as string);
  });

  it("a homeowner may not push, except their household's own change; other companies see nothing", async () => {
    const homeId = await homeIdOf(LINDQVIST);
    expect((await preview(people.homeowner, { kind: "home", homeId })).status).toBe(403);
    const household = await startPushAs(people.homeowner, { kind: "household", homeId, zoneIds: [await zoneIdOf(LINDQVIST, "Kitchen")] });
    expect(household.status).toBe(201);
    const other = await startPushAs(people.homeowner, { kind: "household", homeId: await homeIdOf("Marchetti lake house") });
    expect(other.status).toBe(404);

    const pushId = household.json.pushId as string;
    const foreign = await callRoute(pushDetailRoute, { path: `/api/pushes/${pushId}`, params: { pushId }, cookie: await signInAs(people.otherCompanyOwner) });
    expect(foreign.status).toBe(404);
    const foreignZone = await startPushAs(people.otherCompanyOwner, { kind: "zone", zoneId: await zoneIdOf(LINDQVIST, "Kitchen") });
    expect(foreignZone.status).toBe(404);
    const list = await callRoute(listPushesRoute, { path: "/api/pushes", cookie: await signInAs(people.otherCompanyOwner) });
    expect(list.json.items).toEqual([]);
  });

  it("lists pushes with who, when, scope and counts by state; the detail shows each target", async () => {
    await h.startWorker();
    const pushId = await startPushOk(people.integrator, { kind: "home", homeId: await homeIdOf(LINDQVIST) });
    await waitForPush(h, pushId);
    const list = await callRoute(listPushesRoute, { path: "/api/pushes", cookie: await signInAs(people.support) });
    expect(list.status).toBe(200);
    const [row] = list.json.items as { createdBy: string; scopeLabel: string; status: string; counts: Record<string, number>; total: number }[];
    expect(row).toMatchObject({ createdBy: "Theo Banerjee", scopeLabel: LINDQVIST, status: "finished", total: 4 });
    expect(row.counts.applied).toBe(4);
    const detail = await callRoute(pushDetailRoute, { path: `/api/pushes/${pushId}`, params: { pushId }, cookie: await signInAs(people.support) });
    expect(detail.status).toBe(200);
    expect((detail.json.targets as { stateLabel: string }[]).map((t) => t.stateLabel)).toEqual(["Applied", "Applied", "Applied", "Applied"]);
    expect(detail.json.canRetry).toBe(false);
  });
});

describe("webhook guards", () => {
  const secret = () => env().FLEET_WEBHOOK_SECRET;

  function event(overrides: Record<string, unknown> = {}) {
    return {
      kind: "online",
      eventId: crypto.randomUUID(),
      deviceId: "fd-lindqvist-kitchen",
      sequence: 5,
      desiredVersion: 0,
      reportedVersion: 0,
      status: null,
      config: null,
      error: null,
      firmwareVersion: "3.4.2",
      online: false,
      origin: "system",
      updateId: null,
      occurredAt: new Date().toISOString(),
      ...overrides,
    };
  }

  async function deliver(body: string, headers: Record<string, string>) {
    const response = await webhookRoute(new Request("http://app.test/api/fleet/webhook", { method: "POST", body, headers: { "content-type": "application/json", ...headers } }));
    return { status: response.status, json: (await response.json()) as Record<string, unknown> & { error?: { code: string } } };
  }

  function signed(body: string, at = Math.floor(Date.now() / 1000), key = secret()) {
    return { "x-fleet-timestamp": String(at), "x-fleet-signature": signWebhook(key, at, body) };
  }

  it("refuses unsigned, wrongly signed and stale deliveries with 401, and changes nothing", async () => {
    const body = JSON.stringify(event());
    expect((await deliver(body, {})).status).toBe(401);
    expect((await deliver(body, signed(body, undefined, "not-the-secret-at-all"))).status).toBe(401);
    expect((await deliver(body, signed(body, Math.floor(Date.now() / 1000) - 3600))).status).toBe(401);
    const tampered = await deliver(body.replace('"online":false', '"online":true'), signed(body));
    expect(tampered.status).toBe(401);
    expect(tampered.json.error!.code).toBe("webhook:unsigned");
    const [{ n }] = await query<{ n: number }>("select count(*)::int as n from fleet_events");
    expect(n).toBe(0);
    const [device] = await query<{ online: boolean }>("select online from devices where fleet_device_id = 'fd-lindqvist-kitchen'");
    expect(device.online).toBe(true);
  });

  it("refuses a signed body that is not a fleet event with 400", async () => {
    const body = JSON.stringify({ hello: "world" });
    const res = await deliver(body, signed(body));
    expect(res.status).toBe(400);
    expect(res.json.error!.code).toBe("webhook:invalid");
  });

  it("acknowledges a duplicate without applying it again, and never lets an older sequence overwrite a newer one", async () => {
    const newer = JSON.stringify(event({ sequence: 7, online: false }));
    expect((await deliver(newer, signed(newer))).json.outcome).toBe("stored");
    expect((await deliver(newer, signed(newer))).json.outcome).toBe("duplicate");
    const older = JSON.stringify(event({ sequence: 6, online: true }));
    const res = await deliver(older, signed(older));
    expect(res.status).toBe(200);
    expect(res.json.outcome).toBe("stale");
    const [device] = await query<{ online: boolean }>("select online from devices where fleet_device_id = 'fd-lindqvist-kitchen'");
    expect(device.online).toBe(false);
    const [{ n }] = await query<{ n: number }>("select count(*)::int as n from fleet_events");
    expect(n).toBe(2);
  });
});

describe("drift, adopt reported, push again", () => {
  it("shows drift field by field after a change at the device; push again brings it back in sync", async () => {
    await h.startWorker();
    const zoneId = await zoneIdOf(LINDQVIST, "Family room");
    const fleetId = await fleetIdOfZone(zoneId);
    expect(((await drift(people.support, zoneId)).json.state)).toBe("never_reported");
    await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId }));
    expect((await drift(people.support, zoneId)).json.state).toBe("in_sync");

    h.store.tamper(fleetId, { volumeCeiling: 90 });
    await h.store.idle();
    const drifted = await drift(people.support, zoneId);
    expect(drifted.json).toMatchObject({ state: "drifted", label: "Drifted", canPushAgain: true, canAdopt: false });
    expect(drifted.json.changes).toEqual([expect.objectContaining({ field: "Volume ceiling", desired: "75 %", reported: "90 %" })]);
    const [audit] = await query<{ summary: string; actor_role: string }>("select summary, actor_role from audit_events where kind = 'device.drifted'");
    expect(audit.actor_role).toBe("system");
    expect(audit.summary).toMatch(/changed at the device and now differs in 1 field/);

    const homeDrift = await callRoute(homeDriftRoute, { path: `/api/fleet/drift?homeId=${await homeIdOf(LINDQVIST)}`, cookie: await signInAs(people.support) });
    expect((homeDrift.json.zones as { zoneName: string; state: string }[]).find((z) => z.zoneName === "Family room")!.state).toBe("drifted");

    // Support re-pushes the known-good revision: a new desired version, applied once.
    const again = await startPushOk(people.support, { kind: "zone", zoneId });
    const [target] = await waitForPush(h, again);
    expect(target.state).toBe("applied");
    expect(target.idempotency_key.endsWith(":2")).toBe(true);
    expect((await drift(people.support, zoneId)).json.state).toBe("in_sync");
    await expectConverged(h, [target]);
  });

  it("adopt reported makes the device's configuration the desired one (integrators), not support", async () => {
    await h.startWorker();
    const zoneId = await zoneIdOf(LINDQVIST, "Kitchen");
    await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId }));
    h.store.tamper(await fleetIdOfZone(zoneId), { volumeCeiling: 72, guestControls: { source: false } });
    await h.store.idle();
    const seen = await drift(people.integrator, zoneId);
    expect(seen.json.canAdopt).toBe(true);

    const bySupport = await callRoute(adoptRoute, {
      method: "POST",
      path: `/api/zones/${zoneId}/adopt-reported`,
      params: { zoneId },
      body: { expectedVersion: seen.json.zoneVersion },
      cookie: await signInAs(people.support),
    });
    expect(bySupport.status).toBe(403);
    const stale = await callRoute(adoptRoute, {
      method: "POST",
      path: `/api/zones/${zoneId}/adopt-reported`,
      params: { zoneId },
      body: { expectedVersion: (seen.json.zoneVersion as number) + 1 },
      cookie: await signInAs(people.integrator),
    });
    expect(stale.status).toBe(409);
    const adopted = await callRoute(adoptRoute, {
      method: "POST",
      path: `/api/zones/${zoneId}/adopt-reported`,
      params: { zoneId },
      body: { expectedVersion: seen.json.zoneVersion },
      cookie: await signInAs(people.integrator),
    });
    expect(adopted.status).toBe(200);
    const [zone] = await query<{ volume_ceiling: number; guest_source: boolean }>("select volume_ceiling, guest_source from zones where id = $1", [zoneId]);
    expect(zone).toEqual({ volume_ceiling: 72, guest_source: false });
    expect((await drift(people.integrator, zoneId)).json.state).toBe("in_sync");
    const [audit] = await query<{ kind: string }>("select kind from audit_events where kind = 'zone.adopted-reported'");
    expect(audit).toBeTruthy();
  });
});

describe("rollback", () => {
  it("pushes an earlier revision: restored as desired by an integrator, pushed as is by support", async () => {
    await h.startWorker();
    const zoneId = await zoneIdOf(LINDQVIST, "Patio");
    await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId }));
    const [rev1] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [zoneId]);
    await editZoneCeiling(people.integrator, zoneId, 45);
    await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId }));
    const [rev2] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 2", [zoneId]);

    // Support: revision 1 was applied to this device before, so it may go out again, as is.
    const bySupport = await startPushAs(people.support, { kind: "rollback", zoneId, revisionId: rev1.id });
    expect(bySupport.status).toBe(201);
    await waitForPush(h, bySupport.json.pushId as string);
    const afterSupport = await drift(people.support, zoneId);
    expect(afterSupport.json.state).toBe("drifted"); // the device runs revision 1; revision 2 is still desired
    const restoreBySupport = await startPushAs(people.support, { kind: "rollback", zoneId, revisionId: rev1.id, restore: true });
    expect(restoreBySupport.status).toBe(403);

    // Integrator: revision 1 becomes desired again (revision 3) and is pushed.
    const byIntegrator = await startPushAs(people.integrator, { kind: "rollback", zoneId, revisionId: rev1.id, restore: true });
    expect(byIntegrator.status).toBe(201);
    expect(byIntegrator.json.restoredRevision).toMatchObject({ number: 3 });
    const [target] = await waitForPush(h, byIntegrator.json.pushId as string);
    expect(target.state).toBe("applied");
    const [zone] = await query<{ volume_ceiling: number }>("select volume_ceiling from zones where id = $1", [zoneId]);
    expect(zone.volume_ceiling).toBe(60);
    expect((await drift(people.integrator, zoneId)).json.state).toBe("in_sync");
    void rev2;
  });
});

describe("cancel, retry and the summary e-mail", () => {
  it("cancel-pending cancels what was not sent; the rest finishes", async () => {
    h.store.setFaults({ latencyMs: 250 });
    await h.startWorker({ concurrency: 1 });
    const pushId = await startPushOk(people.integrator, { kind: "home", homeId: await homeIdOf(LINDQVIST) });
    await sleep(100);
    const res = await callRoute(cancelRoute, { method: "POST", path: `/api/pushes/${pushId}/cancel`, params: { pushId }, cookie: await signInAs(people.integrator) });
    expect(res.status).toBe(200);
    expect(res.json.cancelled).toBeGreaterThanOrEqual(2);
    const targets = await waitForPush(h, pushId);
    expect(targets.filter((t) => t.state === "cancelled")).toHaveLength(res.json.cancelled as number);
    expect(targets.filter((t) => t.state === "applied").length + (res.json.cancelled as number)).toBe(4);
    const [push] = await query<{ status: string }>("select status from pushes where id = $1", [pushId]);
    expect(push.status).toBe("cancelled");
    const again = await callRoute(cancelRoute, { method: "POST", path: `/api/pushes/${pushId}/cancel`, params: { pushId }, cookie: await signInAs(people.integrator) });
    expect(again.status).toBe(409);
    const retry = await callRoute(retryRoute, { method: "POST", path: `/api/pushes/${pushId}/retry-failed`, params: { pushId }, cookie: await signInAs(people.integrator) });
    expect(retry.status).toBe(409);
  });

  it("e-mails whoever started a push when anything failed, once", async () => {
    const kitchen = await zoneIdOf(LINDQVIST, "Kitchen");
    h.store.setFaults({ rejectApply: { error: "amplifier in protection mode" } }, await fleetIdOfZone(kitchen));
    await h.startWorker();
    const pushId = await startPushOk(people.integrator, { kind: "home", homeId: await homeIdOf(LINDQVIST) });
    await waitForPush(h, pushId);
    const mail = await h.sink.waitForMessage((m) => m.to.includes(people.integrator) && (m.text ?? "").includes(pushId), 8000);
    expect(mail.subject).toBe(`Push “${LINDQVIST}”: 1 of 4 failed`);
    expect(mail.text).toMatch(/Kitchen \(Lindqvist residence\): The device refused the configuration: amplifier in protection mode/);
    expect(mail.text).toContain(`/pushes/${pushId}`);
    await sleep(500);
    expect(h.sink.messages().filter((m) => (m.text ?? "").includes(pushId))).toHaveLength(1);
  });
});

describe("device care", () => {
  it("schedules a firmware update in a maintenance window; the device installs it", async () => {
    await h.startWorker();
    const deviceId = await deviceIdOfZone(await zoneIdOf(LINDQVIST, "Primary suite"));
    const detail = await callRoute(deviceRoute, { path: `/api/devices/${deviceId}`, params: { deviceId }, cookie: await signInAs(people.support) });
    expect(detail.status).toBe(200);
    expect(detail.json.firmwareOffer).toEqual({ current: "3.3.9", available: "3.4.2", source: "fleet", note: null });
    expect(detail.json.model).toMatchObject({ id: "amp-2x60", presetSlots: 12, eqBands: 6 });

    const windowStart = new Date().toISOString();
    const windowEnd = new Date(Date.now() + 3600_000).toISOString();
    const byInstaller = await callRoute(firmwareRoute, {
      method: "POST",
      path: `/api/devices/${deviceId}/firmware`,
      params: { deviceId },
      body: { version: "3.4.2", windowStart, windowEnd },
      cookie: await signInAs(people.installer),
    });
    expect(byInstaller.status).toBe(403);
    const res = await callRoute(firmwareRoute, {
      method: "POST",
      path: `/api/devices/${deviceId}/firmware`,
      params: { deviceId },
      body: { version: "3.4.2", windowStart, windowEnd },
      cookie: await signInAs(people.support),
    });
    expect(res.status).toBe(201);
    const deadline = Date.now() + 8000;
    let state = "";
    while (Date.now() < deadline) {
      [{ state }] = await query<{ state: string }>("select state from firmware_updates where device_id = $1", [deviceId]);
      if (state === "applied" || state === "failed") break;
      await sleep(50);
    }
    expect(state).toBe("applied");
    const [device] = await query<{ firmware_version: string }>("select firmware_version from devices where id = $1", [deviceId]);
    expect(device.firmware_version).toBe("3.4.2");
    const kinds = (await query<{ kind: string }>("select kind from audit_events order by id")).map((a) => a.kind);
    expect(kinds).toEqual(expect.arrayContaining(["device.firmware-scheduled", "device.firmware-installed"]));

    // The household sees the window in plain words on its own home, and no other household does.
    const { loadActor } = await import("@/db/queries/actors");
    const { listMaintenanceWindows } = await import("@/db/queries/devices");
    const actorOf = async (email: string) => {
      const [u] = await query<{ id: string }>("select id from \"user\" where email = $1", [email]);
      return (await loadActor({ userId: u.id, activeOrganizationId: null }))!;
    };
    const [home] = await query<{ id: string }>("select id from homes where name = $1", [LINDQVIST]);
    const windows = await listMaintenanceWindows({ actor: await actorOf(people.homeowner), homeId: home.id });
    expect(windows).toEqual([expect.objectContaining({ zoneName: "Primary suite", targetVersion: "3.4.2" })]);
    await expect(listMaintenanceWindows({ actor: await actorOf(people.otherHomeowner), homeId: home.id })).rejects.toMatchObject({ code: "home:not-found" });
  });

  it("refuses a window that ends before it starts, and bulk-schedules only the devices that have something to install", async () => {
    const suite = await deviceIdOfZone(await zoneIdOf(LINDQVIST, "Primary suite"));
    const kitchen = await deviceIdOfZone(await zoneIdOf(LINDQVIST, "Kitchen"));
    const cookie = await signInAs(people.integrator);
    const badWindow = await callRoute(firmwareRoute, {
      method: "POST",
      path: `/api/devices/${suite}/firmware`,
      params: { deviceId: suite },
      body: { version: "3.4.2", windowStart: new Date(Date.now() + 7200_000).toISOString(), windowEnd: new Date(Date.now() + 3600_000).toISOString() },
      cookie,
    });
    expect(badWindow.status).toBe(400);
    expect(badWindow.json.error!.fieldErrors!.windowEnd[0]).toMatch(/end after it starts/);
    const bulk = await callRoute(bulkFirmwareRoute, {
      method: "POST",
      path: "/api/devices/firmware",
      body: { deviceIds: [suite, kitchen], windowStart: new Date().toISOString(), windowEnd: new Date(Date.now() + 3600_000).toISOString() },
      cookie,
    });
    expect(bulk.status).toBe(201);
    expect((bulk.json.scheduled as { deviceId: string }[]).map((s) => s.deviceId)).toEqual([suite]);
    expect(bulk.json.refused).toEqual([expect.objectContaining({ deviceId: kitchen, reason: expect.stringMatching(/newest firmware \(3\.4\.2\)/) })]);
  });

  it("fetches a device's log bundle through the fleet as a download (support yes, installer no)", async () => {
    const deviceId = await deviceIdOfZone(await zoneIdOf(LINDQVIST, "Kitchen"));
    const cookie = await signInAs(people.support);
    const request = new Request(`http://localhost:3000/api/devices/${deviceId}/logs`, { headers: { cookie } });
    const response = await logsRoute(request, { params: Promise.resolve({ deviceId }) });
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toMatch(/^text\/plain/);
    expect(response.headers.get("content-disposition")).toMatch(/^attachment; filename="FW2-20877-logs-/);
    expect(await response.text()).toContain("serial FW2-20877");
    const installer = await callRoute(logsRoute, { path: `/api/devices/${deviceId}/logs`, params: { deviceId }, cookie: await signInAs(people.installer) });
    expect(installer.status).toBe(403);
    const [audit] = await query<{ summary: string }>("select summary from audit_events where kind = 'device.logs-fetched'");
    expect(audit.summary).toBe("Fetched the log bundle of device FW2-20877");
  });
});
