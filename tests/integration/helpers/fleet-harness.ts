import os from "node:os";
import path from "node:path";
import { mkdtemp } from "node:fs/promises";
import { setupServer } from "msw/node";
import { expect } from "vitest";
import { POST as webhookRoute } from "@/app/api/fleet/webhook/route";
import { POST as startPushRoute } from "@/app/api/pushes/route";
import { env } from "@/lib/env";
import { createFleetClient } from "@/lib/fleet/client";
import { getBoss, PGBOSS_SCHEMA } from "@/lib/fleet/queue";
import { startPushWorker, type PushWorker, type PushWorkerOptions } from "@/lib/fleet/worker";
import type { PushScope } from "@/lib/validation/pushes";
import { createFleetHandlers } from "@/mocks/fleet/handlers";
import { createFleetStore, type FleetStore } from "@/mocks/fleet/store";
import { startSmtpSink, type RunningSmtpSink } from "@/mocks/smtp-sink";
import { query, resetDatabase } from "./database";
import { callRoute, forgetSessions, signInAs } from "./http";

// The push machinery in one process, for real: the fleet fake's msw handlers on
// a fake base URL (setupServer), its webhooks delivered straight into our webhook
// route handler, a real worker on the real queue in the test database, and an
// SMTP sink for the summary e-mails.

export const FLEET_URL = "http://fleet.test";
export const WEBHOOK_URL = "http://app.test/api/fleet/webhook";
export const APPLY_DELAY_MS = 40;

export interface Harness {
  store: FleetStore;
  sink: RunningSmtpSink;
  /** Deliveries our webhook route refused (status ≥ 400), as "status body". */
  refusedWebhooks: string[];
  /** While true, our app "is down" for webhooks: every delivery gets a 503 (the fake retries, then gives up). */
  webhookOutage: { on: boolean; dropped: number };
  startWorker(overrides?: Partial<PushWorkerOptions>): Promise<PushWorker>;
  /** Stops every worker this harness started (each test starts its own). */
  stopWorkers(): Promise<void>;
  close(): Promise<void>;
}

export async function createHarness(): Promise<Harness> {
  const refusedWebhooks: string[] = [];
  const webhookOutage = { on: false, dropped: 0 };
  const store = createFleetStore({
    applyDelayMs: APPLY_DELAY_MS,
    webhookRetryDelayMs: 20,
    outOfOrderHoldMs: 1500,
    deliver: async (url, init) => {
      if (webhookOutage.on) {
        webhookOutage.dropped += 1;
        return new Response("down for maintenance", { status: 503 });
      }
      const response = await webhookRoute(new Request(url, init));
      if (response.status >= 400) refusedWebhooks.push(`${response.status} ${await response.clone().text()}`);
      return response;
    },
  });
  const server = setupServer(
    ...createFleetHandlers({
      store,
      webhookUrl: WEBHOOK_URL,
      webhookSecret: env().FLEET_WEBHOOK_SECRET,
      apiKey: env().FLEET_API_KEY,
      applyDelayMs: APPLY_DELAY_MS,
    }),
  );
  server.listen({ onUnhandledRequest: "error" });
  const sink = await startSmtpSink({ port: 0, httpPort: 0, dir: await mkdtemp(path.join(os.tmpdir(), "zw-mail-")), loadExisting: false });
  process.env.SMTP_HOST = "127.0.0.1";
  process.env.SMTP_PORT = String(sink.smtpPort);

  const workers: PushWorker[] = [];
  return {
    store,
    sink,
    refusedWebhooks,
    webhookOutage,
    async startWorker(overrides = {}) {
      const worker = await startPushWorker({
        fleet: createFleetClient({
          baseUrl: FLEET_URL,
          apiKey: env().FLEET_API_KEY,
          timeoutMs: 400,
          maxRetries: 1,
          maxRetryAfterMs: 300,
          baseDelayMs: 20,
          maxDelayMs: 100,
        }),
        concurrency: 8,
        pollIntervalMs: 40,
        leaseMs: 1500,
        reportTimeoutMs: 4000,
        reportCheckIntervalMs: 1500,
        firmwareGraceMs: 500,
        sweepIntervalMs: 300,
        retry: { maxAttempts: 6, baseDelayMs: 60, maxDelayMs: 400 },
        log: () => {},
        ...overrides,
      });
      workers.push(worker);
      return worker;
    },
    async stopWorkers() {
      for (const w of workers.splice(0)) await w.stop({ abort: true }).catch(() => undefined);
    },
    async close() {
      for (const w of workers.splice(0)) await w.stop({ abort: true }).catch(() => undefined);
      store.dispose();
      server.close();
      await sink.close();
    },
  };
}

/** A fresh demo database, fleet and queue for one test. */
export async function freshState(h: Harness) {
  h.store.reset();
  h.refusedWebhooks.length = 0;
  h.webhookOutage.on = false;
  h.webhookOutage.dropped = 0;
  h.sink.clear();
  await getBoss();
  await query(`delete from ${PGBOSS_SCHEMA}.job`);
  await resetDatabase();
  forgetSessions();
}

export async function zoneIdOf(homeName: string, zoneName: string): Promise<string> {
  const [row] = await query<{ id: string }>(
    "select z.id from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2 and z.deleted_at is null",
    [homeName, zoneName],
  );
  if (!row) throw new Error(`no zone ${zoneName} in ${homeName}`);
  return row.id;
}

export async function homeIdOf(name: string): Promise<string> {
  const [row] = await query<{ id: string }>("select id from homes where name = $1", [name]);
  return row.id;
}

export async function fleetIdOfZone(zoneId: string): Promise<string> {
  const [row] = await query<{ fleet_device_id: string }>("select d.fleet_device_id from zones z join devices d on d.id = z.device_id where z.id = $1", [zoneId]);
  return row.fleet_device_id;
}

