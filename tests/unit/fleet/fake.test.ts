import { setupServer } from "msw/node";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { createFleetClient } from "@/lib/fleet/client";
import { verifyWebhook } from "@/lib/fleet/webhook-signature";
import { createFleetHandlers } from "@/mocks/fleet/handlers";
import { createFleetStore, type FleetStateDump } from "@/mocks/fleet/store";
import { createWebhookReceiver } from "./webhook-receiver";
import { zoneConfig } from "./zone-config-fixture";

const baseUrl = "http://fleet.local";
const apiKey = "fake-test-key";
const secret = "fake-test-secret";
const applyDelayMs = 60;

const receiver = createWebhookReceiver(secret);
const store = createFleetStore({ deliver: receiver.deliver, webhookRetryDelayMs: 5 });
const server = setupServer(
  ...createFleetHandlers({ store, webhookUrl: "http://app.local/api/fleet/webhook", webhookSecret: secret, apiKey, applyDelayMs }),
);
const fleet = createFleetClient({ baseUrl, apiKey, timeoutMs: 2000, maxRetries: 0 });

async function control(method: "POST" | "DELETE" | "GET", path: string, body?: object) {
  const response = await fetch(`${baseUrl}${path}`, {
    method,
    headers: body ? { "content-type": "application/json" } : undefined,
    body: body ? JSON.stringify(body) : undefined,
  });
  expect(response.ok, `${method} ${path} → ${response.status}`).toBe(true);
  return (await response.json()) as unknown;
}

const reports = () => receiver.received.filter((r) => r.event.kind === "reported").map((r) => r.event);

async function push(deviceId: string, expectedVersion: number, key: string, config = zoneConfig()) {
  return fleet.putDesired(deviceId, { expectedVersion, config, reference: `ref-${key}` }, { idempotencyKey: key });
}

beforeAll(() => server.listen({ onUnhandledRequest: "error" }));
beforeEach(() => {
  store.reset();
  receiver.reset();
});
afterAll(() => {
  store.dispose();
  server.close();
});

