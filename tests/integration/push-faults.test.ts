import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { query } from "./helpers/database";
import {
  createHarness,
  editZoneCeiling,
  expectConverged,
  fleetIdOfZone,
  freshState,
  homeIdOf,
  sleep,
  startPushOk,
  targetsOf,
  waitForPush,
  zoneIdOf,
  type Harness,
} from "./helpers/fleet-harness";
import { people } from "./helpers/http";

// Every misbehaviour of the fleet the fake can play (msw fault injection), each
// ending with every target applied or failed with a reason, nothing applied
// twice and no report lost; and a worker stopped mid-push whose successor
// finishes the push. The fault catalogue is mocks/fleet/store.ts (FaultSpec).

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

async function pushLindqvist() {
  return startPushOk(people.integrator, { kind: "home", homeId: await homeIdOf(LINDQVIST) });
}

describe("push without faults", () => {
  it("pushes a home: every target applied once, reports stored, zones in sync", async () => {
    const worker = await h.startWorker();
    const pushId = await pushLindqvist();
    const targets = await waitForPush(h, pushId);
    expect(targets).toHaveLength(4);
    expect(targets.map((t) => t.state)).toEqual(["applied", "applied", "applied", "applied"]);
    expect(targets.every((t) => t.attempts === 1)).toBe(true);
    await expectConverged(h, targets);
    for (const t of targets) expect(h.store.applyCount(t.fleet_device_id, t.idempotency_key)).toBe(1);
    const [push] = await query<{ status: string; finished_at: Date | null }>("select status, finished_at from pushes where id = $1", [pushId]);
    expect(push.status).toBe("finished");
    expect(push.finished_at).not.toBeNull();
    const audit = await query<{ kind: string }>("select kind from audit_events where kind = 'push.started'");
    expect(audit).toHaveLength(1);
    // Nothing failed, so no summary e-mail.
    await sleep(200);
    expect(h.sink.messages()).toHaveLength(0);
    expect(worker.stats().sent).toBe(4);
  });
});

