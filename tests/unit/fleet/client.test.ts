import { setupServer } from "msw/node";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { createFleetClient, FleetError, type FleetClientOptions } from "@/lib/fleet/client";
import { demoFleetDevices } from "@/mocks/fleet/demo-devices";
import { createFleetHandlers } from "@/mocks/fleet/handlers";
import { createFleetStore } from "@/mocks/fleet/store";
import { createWebhookReceiver } from "./webhook-receiver";
import { zoneConfig } from "./zone-config-fixture";

const baseUrl = "https://fleet.test";
const apiKey = "test-api-key";
const secret = "test-webhook-secret";
// A whole second, so an HTTP-date Retry-After (second precision) converts back exactly.
const clock = { now: 1_750_000_000_000 };
const now = () => clock.now;

const receiver = createWebhookReceiver(secret, now);
const store = createFleetStore({ deliver: receiver.deliver, webhookRetryDelayMs: 5 });
const server = setupServer(
  ...createFleetHandlers({ store, webhookUrl: "https://app.test/api/fleet/webhook", webhookSecret: secret, apiKey, applyDelayMs: 10, now }),
);

let waits: number[] = [];
function client(options: Partial<FleetClientOptions> = {}) {
  return createFleetClient({
    baseUrl,
    apiKey,
    timeoutMs: 2000,
    maxRetries: 3,
    sleep: async (ms) => {
      waits.push(ms);
    },
    random: () => 0.5,
    now,
    ...options,
  });
}

async function catchFleetError(promise: Promise<unknown>): Promise<FleetError> {
  const error = await promise.then(
    () => {
      throw new Error("expected a FleetError");
    },
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(FleetError);
  return error as FleetError;
}

const setFaults = (body: object) =>
  fetch(`${baseUrl}/__fleet/faults`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });

beforeAll(() => server.listen({ onUnhandledRequest: "error" }));
beforeEach(() => {
  store.reset();
  receiver.reset();
  waits = [];
});
afterEach(() => store.idle());
afterAll(() => {
  store.dispose();
  server.close();
});