describe("fleet fake: device behaviour", () => {
  it("applies a desired config after the delay and reports it with a signed webhook", async () => {
    const config = zoneConfig({ name: "Kitchen", volumeCeiling: 64 });
    const pushedAt = Date.now();
    await push("fd-lindqvist-kitchen", 0, "rev-1:kitchen", config);

    const pending = await fleet.getDevice("fd-lindqvist-kitchen");
    expect(pending.desired.version).toBe(1);
    expect(pending.reported.version).toBe(0);
    expect(receiver.received).toHaveLength(0);

    await store.idle();
    expect(Date.now() - pushedAt).toBeGreaterThanOrEqual(applyDelayMs - 5);
    const applied = await fleet.getDevice("fd-lindqvist-kitchen");
    expect(applied.reported).toMatchObject({ version: 1, status: "applied", error: null, config });

    expect(receiver.refused).toEqual([]);
    expect(receiver.received).toHaveLength(1);
    const [hook] = receiver.received;
    expect(hook.event).toMatchObject({
      kind: "reported",
      origin: "apply",
      deviceId: "fd-lindqvist-kitchen",
      sequence: 1,
      desiredVersion: 1,
      reportedVersion: 1,
      status: "applied",
      config,
      error: null,
      firmwareVersion: "3.4.2",
      online: true,
    });
    // The signature covers timestamp and exact body: it verifies, and fails for a changed body or another secret.
    const input = { timestampHeader: hook.timestampHeader, signatureHeader: hook.signatureHeader, rawBody: hook.rawBody };
    expect(verifyWebhook({ secret, ...input })).toEqual({ ok: true });
    expect(verifyWebhook({ secret: "other", ...input })).toEqual({ ok: false, reason: "mismatch" });
    expect(verifyWebhook({ secret, ...input, rawBody: hook.rawBody.replace('"Kitchen"', '"Garage"') })).toEqual({
      ok: false,
      reason: "mismatch",
    });
    expect(store.applyCount("fd-lindqvist-kitchen", "rev-1:kitchen")).toBe(1);
  });

  it("sends the same report twice when asked (duplicate reports)", async () => {
    await control("POST", "/__fleet/faults", { deviceId: "fd-aalto-gym", duplicateReports: true });
    await push("fd-aalto-gym", 0, "dup-1");
    await store.idle();

    expect(reports()).toHaveLength(2);
    const [a, b] = receiver.received;
    expect(a.rawBody).toBe(b.rawBody);
    expect(a.event.eventId).toBe(b.event.eventId);
    const deliveries = store.deliveries().filter((d) => d.outcome === "delivered");
    expect(deliveries.map((d) => d.copy)).toEqual([1, 2]);
    // Two deliveries, one apply.
    expect(store.applyCount("fd-aalto-gym", "dup-1")).toBe(1);
  });

  it("delivers an older report after a newer one when asked (out-of-order reports)", async () => {
    await control("POST", "/__fleet/faults", { outOfOrderReports: true });
    await push("fd-aalto-living", 0, "ooo-1", zoneConfig({ volumeCeiling: 60 }));
    await store.idle();
    expect(reports()).toHaveLength(0); // v1's report is being held back

    await push("fd-aalto-living", 1, "ooo-2", zoneConfig({ volumeCeiling: 55 }));
    await store.idle();
    const arrived = reports();
    expect(arrived.map((e) => [e.reportedVersion, e.sequence, e.config?.volumeCeiling])).toEqual([
      [2, 2, 55],
      [1, 1, 60],
    ]);
    // The device itself is on v2: a receiver must keep the higher sequence.
    expect((await fleet.getDevice("fd-aalto-living")).reported.version).toBe(2);
  });

  it("keeps a push for an offline device and applies it when the device comes back", async () => {
    await control("POST", "/__fleet/devices/fd-aalto-terrace/online", { online: false });
    expect((await fleet.getDevice("fd-aalto-terrace")).device.online).toBe(false);

    const first = await push("fd-aalto-terrace", 0, "off-1", zoneConfig({ volumeCeiling: 50, sources: [] }));
    const second = await push("fd-aalto-terrace", 1, "off-2", zoneConfig({ volumeCeiling: 45, sources: [] }));
    expect([first.version, second.version]).toEqual([1, 2]);
    await store.idle();
    await new Promise((r) => setTimeout(r, applyDelayMs * 2));
    expect((await fleet.getDevice("fd-aalto-terrace")).reported.version).toBe(0);
    expect(reports()).toHaveLength(0);

    await control("POST", "/__fleet/devices/fd-aalto-terrace/online", { online: true });
    await store.idle();
    const state = await fleet.getDevice("fd-aalto-terrace");
    expect(state.device.online).toBe(true);
    expect(state.reported).toMatchObject({ version: 2, status: "applied" });
    expect(state.reported.config?.volumeCeiling).toBe(45);

    expect(receiver.received.map((r) => [r.event.kind, r.event.online])).toEqual([
      ["online", false],
      ["online", true],
      ["reported", true],
    ]);
    // Like a shadow-based device it jumps to the latest desired version; v1 is superseded, never applied.
    expect(store.applyCount("fd-aalto-terrace", "off-1")).toBe(0);
    expect(store.applyCount("fd-aalto-terrace", "off-2")).toBe(1);
    const dump = (await control("GET", "/__fleet/state")) as FleetStateDump;
    expect(dump.desiredVersions.filter((v) => v.deviceId === "fd-aalto-terrace").map((v) => v.outcome)).toEqual([
      "superseded",
      "applied",
    ]);
  });

  it("applies only part of a config when asked (partial apply)", async () => {
    await control("POST", "/__fleet/faults", { deviceId: "fd-brightwater-studio", partialApply: { maxPresets: 2 } });
    const config = zoneConfig({ sources: [] }, 5);
    await push("fd-brightwater-studio", 0, "part-1", config);
    await store.idle();

    const state = await fleet.getDevice("fd-brightwater-studio");
    expect(state.reported.status).toBe("partial");
    expect(state.reported.error).toBe("preset memory full: stored 2 of 5 presets");
    expect(state.reported.config?.presets.map((p) => p.key)).toEqual(["p1", "p2"]);
    expect(state.desired.config?.presets).toHaveLength(5);
    expect(reports()[0]).toMatchObject({ status: "partial", reportedVersion: 1, error: "preset memory full: stored 2 of 5 presets" });
  });

  it("reports a rejected apply and keeps the previous config", async () => {
    const good = zoneConfig({ volumeCeiling: 66 });
    await push("fd-spare-01", 0, "rej-0", good);
    await store.idle();
    await control("POST", "/__fleet/faults", { deviceId: "fd-spare-01", rejectApply: { error: "DSP checksum mismatch" } });
    await push("fd-spare-01", 1, "rej-1", zoneConfig({ volumeCeiling: 80 }));
    await store.idle();

    const state = await fleet.getDevice("fd-spare-01");
    expect(state.reported).toMatchObject({ version: 2, status: "rejected", error: "DSP checksum mismatch", config: good });
    expect(reports().map((e) => e.status)).toEqual(["applied", "rejected"]);
  });

  it("reports a change made at the device itself (tamper → drift)", async () => {
    const config = zoneConfig({ volumeCeiling: 60 });
    await push("fd-marchetti-great", 0, "t-1", config);
    await store.idle();

    await control("POST", "/__fleet/devices/fd-marchetti-great/tamper", { volumeCeiling: 92, guestControls: { locked: false, volume: true } });
    await store.idle();
    const state = await fleet.getDevice("fd-marchetti-great");
    expect(state.desired.config?.volumeCeiling).toBe(60);
    expect(state.reported.config?.volumeCeiling).toBe(92);
    expect(state.reported.version).toBe(1);

    const [applied, local] = reports();
    expect(applied).toMatchObject({ origin: "apply", sequence: 1 });
    expect(local).toMatchObject({ origin: "local", sequence: 2, reportedVersion: 1, desiredVersion: 1 });
    expect(local.config?.volumeCeiling).toBe(92);

    // Without a body the device still drifts (volume ceiling moved by 10).
    await control("POST", "/__fleet/devices/fd-marchetti-great/tamper");
    await store.idle();
    expect(reports()[2].config?.volumeCeiling).toBe(82);
  });

  it("retries a webhook our app answers with 5xx or refuses, then gives up on 4xx", async () => {
    receiver.failNext("503", "refuse");
    await push("fd-nakagawa-den", 0, "retry-1");
    await store.idle();
    expect(reports()).toHaveLength(1);
    expect(store.deliveries().map((d) => [d.attempt, d.outcome, d.status])).toEqual([
      [1, "retrying", 503],
      [2, "retrying", null],
      [3, "delivered", 204],
    ]);

    // A webhook signed with a secret our app does not know is refused (401) and not retried.
    store.configure({ webhookSecret: "rotated-away" });
    await push("fd-nakagawa-den", 1, "retry-2");
    await store.idle();
    expect(receiver.refused).toEqual(["mismatch"]);
    expect(store.deliveries().slice(3).map((d) => [d.attempt, d.outcome, d.status])).toEqual([[1, "gave-up", 401]]);
    store.configure({ webhookSecret: secret });
  });

  it("schedules a firmware update, installs it inside the window and reports it", async () => {
    expect(await fleet.getFirmware("fd-marchetti-dock")).toEqual({ current: "1.7.2", available: "1.8.0" });
    const window = { version: "1.8.0", windowStart: new Date().toISOString(), windowEnd: new Date(Date.now() + 3_600_000).toISOString() };
    const { updateId } = await fleet.scheduleFirmwareUpdate("fd-marchetti-dock", window, { idempotencyKey: "fw-1" });
    const again = await fleet.scheduleFirmwareUpdate("fd-marchetti-dock", window, { idempotencyKey: "fw-1" });
    expect(again.updateId).toBe(updateId);
    await store.idle();

    expect(await fleet.getFirmware("fd-marchetti-dock")).toEqual({ current: "1.8.0", available: null });
    const events = receiver.received.map((r) => r.event);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ kind: "firmware", status: "applied", updateId, firmwareVersion: "1.8.0" });

    await expect(
      fleet.scheduleFirmwareUpdate("fd-marchetti-dock", { ...window, version: "9.9.9" }, { idempotencyKey: "fw-2" }),
    ).rejects.toMatchObject({ code: "fleet:unsupported", reasons: ["firmware 9.9.9 is not offered for this device (available: none)"] });
  });

  it("reports a missed firmware window when the device stays offline past it", async () => {
    await control("POST", "/__fleet/devices/fd-lindqvist-suite/online", { online: false });
    const start = Date.now();
    await fleet.scheduleFirmwareUpdate(
      "fd-lindqvist-suite",
      { version: "3.4.2", windowStart: new Date(start).toISOString(), windowEnd: new Date(start + 150).toISOString() },
      { idempotencyKey: "fw-late" },
    );
    await store.idle();
    await new Promise((r) => setTimeout(r, 200));
    await control("POST", "/__fleet/devices/fd-lindqvist-suite/online", { online: true });
    await store.idle();
    const firmware = receiver.received.map((r) => r.event).find((e) => e.kind === "firmware");
    expect(firmware).toMatchObject({ status: "rejected", firmwareVersion: "3.3.9" });
    expect(firmware?.error).toContain("window");
  });
});