describe("fleet faults", () => {
  it("latency: slow answers within the timeout still apply", async () => {
    h.store.setFaults({ latencyMs: 250 });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    await expectConverged(h, targets);
  });

  it("timeout: a fleet that hangs is timed out and retried", async () => {
    // Enough hangs that the client's own quick retry hangs too and the worker has to come back.
    h.store.setFaults({ hang: { ms: 5000, calls: 8 } });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    expect(targets.some((t) => t.attempts > 1)).toBe(true);
    await expectConverged(h, targets);
  });

  it("lost answer: the write landed but its answer timed out; the retry gets the first answer back", async () => {
    h.store.setFaults({ hang: { ms: 5000, calls: 3, afterProcessing: true } });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    for (const t of targets) expect(h.store.acceptCount(t.fleet_device_id, t.idempotency_key)).toBe(1);
    await expectConverged(h, targets);
  });

  it("5xx: server errors are retried with backoff until they stop", async () => {
    h.store.setFaults({ serverErrors: { count: 9, status: 503 } });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    expect(targets.some((t) => t.attempts > 1)).toBe(true);
    await expectConverged(h, targets);
  });

  it("5xx that never stops: targets fail with the reason after the last attempt", async () => {
    h.store.setFaults({ serverErrors: { count: 10_000, status: 502 } });
    await h.startWorker({ retry: { maxAttempts: 3, baseDelayMs: 30, maxDelayMs: 60 } });
    const targets = await waitForPush(h, await pushLindqvist());
    for (const t of targets) {
      expect(t.state).toBe("failed");
      expect(t.attempts).toBe(3);
      expect(t.last_error).toMatch(/Gave up after 3 attempts.*502/);
    }
    h.store.clearFaults();
    await expectConverged(h, targets);
  });

  it("429 with Retry-After: the worker waits at least as long as asked", async () => {
    // 1 s is longer than the client waits inline (300 ms here), so the worker reschedules the job.
    h.store.setFaults({ rateLimit: { count: 4, retryAfterSeconds: 1 } });
    await h.startWorker();
    const started = Date.now();
    const pushId = await pushLindqvist();
    const targets = await waitForPush(h, pushId);
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    const limited = targets.filter((t) => t.attempts > 1);
    expect(limited.length).toBeGreaterThan(0);
    expect(Date.now() - started).toBeGreaterThanOrEqual(1000);
    await expectConverged(h, targets);
  });

  it("429 with an HTTP-date Retry-After is respected too", async () => {
    h.store.setFaults({ rateLimit: { count: 2, retryAfterSeconds: 1, retryAfterFormat: "http-date" } });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    await expectConverged(h, targets);
  });

  it("malformed answers break the contract and are retried (the key keeps it safe)", async () => {
    h.store.setFaults({ malformed: { count: 3, kind: "truncated" } });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    await expectConverged(h, targets);
  });

  it("offline then online: the device applies when it comes back", async () => {
    const zoneId = await zoneIdOf(LINDQVIST, "Patio");
    const fleetId = await fleetIdOfZone(zoneId);
    h.store.setOnline(fleetId, false);
    await h.startWorker();
    const pushId = await startPushOk(people.integrator, { kind: "zone", zoneId });
    const deadline = Date.now() + 3000;
    while ((await targetsOf(pushId))[0].state !== "awaiting_report" && Date.now() < deadline) await sleep(30);
    expect((await targetsOf(pushId))[0].state).toBe("awaiting_report");
    await sleep(400);
    h.store.setOnline(fleetId, true);
    const targets = await waitForPush(h, pushId);
    expect(targets[0].state).toBe("applied");
    await expectConverged(h, targets);
    const [device] = await query<{ online: boolean }>("select online from devices where fleet_device_id = $1", [fleetId]);
    expect(device.online).toBe(true);
  });

  it("offline for good: the target fails with the reason once the report is overdue (polled, not just timed)", async () => {
    const zoneId = await zoneIdOf(LINDQVIST, "Patio");
    const fleetId = await fleetIdOfZone(zoneId);
    h.store.setOnline(fleetId, false);
    await h.startWorker({ reportTimeoutMs: 800 });
    const targets = await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId }));
    expect(targets[0].state).toBe("failed");
    expect(targets[0].last_error).toMatch(/offline and did not report/);
    await expectConverged(h, targets);
  });

  it("duplicate reports: every webhook arrives twice and is handled once", async () => {
    h.store.setFaults({ duplicateReports: true });
    await h.startWorker();
    const targets = await waitForPush(h, await pushLindqvist());
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    await expectConverged(h, targets);
    const copies = h.store.deliveries().filter((d) => d.copy === 2 && d.outcome === "delivered");
    expect(copies.length).toBeGreaterThanOrEqual(4);
    const [{ n }] = await query<{ n: number }>("select count(*)::int as n from fleet_events");
    expect(n).toBe(new Set(h.store.deliveries().map((d) => d.eventId)).size);
  });

  it("out-of-order reports: a late report never overwrites a newer one; the overtaken target is superseded", async () => {
    h.store.setFaults({ outOfOrderReports: true });
    const zoneId = await zoneIdOf(LINDQVIST, "Kitchen");
    const fleetId = await fleetIdOfZone(zoneId);
    await h.startWorker();
    const first = await startPushOk(people.integrator, { kind: "zone", zoneId });
    // Wait until the device applied the first version (its report is held back by the fault)…
    while (h.store.snapshot().applies.filter((a) => a.deviceId === fleetId).length < 1) await sleep(20);
    // …then a second revision goes out and is reported first.
    await editZoneCeiling(people.integrator, zoneId, 66);
    const second = await startPushOk(people.integrator, { kind: "zone", zoneId });
    const secondTargets = await waitForPush(h, second);
    const firstTargets = await waitForPush(h, first);
    await sleep(1700); // the held report arrives late
    await h.store.idle();
    expect(secondTargets[0].state).toBe("applied");
    expect(firstTargets[0].state).toBe("superseded");
    const [device] = await query<{ reported_version: number; volume: number }>(
      "select reported_version, (reported_config->>'volumeCeiling')::int as volume from devices where fleet_device_id = $1",
      [fleetId],
    );
    expect(device).toEqual({ reported_version: 2, volume: 66 });
    await expectConverged(h, [...firstTargets, ...secondTargets]);
  });

  it("lost reports: every webhook is refused until the fake gives up; the worker finds the reports by asking the fleet", async () => {
    h.webhookOutage.on = true;
    await h.startWorker({ reportCheckIntervalMs: 600, reportTimeoutMs: 6000 });
    const targets = await waitForPush(h, await pushLindqvist());
    expect(h.webhookOutage.dropped).toBeGreaterThanOrEqual(4);
    expect(h.store.deliveries().filter((d) => d.outcome === "gave-up").length).toBeGreaterThanOrEqual(4);
    expect(targets.every((t) => t.state === "applied")).toBe(true);
    await expectConverged(h, targets);
  });

  it("partial apply: the device kept only some presets; the target fails with the device's reason", async () => {
    const zoneId = await zoneIdOf(LINDQVIST, "Family room");
    const fleetId = await fleetIdOfZone(zoneId);
    h.store.setFaults({ partialApply: { maxPresets: 1 } }, fleetId);
    await h.startWorker();
    const targets = await waitForPush(h, await startPushOk(people.integrator, { kind: "zone", zoneId }));
    expect(targets[0].state).toBe("failed");
    expect(targets[0].last_error).toMatch(/applied only part.*preset memory full/);
    await expectConverged(h, targets);
  });

  it("reject: the device refuses; after the fault clears, retry-failed sends a new version and applies it once", async () => {
    const zoneId = await zoneIdOf(LINDQVIST, "Kitchen");
    const fleetId = await fleetIdOfZone(zoneId);
    h.store.setFaults({ rejectApply: { error: "DSP busy, configuration not stored" } }, fleetId);
    await h.startWorker();
    const pushId = await startPushOk(people.integrator, { kind: "zone", zoneId });
    let targets = await waitForPush(h, pushId);
    expect(targets[0].state).toBe("failed");
    expect(targets[0].last_error).toMatch(/refused the configuration: DSP busy/);
    const firstKey = targets[0].idempotency_key;

    h.store.clearFaults(fleetId);
    const { POST: retryRoute } = await import("@/app/api/pushes/[pushId]/retry-failed/route");
    const { callRoute, signInAs } = await import("./helpers/http");
    const res = await callRoute(retryRoute, { method: "POST", path: `/api/pushes/${pushId}/retry-failed`, params: { pushId }, cookie: await signInAs(people.integrator) });
    expect(res.status).toBe(200);
    expect(res.json.retried).toBe(1);
    targets = await waitForPush(h, pushId);
    expect(targets[0].state).toBe("applied");
    expect(targets[0].idempotency_key).not.toBe(firstKey);
    expect(targets[0].idempotency_key.endsWith(":2")).toBe(true);
    await expectConverged(h, targets);
  });
});