describe("fleet client against the fake", () => {
  it("lists, reads and pushes (happy path)", async () => {
    const fleet = client();
    const page = await fleet.listDevices({ limit: 5 });
    expect(page.devices.map((d) => d.deviceId)).toEqual(demoFleetDevices.slice(0, 5).map((d) => d.fleetDeviceId));
    expect(page.nextCursor).not.toBeNull();

    const all = await fleet.listAllDevices({ pageSize: 7 });
    expect(all.map((d) => d.deviceId)).toEqual(demoFleetDevices.map((d) => d.fleetDeviceId));

    const before = await fleet.getDevice("fd-aalto-gym");
    expect(before.device).toMatchObject({ modelProfileId: "amp-2x60", serial: "FW2-21102", online: true });
    expect(before.desired).toMatchObject({ version: 0, config: null });
    expect(before.reported).toEqual({ version: 0, config: null, reportedAt: null, status: null, error: null });

    const config = zoneConfig({ name: "Gym" });
    const accepted = await fleet.putDesired(
      "fd-aalto-gym",
      { expectedVersion: 0, config, reference: "push-target-1" },
      { idempotencyKey: "rev-1:fd-aalto-gym" },
    );
    expect(accepted).toEqual({ version: 1, accepted: true, duplicate: false });
    const after = await fleet.getDevice("fd-aalto-gym");
    expect(after.desired).toMatchObject({ version: 1, config });
    expect(waits).toEqual([]);

    const logs = await fleet.getLogs("fd-aalto-gym");
    expect(logs).toContain("serial FW2-21102");
    expect(logs).toContain("desired v1 received (push-target-1)");
  });

  it("waits out Retry-After on 429 (seconds and HTTP-date) and then succeeds", async () => {
    await setFaults({ rateLimit: { count: 2, retryAfterSeconds: 3 } });
    const device = await client().getDevice("fd-spare-01");
    expect(device.device.deviceId).toBe("fd-spare-01");
    expect(waits).toEqual([3000, 3000]);

    waits = [];
    await setFaults({ deviceId: "fd-spare-01", rateLimit: { count: 1, retryAfterSeconds: 7, retryAfterFormat: "http-date" } });
    await client().getFirmware("fd-spare-01");
    expect(waits).toEqual([7000]);
  });

  it("gives up at once when Retry-After is longer than it will wait, telling the caller how long", async () => {
    await setFaults({ rateLimit: { count: 5, retryAfterSeconds: 120 } });
    const error = await catchFleetError(client({ maxRetryAfterMs: 30_000 }).getDevice("fd-spare-01"));
    expect(error).toMatchObject({ code: "fleet:rate-limited", status: 429, retryAfterMs: 120_000, attempts: 1, retryable: true });
    expect(waits).toEqual([]);
  });

  it("retries 5xx with exponential backoff and full jitter, then succeeds", async () => {
    await setFaults({ serverErrors: { count: 3, status: 502 } });
    const state = await client({ baseDelayMs: 200 }).getDevice("fd-spare-02");
    expect(state.device.deviceId).toBe("fd-spare-02");
    // random() = 0.5 → half of 200 × 2^n.
    expect(waits).toEqual([100, 200, 400]);
  });

  it("caps the backoff at maxDelayMs", async () => {
    await setFaults({ serverErrors: { count: 4 } });
    await client({ baseDelayMs: 1000, maxDelayMs: 2500, maxRetries: 4 }).getDevice("fd-spare-02");
    expect(waits).toEqual([500, 1000, 1250, 1250]);
  });

  it("reports fleet:unavailable when retries are exhausted", async () => {
    await setFaults({ serverErrors: { count: 10, status: 503 } });
    const error = await catchFleetError(client({ maxRetries: 2 }).getDevice("fd-spare-02"));
    expect(error).toMatchObject({ code: "fleet:unavailable", status: 503, attempts: 3, retryable: true });
    expect(waits).toHaveLength(2);
  });

  it("reports fleet:unavailable when the fleet cannot be reached", async () => {
    const refusing: typeof fetch = async () => {
      throw new TypeError("fetch failed");
    };
    const error = await catchFleetError(client({ fetch: refusing, maxRetries: 1 }).getDevice("fd-spare-02"));
    expect(error).toMatchObject({ code: "fleet:unavailable", status: null, attempts: 2 });
  });

  it("times out a call that never answers (fleet:timeout), and retries it", async () => {
    await setFaults({ deviceId: "fd-spare-03", hang: { ms: 10_000, calls: 1 } });
    const started = Date.now();
    const error = await catchFleetError(client({ timeoutMs: 150, maxRetries: 0 }).getDevice("fd-spare-03"));
    expect(error).toMatchObject({ code: "fleet:timeout", status: null, attempts: 1, retryable: true });
    expect(Date.now() - started).toBeLessThan(5000);

    await setFaults({ deviceId: "fd-spare-03", hang: { ms: 10_000, calls: 1 } });
    const state = await client({ timeoutMs: 150, maxRetries: 1 }).getDevice("fd-spare-03");
    expect(state.device.deviceId).toBe("fd-spare-03");
    expect(waits).toHaveLength(1);
  });

  it("does not retry 4xx other than 429", async () => {
    const notFound = await catchFleetError(client().getDevice("fd-does-not-exist"));
    expect(notFound).toMatchObject({ code: "fleet:not-found", status: 404, attempts: 1, retryable: false });

    const fleet = client();
    await fleet.putDesired("fd-spare-01", { expectedVersion: 0, config: zoneConfig(), reference: "a" }, { idempotencyKey: "k-a" });
    const conflict = await catchFleetError(
      fleet.putDesired("fd-spare-01", { expectedVersion: 0, config: zoneConfig({ name: "Other" }), reference: "b" }, { idempotencyKey: "k-b" }),
    );
    expect(conflict).toMatchObject({ code: "fleet:conflict", status: 409, currentVersion: 1, attempts: 1 });

    const reused = await catchFleetError(
      fleet.putDesired("fd-spare-01", { expectedVersion: 1, config: zoneConfig({ name: "Changed" }), reference: "a" }, { idempotencyKey: "k-a" }),
    );
    expect(reused).toMatchObject({ code: "fleet:bad-request", status: 400 });
    expect(reused.message).toContain("different request body");
    expect(waits).toEqual([]);
  });

  it("reports fleet:unauthorized for a wrong key, without retrying", async () => {
    const error = await catchFleetError(client({ apiKey: "not-the-key" }).listDevices());
    expect(error).toMatchObject({ code: "fleet:unauthorized", status: 401, attempts: 1, retryable: false });
    expect(waits).toEqual([]);
  });

  it("reports fleet:bad-response for a body that breaks the contract", async () => {
    await setFaults({ deviceId: "fd-spare-01", malformed: { count: 1, kind: "wrong-shape" } });
    const wrongShape = await catchFleetError(client().getDevice("fd-spare-01"));
    expect(wrongShape.code).toBe("fleet:bad-response");
    expect(wrongShape.message).toMatch(/unexpected body: device: /);

    await setFaults({ deviceId: "fd-spare-01", malformed: { count: 1, kind: "truncated" } });
    const truncated = await catchFleetError(client().getDevice("fd-spare-01"));
    expect(truncated.code).toBe("fleet:bad-response");
    expect(truncated.message).toContain("not JSON");
    expect(waits).toEqual([]);
  });

  it("applies a PUT once however often the same Idempotency-Key is sent", async () => {
    const fleet = client();
    const body = { expectedVersion: 0, config: zoneConfig(), reference: "push-7" };
    const key = "rev-42:fd-nakagawa-den";
    const first = await fleet.putDesired("fd-nakagawa-den", body, { idempotencyKey: key });
    const second = await fleet.putDesired("fd-nakagawa-den", body, { idempotencyKey: key });
    // A retry after re-reading the version (now 1) still gets the first answer back.
    const third = await fleet.putDesired("fd-nakagawa-den", { ...body, expectedVersion: 1 }, { idempotencyKey: key });
    expect(first).toEqual({ version: 1, accepted: true, duplicate: false });
    expect(second).toEqual({ version: 1, accepted: true, duplicate: true });
    expect(third).toEqual({ version: 1, accepted: true, duplicate: true });

    await store.idle();
    expect(store.acceptCount("fd-nakagawa-den", key)).toBe(1);
    expect(store.applyCount("fd-nakagawa-den", key)).toBe(1);
    expect(receiver.received.filter((r) => r.event.kind === "reported")).toHaveLength(1);
  });

  it("retries a PUT whose answer was lost without applying it twice", async () => {
    // The fleet stores the write, then the answer never comes back: the classic double-apply trap.
    await setFaults({ deviceId: "fd-brightwater-bedroom", hang: { ms: 10_000, calls: 1, afterProcessing: true } });
    const key = "rev-9:fd-brightwater-bedroom";
    const answer = await client({ timeoutMs: 200, maxRetries: 2 }).putDesired(
      "fd-brightwater-bedroom",
      { expectedVersion: 0, config: zoneConfig(), reference: "push-9" },
      { idempotencyKey: key },
    );
    expect(answer).toEqual({ version: 1, accepted: true, duplicate: true });
    expect(waits).toHaveLength(1);
    await store.idle();
    expect(store.acceptCount("fd-brightwater-bedroom", key)).toBe(1);
    expect(store.applyCount("fd-brightwater-bedroom", key)).toBe(1);
  });

  it("reports fleet:unsupported with the reasons when the model cannot take the config", async () => {
    // amp-outdoor-2x50: 6 preset slots, 5 EQ bands, inputs analog/network_stream/bluetooth, no subwoofer out.
    const config = zoneConfig(
      {
        zoneCurve: {
          id: null,
          name: "Too many bands",
          bands: Array.from({ length: 7 }, (_, i) => ({ type: "peaking" as const, frequencyHz: 100 * (i + 1), gainDb: 1, q: 1, enabled: true })),
        },
        outputLayout: {
          crossover: { type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 },
          outputs: [
            {
              id: "sub",
              role: "subwoofer",
              label: "Sub",
              distance: { value: 3, unit: "m" },
              latencyMs: 0,
              trimDb: 0,
              polarityInverted: false,
            },
          ],
        },
      },
      8,
    );
    const error = await catchFleetError(
      client().putDesired("fd-marchetti-dock", { expectedVersion: 0, config, reference: "x" }, { idempotencyKey: "k-unsupported" }),
    );
    expect(error).toMatchObject({ code: "fleet:unsupported", status: 422, attempts: 1, retryable: false });
    expect(error.reasons).toEqual([
      "8 stream presets, but the model has 6 preset slots",
      "zone curve has 7 EQ bands, but the model has 5",
      "the model has no optical input",
      "1 subwoofer outputs, but the model has 0",
    ]);
    expect((await client().getDevice("fd-marchetti-dock")).desired.version).toBe(0);
  });

  it("stops retrying when the caller aborts", async () => {
    await setFaults({ serverErrors: { count: 10 } });
    const controller = new AbortController();
    const fleet = client({
      sleep: async () => {
        controller.abort(new Error("shutting down"));
      },
    });
    await expect(fleet.getDevice("fd-spare-01", { signal: controller.signal })).rejects.toThrow("shutting down");
  });
});