export async function startPushAs(email: string, scope: PushScope, extra: Record<string, unknown> = {}) {
  const cookie = await signInAs(email);
  const res = await callRoute(startPushRoute, { method: "POST", path: "/api/pushes", body: { scope, ...extra }, cookie });
  return res;
}

export async function startPushOk(email: string, scope: PushScope): Promise<string> {
  const res = await startPushAs(email, scope);
  expect(res.status, JSON.stringify(res.json)).toBe(201);
  return res.json.pushId as string;
}

export interface TargetRow {
  id: string;
  state: string;
  attempts: number;
  last_error: string | null;
  idempotency_key: string;
  desired_version: number | null;
  fleet_device_id: string;
  device_id: string;
  zone_id: string;
}

export async function targetsOf(pushId: string): Promise<TargetRow[]> {
  return query<TargetRow>(
    `select t.id, t.state, t.attempts, t.last_error, t.idempotency_key, t.desired_version, d.fleet_device_id, d.id as device_id, t.zone_id
     from push_targets t join devices d on d.id = t.device_id where t.push_id = $1 order by d.fleet_device_id`,
    [pushId],
  );
}

/** Waits until the push is no longer running (every target final), then until the fake is quiet. */
export async function waitForPush(h: Harness, pushId: string, timeoutMs = 20_000): Promise<TargetRow[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const [push] = await query<{ status: string }>("select status from pushes where id = $1", [pushId]);
    if (push.status !== "running") break;
    if (Date.now() > deadline) {
      const rows = await targetsOf(pushId);
      throw new Error(`push ${pushId} still running after ${timeoutMs} ms: ${rows.map((r) => `${r.fleet_device_id}=${r.state} (${r.last_error ?? ""})`).join("; ")}`);
    }
    await new Promise((r) => setTimeout(r, 50));
  }
  await h.store.idle();
  return targetsOf(pushId);
}

/**
 * The promises every push keeps: every target ended (applied, failed with a
 * reason, superseded or cancelled), the fleet stored each key once and the
 * device applied it at most once, and what we store about each device is what
 * the device last reported (no report lost, none applied out of order).
 */
export async function expectConverged(h: Harness, targets: TargetRow[]) {
  for (const t of targets) {
    expect(["applied", "failed", "superseded", "cancelled"], `${t.fleet_device_id} ended ${t.state}`).toContain(t.state);
    if (t.state === "failed") expect(t.last_error, `${t.fleet_device_id} failed without a reason`).toBeTruthy();
    expect(h.store.acceptCount(t.fleet_device_id, t.idempotency_key), `${t.idempotency_key} stored more than once`).toBeLessThanOrEqual(1);
    expect(h.store.applyCount(t.fleet_device_id, t.idempotency_key), `${t.idempotency_key} applied more than once`).toBeLessThanOrEqual(1);
  }
  for (const fleetId of new Set(targets.map((t) => t.fleet_device_id))) {
    const fake = h.store.getDevice(fleetId)!;
    const [ours] = await query<{ reported_version: number; reported_config: unknown; desired_version: number }>(
      "select reported_version, reported_config, desired_version from devices where fleet_device_id = $1",
      [fleetId],
    );
    expect(ours.reported_version, `${fleetId}: stored reported version`).toBe(fake.reported.version);
    expect(ours.reported_config, `${fleetId}: stored reported config`).toEqual(fake.reported.config);
    expect(ours.desired_version, `${fleetId}: stored desired version`).toBe(fake.desired.version);
  }
  expect(h.refusedWebhooks).toEqual([]);
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A real zone edit (through changeZone: new revision, audited) by a demo person. */
export async function editZoneCeiling(email: string, zoneId: string, volumeCeiling: number) {
  const { loadActor } = await import("@/db/queries/actors");
  const { changeZone } = await import("@/db/queries/zone-writes");
  const { zones } = await import("@/db/schema");
  const { eq } = await import("drizzle-orm");
  const [u] = await query<{ id: string }>("select id from public.user where email = $1", [email]);
  const actor = (await loadActor({ userId: u.id, activeOrganizationId: null }))!;
  return changeZone({
    actor,
    zoneId,
    expectedVersion: null,
    action: "zone:edit",
    kind: "zone.updated",
    summary: "Test edit",
    apply: async (tx, zone) => {
      await tx.update(zones).set({ volumeCeiling, turnOnVolume: Math.min(zone.turnOnVolume, volumeCeiling) }).where(eq(zones.id, zoneId));
      return [{ field: "volumeCeiling", before: zone.volumeCeiling, after: volumeCeiling }];
    },
  });
}

/** Adds stream presets to a zone through changeZone (a new revision), e.g. more than its device has slots for. */
export async function addPresets(email: string, zoneId: string, count: number) {
  const { loadActor } = await import("@/db/queries/actors");
  const { changeZone } = await import("@/db/queries/zone-writes");
  const { streamPresets } = await import("@/db/schema");
  const [u] = await query<{ id: string }>("select id from public.user where email = $1", [email]);
  const actor = (await loadActor({ userId: u.id, activeOrganizationId: null }))!;
  return changeZone({
    actor,
    zoneId,
    expectedVersion: null,
    action: "zone:edit",
    kind: "zone.updated",
    summary: "Test presets",
    apply: async (tx) => {
      await tx.insert(streamPresets).values(
        Array.from({ length: count }, (_, i) => ({
          zoneId,
          position: 100 + i,
          name: `Test station ${i + 1}`,
          streamUrl: `https://streams.example.net/test-${i + 1}.mp3`,
          genre: "Test",
        })),
      );
      return [{ field: "presets", before: null, after: count }];
    },
  });
}