describe("restart in the middle of a push", () => {
  it("a worker stopped mid-push (as a crash would) leaves work a new worker finishes, nothing applied twice", async () => {
    h.store.setFaults({ latencyMs: 300 });
    const first = await h.startWorker({ concurrency: 3, leaseMs: 1000 });
    const pushIds = [
      await pushLindqvist(),
      await startPushOk(people.integrator, { kind: "home", homeId: await homeIdOf("Marchetti lake house") }),
      await startPushOk(people.integrator, { kind: "home", homeId: await homeIdOf("Aalto townhouse") }),
    ];
    // Stop while sends are in flight.
    const deadline = Date.now() + 5000;
    for (;;) {
      const [{ sending }] = await query<{ sending: number }>("select count(*)::int as sending from push_targets where state = 'sending'");
      if (sending > 0 || Date.now() > deadline) break;
      await sleep(20);
    }
    await first.stop({ abort: true });
    const [{ unfinished }] = await query<{ unfinished: number }>("select count(*)::int as unfinished from push_targets where state in ('queued','sending')");
    expect(unfinished).toBeGreaterThan(0);

    const second = await h.startWorker({ concurrency: 3, leaseMs: 1000 });
    const all = [];
    for (const pushId of pushIds) all.push(...(await waitForPush(h, pushId, 30_000)));
    // The offline loft device in the Marchetti home cannot report: it fails with a reason; everything else applies.
    for (const t of all) {
      if (t.fleet_device_id === "fd-marchetti-loft") expect(t.state).toBe("failed");
      else expect(t.state, t.fleet_device_id).toBe("applied");
    }
    await expectConverged(h, all);
    expect(second.stats().sent).toBeGreaterThan(0);
  });
});