describe("fleet fake: control endpoints", () => {
  it("sets, reports and clears faults per device and globally", async () => {
    const set = (await control("POST", "/__fleet/faults", { deviceId: "fd-spare-02", serverErrors: { count: 2 }, latencyMs: 5 })) as {
      faults: FleetStateDump["faults"];
    };
    expect(set.faults.devices["fd-spare-02"]).toEqual({ serverErrors: { count: 2 }, latencyMs: 5 });
    await control("POST", "/__fleet/faults", { rateLimit: { count: 1 } });

    // Global 429 does not stop the device's own 5xx from striking first, and counts go down per call.
    await expect(fleet.getDevice("fd-spare-02")).rejects.toMatchObject({ code: "fleet:unavailable" });
    await expect(fleet.getDevice("fd-spare-02")).rejects.toMatchObject({ code: "fleet:unavailable" });
    await expect(fleet.getDevice("fd-spare-02")).rejects.toMatchObject({ code: "fleet:rate-limited" });
    await expect(fleet.getDevice("fd-spare-02")).resolves.toMatchObject({ device: { deviceId: "fd-spare-02" } });

    await control("POST", "/__fleet/faults", { serverErrors: { count: 5 } });
    await control("DELETE", "/__fleet/faults", { deviceId: "fd-spare-02" });
    expect(store.faults()).toEqual({ global: { serverErrors: { count: 5 } }, devices: {} });
    await control("DELETE", "/__fleet/faults");
    expect(store.faults()).toEqual({ global: {}, devices: {} });
  });

  it("rejects invalid fault specs, unknown devices and tampering before any apply", async () => {
    const bad = await fetch(`${baseUrl}/__fleet/faults`, { method: "POST", body: JSON.stringify({ serverErrors: { count: -1 } }) });
    expect(bad.status).toBe(400);
    const missing = await fetch(`${baseUrl}/__fleet/devices/fd-nope/online`, { method: "POST", body: JSON.stringify({ online: true }) });
    expect(missing.status).toBe(404);
    const nothing = await fetch(`${baseUrl}/__fleet/devices/fd-spare-03/tamper`, { method: "POST" });
    expect(nothing.status).toBe(409);
  });

  it("dumps the state and resets to the seed", async () => {
    await push("fd-spare-03", 0, "state-1", zoneConfig({ sources: [] }));
    await store.idle();
    const dump = (await control("GET", "/__fleet/state")) as FleetStateDump;
    expect(dump.applies).toEqual([expect.objectContaining({ deviceId: "fd-spare-03", idempotencyKey: "state-1", version: 1, status: "applied" })]);
    expect(dump.deliveries).toEqual([expect.objectContaining({ deviceId: "fd-spare-03", outcome: "delivered" })]);
    expect(dump.devices.find((d) => d.deviceId === "fd-spare-03")?.reported.version).toBe(1);

    await control("POST", "/__fleet/reset");
    const after = (await control("GET", "/__fleet/state")) as FleetStateDump;
    expect(after.applies).toEqual([]);
    expect(after.devices.find((d) => d.deviceId === "fd-spare-03")?.desired.version).toBe(0);
  });

  it("requires an Idempotency-Key on writes and a valid body", async () => {
    const headers = { authorization: `Bearer ${apiKey}`, "content-type": "application/json" };
    const body = JSON.stringify({ expectedVersion: 0, config: zoneConfig(), reference: "r" });
    const noKey = await fetch(`${baseUrl}/v1/devices/fd-spare-01/desired`, { method: "PUT", headers, body });
    expect(noKey.status).toBe(400);
    expect(await noKey.json()).toMatchObject({ error: "idempotency_key_required" });
    const badBody = await fetch(`${baseUrl}/v1/devices/fd-spare-01/desired`, {
      method: "PUT",
      headers: { ...headers, "idempotency-key": "k" },
      body: JSON.stringify({ expectedVersion: 0, config: { schema: 2 }, reference: "r" }),
    });
    expect(badBody.status).toBe(400);
    expect(await badBody.json()).toMatchObject({ error: "invalid_request" });
  });
});
