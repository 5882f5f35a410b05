import { randomUUID } from "node:crypto";
import { z } from "zod";
import { findModelProfile } from "@/lib/devices/model-profiles";
import {
  DEVICE_PAGE_DEFAULT_LIMIT,
  WEBHOOK_SIGNATURE_HEADER,
  WEBHOOK_TIMESTAMP_HEADER,
  type DeviceStateResponse,
  type DeviceSummary,
  type FirmwareResponse,
  type FirmwareUpdateRequest,
  type FleetWebhookEvent,
  type ListDevicesResponse,
  type PutDesiredRequest,
  type ReportStatus,
} from "@/lib/fleet/api-schema";
import { signWebhook } from "@/lib/fleet/webhook-signature";
import { zoneConfigSchema, type ZoneConfig } from "@/lib/validation/zone-config";
import { demoFleetDevices, type DemoFleetDevice } from "./demo-devices";

// In-memory state and device simulation behind the local fleet fake. The msw
// handlers (handlers.ts) translate HTTP to calls on this store; tests may also
// drive it directly. Devices behave like a device shadow: a PUT stores a new
// desired version at once; a moment later (applyDelayMs) an online device applies
// the latest desired version and reports back through a signed webhook.

// ---------------------------------------------------------------------------
// Faults

export const faultSpecSchema = z.object({
  /** Added to every answer. */
  latencyMs: z.int().min(0).max(120_000).optional(),
  /** Never answer within the client's timeout: wait `ms`, then 504. `calls` limits it to the next N. */
  hang: z
    .object({
      ms: z.int().min(1).max(600_000),
      calls: z.int().min(1).optional(),
      /** Do the work first, then hang: the write happened but its answer is lost. */
      afterProcessing: z.boolean().optional(),
    })
    .nullable()
    .optional(),
  /** Answer 5xx for the next `count` calls. */
  serverErrors: z
    .object({ count: z.int().min(1), status: z.union([z.literal(500), z.literal(502), z.literal(503), z.literal(504)]).optional() })
    .nullable()
    .optional(),
  /** Answer 429 with Retry-After for the next `count` calls. */
  rateLimit: z
    .object({
      count: z.int().min(1),
      retryAfterSeconds: z.int().min(0).max(3600).optional(),
      retryAfterFormat: z.enum(["seconds", "http-date"]).optional(),
    })
    .nullable()
    .optional(),
  /** Answer 200 with a body that breaks the contract for the next `count` calls. */
  malformed: z
    .object({ count: z.int().min(1), kind: z.enum(["truncated", "wrong-shape"]).optional() })
    .nullable()
    .optional(),
  /** Deliver every webhook twice (same eventId and body). */
  duplicateReports: z.boolean().optional(),
  /** Hold each report back until the next one has been delivered, so it arrives late. */
  outOfOrderReports: z.boolean().optional(),
  /** The device keeps only the first `maxPresets` presets and reports 'partial'. */
  partialApply: z.object({ maxPresets: z.int().min(0) }).nullable().optional(),
  /** The device refuses the config and reports 'rejected' with this error. */
  rejectApply: z.object({ error: z.string().min(1) }).nullable().optional(),
});
export type FaultSpec = z.infer<typeof faultSpecSchema>;

export const setFaultsBodySchema = faultSpecSchema.extend({ deviceId: z.string().min(1).optional() });
export const clearFaultsBodySchema = z.object({ deviceId: z.string().min(1).optional() });

/** What the handler must do to one incoming API call. */
export interface RequestFaults {
  latencyMs: number;
  hang: { ms: number; afterProcessing: boolean } | null;
  serverError: { status: number } | null;
  rateLimit: { retryAfterSeconds: number; format: "seconds" | "http-date" } | null;
  malformed: { kind: "truncated" | "wrong-shape" } | null;
}

// Changes a person could make at the device itself (buttons, its local setup page).
export const tamperChangesSchema = z.object({
  volumeCeiling: z.int().min(0).max(100).optional(),
  turnOnVolume: z.int().min(0).max(100).optional(),
  guestControls: z
    .object({ volume: z.boolean(), source: z.boolean(), wake: z.boolean(), locked: z.boolean() })
    .partial()
    .optional(),
  dropPresetKeys: z.array(z.string()).optional(),
});
export type TamperChanges = z.infer<typeof tamperChangesSchema>;

// ---------------------------------------------------------------------------
// State

export interface FakeDevice {
  deviceId: string;
  modelProfileId: string;
  serial: string;
  firmwareVersion: string;
  online: boolean;
  lastSeenAt: string;
  desired: {
    version: number;
    config: ZoneConfig | null;
    updatedAt: string;
    reference: string | null;
    idempotencyKey: string | null;
  };
  reported: {
    version: number;
    config: ZoneConfig | null;
    reportedAt: string | null;
    status: ReportStatus | null;
    error: string | null;
  };
  /** Increases with every state change the device reports (see the webhook contract). */
  sequence: number;
  /** Lines for the log bundle. */
  history: { at: string; level: "INFO" | "WARN" | "ERROR"; unit: string; text: string }[];
}

export interface DesiredVersionRecord {
  deviceId: string;
  version: number;
  idempotencyKey: string;
  reference: string;
  acceptedAt: string;
  /** pending until the device applies it; superseded when a newer version got there first. */
  outcome: "pending" | ReportStatus | "superseded";
}

export interface ApplyRecord {
  deviceId: string;
  version: number;
  idempotencyKey: string;
  status: ReportStatus;
  at: string;
}

export interface FirmwareUpdateRecord {
  updateId: string;
  deviceId: string;
  idempotencyKey: string;
  fromVersion: string;
  version: string;
  windowStart: string;
  windowEnd: string;
  state: "scheduled" | "applied" | "missed";
}

export interface DeliveryRecord {
  eventId: string;
  kind: FleetWebhookEvent["kind"];
  deviceId: string;
  sequence: number;
  /** 1, or 2 for the second copy of a duplicated report. */
  copy: number;
  attempt: number;
  outcome: "delivered" | "retrying" | "gave-up";
  status: number | null;
  error: string | null;
  at: string;
}

type DeliverFn = (url: string, init: RequestInit) => Promise<Response>;

export interface FleetSimulationConfig {
  webhookUrl: string | null;
  webhookSecret: string;
  applyDelayMs: number;
  /** How webhooks leave the fake. Injectable so msw interception in the same process cannot swallow them. */
  deliver: DeliverFn;
  now: () => number;
  /** Attempts per webhook when our app answers 5xx or refuses the connection. */
  webhookMaxAttempts: number;
  webhookRetryDelayMs: number;
  webhookTimeoutMs: number;
  /** A report held back by the out-of-order fault is sent anyway after this long. */
  outOfOrderHoldMs: number;
}

export interface FleetStoreOptions extends Partial<FleetSimulationConfig> {
  devices?: DemoFleetDevice[];
}

export type PutDesiredResult =
  | { kind: "accepted"; version: number; duplicate: boolean }
  | { kind: "not-found" }
  | { kind: "conflict"; currentVersion: number }
  | { kind: "unsupported"; reasons: string[] }
  | { kind: "key-reused" };

export type FirmwareUpdateResult =
  | { kind: "accepted"; updateId: string; duplicate: boolean }
  | { kind: "not-found" }
  | { kind: "unsupported"; reasons: string[] }
  | { kind: "key-reused" };

export interface FleetStateDump {
  devices: FakeDevice[];
  faults: { global: FaultSpec; devices: Record<string, FaultSpec> };
  desiredVersions: DesiredVersionRecord[];
  applies: ApplyRecord[];
  firmwareUpdates: FirmwareUpdateRecord[];
  deliveries: DeliveryRecord[];
}

interface IdempotencyRecord {
  fingerprint: string;
  result: { version: number } | { updateId: string };
}

const MAX_TIMER_MS = 2 ** 31 - 1;

function compareVersions(a: string, b: string): number {
  const pa = a.split(".").map(Number);
  const pb = b.split(".").map(Number);
  for (let i = 0; i < Math.max(pa.length, pb.length); i += 1) {
    const diff = (pa[i] ?? 0) - (pb[i] ?? 0);
    if (diff !== 0) return Math.sign(diff);
  }
  return 0;
}

/** Why a model cannot take a config; empty when it can. */
export function unsupportedReasons(modelProfileId: string, config: ZoneConfig): string[] {
  const profile = findModelProfile(modelProfileId);
  if (!profile) return [`Unknown model profile ${modelProfileId}`];
  const reasons: string[] = [];
  if (config.presets.length > profile.presetSlots) {
    reasons.push(`${config.presets.length} stream presets, but the model has ${profile.presetSlots} preset slots`);
  }
  // The DSP runs the zone curve in series with the playing card's curve.
  const zoneBands = config.zoneCurve?.bands.length ?? 0;
  if (zoneBands > profile.eqBands) reasons.push(`zone curve has ${zoneBands} EQ bands, but the model has ${profile.eqBands}`);
  const cards = [
    ...config.sources.map((s) => ({ where: `source "${s.label}"`, curve: s.toneCurve })),
    ...config.presets.map((p) => ({ where: `preset "${p.name}"`, curve: p.toneCurve })),
  ];
  for (const { where, curve } of cards) {
    if (curve && curve.bands.length + zoneBands > profile.eqBands) {
      reasons.push(`${where} needs ${curve.bands.length + zoneBands} EQ bands with the zone curve, but the model has ${profile.eqBands}`);
    }
  }
  const missingKinds = [...new Set(config.sources.map((s) => s.kind))].filter((k) => !profile.inputs.includes(k));
  for (const kind of missingKinds) reasons.push(`the model has no ${kind} input`);
  const subs = config.outputLayout.outputs.filter((o) => o.role === "subwoofer").length;
  if (subs > profile.subwooferOutputs) {
    reasons.push(`${subs} subwoofer outputs, but the model has ${profile.subwooferOutputs}`);
  }
  if (!profile.hasLineOut && config.outputLayout.outputs.some((o) => o.role === "line_out")) {
    reasons.push("the model has no line out");
  }
  return reasons;
}

function encodeCursor(offset: number): string {
  return Buffer.from(`o:${offset}`, "utf8").toString("base64url");
}

function decodeCursor(cursor: string): number | null {
  const match = /^o:(\d+)$/.exec(Buffer.from(cursor, "base64url").toString("utf8"));
  return match ? Number(match[1]) : null;
}

function fingerprint(value: unknown): string {
  return JSON.stringify(value);
}

export type FleetStore = ReturnType<typeof createFleetStore>;

export function createFleetStore(options: FleetStoreOptions = {}) {
  const seed = options.devices ?? demoFleetDevices;
  const config: FleetSimulationConfig = {
    webhookUrl: options.webhookUrl ?? null,
    webhookSecret: options.webhookSecret ?? "dev-fleet-webhook-secret",
    applyDelayMs: options.applyDelayMs ?? 1500,
    deliver: options.deliver ?? ((url, init) => globalThis.fetch(url, init)),
    now: options.now ?? Date.now,
    webhookMaxAttempts: options.webhookMaxAttempts ?? 5,
    webhookRetryDelayMs: options.webhookRetryDelayMs ?? 250,
    webhookTimeoutMs: options.webhookTimeoutMs ?? 10_000,
    outOfOrderHoldMs: options.outOfOrderHoldMs ?? 10_000,
  };

  let devices = new Map<string, FakeDevice>();
  let globalFaults: FaultSpec = {};
  let deviceFaults = new Map<string, FaultSpec>();
  let idempotency = new Map<string, IdempotencyRecord>();
  let desiredVersions: DesiredVersionRecord[] = [];
  let applies: ApplyRecord[] = [];
  let firmwareUpdates: FirmwareUpdateRecord[] = [];
  let deliveries: DeliveryRecord[] = [];
  // Webhooks of one device leave in order, one after another (retries included).
  let deliveryQueues = new Map<string, Promise<void>>();
  let heldReports = new Map<string, { event: FleetWebhookEvent; flush: () => void }>();
  const applyTimers = new Map<string, true>();
  // Bumped by reset(): work started before a reset stops instead of touching the new state.
  let epoch = 0;

  const timers = new Set<{ handle: ReturnType<typeof setTimeout>; cancel: () => void }>();
  let busy = 0;
  let idleWaiters: (() => void)[] = [];

  const iso = (ms = config.now()) => new Date(ms).toISOString();

  function enter() {
    busy += 1;
  }
  function leave() {
    busy -= 1;
    if (busy === 0) {
      const waiters = idleWaiters;
      idleWaiters = [];
      for (const resolve of waiters) resolve();
    }
  }

  /** setTimeout that reset()/dispose() cancel; tracked ones keep idle() waiting. */
  function schedule(fn: () => void | Promise<void>, ms: number, tracked = true): void {
    if (tracked) enter();
    const entry = {
      handle: setTimeout(() => {
        timers.delete(entry);
        Promise.resolve()
          .then(fn)
          .catch((error: unknown) => console.error("[fleet fake]", error))
          .finally(() => {
            if (tracked) leave();
          });
      }, Math.min(Math.max(0, ms), MAX_TIMER_MS)),
      cancel: () => {
        clearTimeout(entry.handle);
        timers.delete(entry);
        if (tracked) leave();
      },
    };
    entry.handle.unref?.();
    timers.add(entry);
  }

  /** A wait for the handlers (latency, hang) that ends early on abort, reset or dispose. */
  function wait(ms: number, signal?: AbortSignal): Promise<void> {
    return new Promise((resolve) => {
      if (signal?.aborted) return resolve();
      const entry = {
        handle: setTimeout(() => {
          timers.delete(entry);
          resolve();
        }, Math.min(ms, MAX_TIMER_MS)),
        cancel: () => {
          clearTimeout(entry.handle);
          timers.delete(entry);
          resolve();
        },
      };
      entry.handle.unref?.();
      timers.add(entry);
      signal?.addEventListener("abort", () => entry.cancel(), { once: true });
    });
  }

  function seedDevices() {
    const at = iso();
    devices = new Map(
      seed.map((d) => [
        d.fleetDeviceId,
        {
          deviceId: d.fleetDeviceId,
          modelProfileId: d.modelProfileId,
          serial: d.serial,
          firmwareVersion: d.firmwareVersion,
          online: d.online,
          lastSeenAt: at,
          desired: { version: 0, config: null, updatedAt: at, reference: null, idempotencyKey: null },
          reported: { version: 0, config: null, reportedAt: null, status: null, error: null },
          sequence: 0,
          history: [
            { at, level: "INFO", unit: "boot", text: `firmware ${d.firmwareVersion} started, serial ${d.serial}` },
            { at, level: "INFO", unit: "net", text: d.online ? "link up, 1000 Mb/s full duplex" : "link down" },
          ],
        } satisfies FakeDevice,
      ]),
    );
  }
  seedDevices();

  function log(device: FakeDevice, level: FakeDevice["history"][number]["level"], unit: string, text: string) {
    device.history.push({ at: iso(), level, unit, text });
    if (device.history.length > 500) device.history.splice(0, device.history.length - 500);
  }

  function faultsFor(deviceId: string | null): { device: FaultSpec; global: FaultSpec } {
    return { device: (deviceId && deviceFaults.get(deviceId)) || {}, global: globalFaults };
  }

  function flag(deviceId: string, name: "duplicateReports" | "outOfOrderReports"): boolean {
    const { device, global } = faultsFor(deviceId);
    return device[name] ?? global[name] ?? false;
  }

  function summary(device: FakeDevice): DeviceSummary {
    return {
      deviceId: device.deviceId,
      modelProfileId: device.modelProfileId,
      serial: device.serial,
      firmwareVersion: device.firmwareVersion,
      online: device.online,
      lastSeenAt: device.lastSeenAt,
    };
  }

  // -------------------------------------------------------------------------
  // Webhooks

  function makeEvent(
    device: FakeDevice,
    kind: FleetWebhookEvent["kind"],
    extra: { origin: "apply" | "local" | "system"; status?: ReportStatus | null; error?: string | null; updateId?: string | null },
  ): FleetWebhookEvent {
    device.sequence += 1;
    const base = {
      eventId: randomUUID(),
      deviceId: device.deviceId,
      sequence: device.sequence,
      desiredVersion: device.desired.version,
      reportedVersion: device.reported.version,
      config: device.reported.config,
      firmwareVersion: device.firmwareVersion,
      online: device.online,
      occurredAt: iso(),
    };
    if (kind === "reported") {
      return {
        ...base,
        kind,
        origin: extra.origin === "local" ? "local" : "apply",
        status: device.reported.status ?? "applied",
        error: device.reported.error,
        updateId: null,
      };
    }
    if (kind === "firmware") {
      return {
        ...base,
        kind,
        origin: "system",
        status: extra.status === "rejected" ? "rejected" : "applied",
        error: extra.error ?? null,
        updateId: extra.updateId ?? "unknown",
      };
    }
    return { ...base, kind, origin: "system", status: device.reported.status, error: device.reported.error, updateId: null };
  }

  async function deliverOnce(event: FleetWebhookEvent, rawBody: string, copy: number, startedEpoch: number) {
    const url = config.webhookUrl;
    if (!url) return;
    for (let attempt = 1; attempt <= config.webhookMaxAttempts; attempt += 1) {
      if (epoch !== startedEpoch) return;
      const timestamp = Math.floor(config.now() / 1000);
      let status: number | null = null;
      let error: string | null = null;
      try {
        const response = await config.deliver(url, {
          method: "POST",
          headers: {
            "content-type": "application/json",
            [WEBHOOK_TIMESTAMP_HEADER]: String(timestamp),
            [WEBHOOK_SIGNATURE_HEADER]: signWebhook(config.webhookSecret, timestamp, rawBody),
          },
          body: rawBody,
          // An app that never answers must not block this device's later webhooks forever.
          signal: AbortSignal.timeout(config.webhookTimeoutMs),
        });
        status = response.status;
        await response.body?.cancel().catch(() => undefined);
      } catch (cause) {
        error = cause instanceof Error ? cause.message : String(cause);
      }
      if (epoch !== startedEpoch) return; // reset while in flight: the new state must not see it
      const delivered = status !== null && status >= 200 && status < 300;
      // A 4xx other than 408/429 is our app refusing the event (bad signature, bad body): no point retrying.
      const final = delivered || (status !== null && status >= 400 && status < 500 && status !== 408 && status !== 429);
      const last = attempt === config.webhookMaxAttempts;
      deliveries.push({
        eventId: event.eventId,
        kind: event.kind,
        deviceId: event.deviceId,
        sequence: event.sequence,
        copy,
        attempt,
        outcome: delivered ? "delivered" : final || last ? "gave-up" : "retrying",
        status,
        error,
        at: iso(),
      });
      if (final) return;
      if (!last) await wait(config.webhookRetryDelayMs * 2 ** (attempt - 1));
    }
  }

  function enqueueDelivery(event: FleetWebhookEvent) {
    const startedEpoch = epoch;
    const copies = flag(event.deviceId, "duplicateReports") ? 2 : 1;
    const rawBody = JSON.stringify(event);
    enter();
    const previous = deliveryQueues.get(event.deviceId) ?? Promise.resolve();
    const next = previous
      .then(async () => {
        for (let copy = 1; copy <= copies; copy += 1) await deliverOnce(event, rawBody, copy, startedEpoch);
      })
      .catch((error: unknown) => console.error("[fleet fake] webhook delivery failed", error))
      .finally(leave);
    deliveryQueues.set(event.deviceId, next);
  }

  /** Sends an event, holding reports back when the out-of-order fault is on. */
  function emit(event: FleetWebhookEvent) {
    const held = heldReports.get(event.deviceId);
    if (event.kind === "reported" && !held && flag(event.deviceId, "outOfOrderReports")) {
      let flushed = false;
      const flush = () => {
        if (flushed) return;
        flushed = true;
        heldReports.delete(event.deviceId);
        enqueueDelivery(event);
      };
      heldReports.set(event.deviceId, { event, flush });
      // Untracked: idle() should not wait for a report that is late on purpose.
      schedule(flush, config.outOfOrderHoldMs, false);
      return;
    }
    enqueueDelivery(event);
    // The held (older) report now arrives after this newer one.
    if (held && event.kind === "reported") held.flush();
  }

  // -------------------------------------------------------------------------
  // Device behaviour

  function scheduleApply(device: FakeDevice) {
    if (applyTimers.has(device.deviceId) || !device.online) return;
    if (device.desired.version <= device.reported.version) return;
    applyTimers.set(device.deviceId, true);
    const startedEpoch = epoch;
    schedule(() => {
      if (epoch !== startedEpoch) return;
      applyTimers.delete(device.deviceId);
      applyLatest(device);
    }, config.applyDelayMs);
  }

  /** The device fetches its latest desired state and applies it, as a shadow-based device does. */
  function applyLatest(device: FakeDevice) {
    if (!device.online) return; // stays pending until it comes back
    const target = device.desired;
    if (target.version <= device.reported.version || !target.config || !target.idempotencyKey) return;
    const { device: df, global: gf } = faultsFor(device.deviceId);
    const reject = df.rejectApply ?? gf.rejectApply ?? null;
    const partial = df.partialApply ?? gf.partialApply ?? null;

    let status: ReportStatus = "applied";
    let error: string | null = null;
    let applied: ZoneConfig | null = target.config;
    if (reject) {
      status = "rejected";
      error = reject.error;
      applied = device.reported.config;
    } else if (partial && target.config.presets.length > partial.maxPresets) {
      status = "partial";
      const total = target.config.presets.length;
      applied = { ...target.config, presets: target.config.presets.slice(0, partial.maxPresets) };
      error = `preset memory full: stored ${partial.maxPresets} of ${total} presets`;
    }

    for (const record of desiredVersions) {
      if (record.deviceId !== device.deviceId || record.outcome !== "pending") continue;
      if (record.version < target.version) record.outcome = "superseded";
      if (record.version === target.version) record.outcome = status;
    }
    device.reported = { version: target.version, config: applied, reportedAt: iso(), status, error };
    device.lastSeenAt = iso();
    applies.push({ deviceId: device.deviceId, version: target.version, idempotencyKey: target.idempotencyKey, status, at: iso() });
    log(
      device,
      status === "applied" ? "INFO" : status === "partial" ? "WARN" : "ERROR",
      "config",
      `desired v${target.version} ${status}${error ? `: ${error}` : ""}`,
    );
    emit(makeEvent(device, "reported", { origin: "apply" }));
  }

  function scheduleFirmware(update: FirmwareUpdateRecord) {
    const startedEpoch = epoch;
    const untilStart = Date.parse(update.windowStart) - config.now();
    schedule(() => {
      if (epoch !== startedEpoch) return;
      runFirmware(update);
    }, Math.max(config.applyDelayMs, untilStart));
  }

  function runFirmware(update: FirmwareUpdateRecord) {
    const device = devices.get(update.deviceId);
    if (!device || update.state !== "scheduled") return;
    const nowMs = config.now();
    if (nowMs < Date.parse(update.windowStart)) return scheduleFirmware(update);
    if (nowMs > Date.parse(update.windowEnd)) {
      update.state = "missed";
      log(device, "WARN", "update", `firmware ${update.version} window missed`);
      emit(
        makeEvent(device, "firmware", {
          origin: "system",
          status: "rejected",
          error: "update window ended before the device could install",
          updateId: update.updateId,
        }),
      );
      return;
    }
    if (!device.online) return; // retried when the device comes back online
    update.state = "applied";
    device.firmwareVersion = update.version;
    device.lastSeenAt = iso();
    log(device, "INFO", "update", `firmware ${update.fromVersion} -> ${update.version} installed, restarted`);
    emit(makeEvent(device, "firmware", { origin: "system", status: "applied", updateId: update.updateId }));
  }

  // -------------------------------------------------------------------------
  // Public API

  const store = {
    /** Sets how the simulation reaches our app; the handlers call this with their options. */
    configure(partial: Partial<FleetSimulationConfig>) {
      for (const [key, value] of Object.entries(partial)) {
        if (value !== undefined) Object.assign(config, { [key]: value });
      }
    },

    get config(): Readonly<FleetSimulationConfig> {
      return config;
    },

    now(): number {
      return config.now();
    },

    wait,

    listDevices(cursor: string | undefined, limit = DEVICE_PAGE_DEFAULT_LIMIT): ListDevicesResponse | null {
      const offset = cursor === undefined ? 0 : decodeCursor(cursor);
      if (offset === null) return null;
      const all = [...devices.values()];
      const page = all.slice(offset, offset + limit);
      const next = offset + limit;
      return { devices: page.map(summary), nextCursor: next < all.length ? encodeCursor(next) : null };
    },

    getDevice(deviceId: string): FakeDevice | undefined {
      return devices.get(deviceId);
    },

    deviceState(deviceId: string): DeviceStateResponse | undefined {
      const device = devices.get(deviceId);
      if (!device) return undefined;
      return {
        device: summary(device),
        desired: { version: device.desired.version, config: device.desired.config, updatedAt: device.desired.updatedAt },
        reported: { ...device.reported },
      };
    },

    putDesired(deviceId: string, body: PutDesiredRequest, idempotencyKey: string): PutDesiredResult {
      const device = devices.get(deviceId);
      if (!device) return { kind: "not-found" };
      // The fingerprint leaves out expectedVersion: a caller that re-reads the version
      // after a lost answer and retries with the same key must get the first answer back.
      const print = fingerprint({ config: body.config, reference: body.reference });
      const scope = `desired|${deviceId}|${idempotencyKey}`;
      const known = idempotency.get(scope);
      if (known) {
        if (known.fingerprint !== print) return { kind: "key-reused" };
        return { kind: "accepted", version: (known.result as { version: number }).version, duplicate: true };
      }
      if (body.expectedVersion !== device.desired.version) {
        return { kind: "conflict", currentVersion: device.desired.version };
      }
      const reasons = unsupportedReasons(device.modelProfileId, body.config);
      if (reasons.length > 0) return { kind: "unsupported", reasons };

      const version = device.desired.version + 1;
      const at = iso();
      device.desired = { version, config: body.config, updatedAt: at, reference: body.reference, idempotencyKey };
      idempotency.set(scope, { fingerprint: print, result: { version } });
      desiredVersions.push({ deviceId, version, idempotencyKey, reference: body.reference, acceptedAt: at, outcome: "pending" });
      log(device, "INFO", "shadow", `desired v${version} received (${body.reference})`);
      if (!device.online) log(device, "WARN", "shadow", `device offline; desired v${version} waits for reconnect`);
      scheduleApply(device);
      return { kind: "accepted", version, duplicate: false };
    },

    getFirmware(deviceId: string): FirmwareResponse | undefined {
      const device = devices.get(deviceId);
      if (!device) return undefined;
      const latest = findModelProfile(device.modelProfileId)?.latestFirmware ?? null;
      const available = latest && compareVersions(latest, device.firmwareVersion) > 0 ? latest : null;
      return { current: device.firmwareVersion, available };
    },

    scheduleFirmwareUpdate(deviceId: string, body: FirmwareUpdateRequest, idempotencyKey: string): FirmwareUpdateResult {
      const device = devices.get(deviceId);
      if (!device) return { kind: "not-found" };
      const scope = `firmware|${deviceId}|${idempotencyKey}`;
      const print = fingerprint(body);
      const known = idempotency.get(scope);
      if (known) {
        if (known.fingerprint !== print) return { kind: "key-reused" };
        return { kind: "accepted", updateId: (known.result as { updateId: string }).updateId, duplicate: true };
      }
      const { available } = store.getFirmware(deviceId)!;
      const reasons: string[] = [];
      if (body.version !== available) {
        reasons.push(`firmware ${body.version} is not offered for this device (available: ${available ?? "none"})`);
      }
      if (Date.parse(body.windowEnd) <= config.now()) reasons.push("the update window has already ended");
      if (reasons.length > 0) return { kind: "unsupported", reasons };

      const update: FirmwareUpdateRecord = {
        updateId: `fwu_${randomUUID()}`,
        deviceId,
        idempotencyKey,
        fromVersion: device.firmwareVersion,
        version: body.version,
        windowStart: body.windowStart,
        windowEnd: body.windowEnd,
        state: "scheduled",
      };
      firmwareUpdates.push(update);
      idempotency.set(scope, { fingerprint: print, result: { updateId: update.updateId } });
      log(device, "INFO", "update", `firmware ${body.version} scheduled for ${body.windowStart} – ${body.windowEnd}`);
      scheduleFirmware(update);
      return { kind: "accepted", updateId: update.updateId, duplicate: false };
    },

    /** A plain-text log bundle as a device would upload it. */
    logs(deviceId: string): string | undefined {
      const device = devices.get(deviceId);
      if (!device) return undefined;
      const profile = findModelProfile(device.modelProfileId);
      const header = [
        `# device ${device.deviceId}  serial ${device.serial}  model ${device.modelProfileId}`,
        `# firmware ${device.firmwareVersion}  ${device.online ? "online" : "offline"}  collected ${iso()}`,
        "",
      ];
      const lines = device.history.map((h) => `${h.at} ${h.level.padEnd(5)} ${h.unit.padEnd(7)} ${h.text}`);
      const status = [
        `${iso()} INFO  dsp     ${profile?.eqBands ?? 0} EQ bands, ${profile?.presetSlots ?? 0} preset slots`,
        `${iso()} INFO  amp     output stage temperature 41 C, no protection events`,
        `${iso()} INFO  net     rssi n/a (wired), rx errors 0, tx errors 0`,
        `${iso()} INFO  shadow  desired v${device.desired.version}, reported v${device.reported.version} (${device.reported.status ?? "none"})`,
      ];
      return [...header, ...lines, ...status, ""].join("\n");
    },

    // --- faults -------------------------------------------------------------

    setFaults(spec: FaultSpec, deviceId?: string): void {
      const current = deviceId ? (deviceFaults.get(deviceId) ?? {}) : globalFaults;
      const merged: FaultSpec = { ...current };
      for (const [key, value] of Object.entries(spec) as [keyof FaultSpec, unknown][]) {
        if (value === undefined) continue;
        if (value === null) delete merged[key];
        else Object.assign(merged, { [key]: value });
      }
      if (deviceId) deviceFaults.set(deviceId, merged);
      else globalFaults = merged;
    },

    clearFaults(deviceId?: string): void {
      const held = deviceId ? [heldReports.get(deviceId)] : [...heldReports.values()];
      if (deviceId) deviceFaults.delete(deviceId);
      else {
        globalFaults = {};
        deviceFaults = new Map();
      }
      // Nothing stays held once the fault that held it is gone.
      for (const h of held) h?.flush();
    },

    faults(): FleetStateDump["faults"] {
      return { global: structuredClone(globalFaults), devices: Object.fromEntries(structuredClone([...deviceFaults])) };
    },

    /** Consumes the counted faults that apply to one incoming API call. */
    takeRequestFaults(deviceId: string | null): RequestFaults {
      const { device, global } = faultsFor(deviceId);
      const take = <K extends "hang" | "serverErrors" | "rateLimit" | "malformed">(key: K) => {
        for (const [spec, id] of [
          [device, deviceId],
          [global, null],
        ] as const) {
          const fault = spec[key];
          if (!fault) continue;
          const remaining = "calls" in fault ? fault.calls : "count" in fault ? fault.count : undefined;
          if (remaining !== undefined) {
            const left = remaining - 1;
            if (left <= 0) store.setFaults({ [key]: null }, id ?? undefined);
            else store.setFaults({ [key]: { ...fault, ["calls" in fault ? "calls" : "count"]: left } }, id ?? undefined);
          }
          return fault as NonNullable<FaultSpec[K]>;
        }
        return null;
      };
      const hang = take("hang");
      const serverErrors = hang ? null : take("serverErrors");
      const rateLimit = hang || serverErrors ? null : take("rateLimit");
      const malformed = hang || serverErrors || rateLimit ? null : take("malformed");
      return {
        latencyMs: device.latencyMs ?? global.latencyMs ?? 0,
        hang: hang ? { ms: hang.ms, afterProcessing: hang.afterProcessing ?? false } : null,
        serverError: serverErrors ? { status: serverErrors.status ?? 503 } : null,
        rateLimit: rateLimit
          ? { retryAfterSeconds: rateLimit.retryAfterSeconds ?? 1, format: rateLimit.retryAfterFormat ?? "seconds" }
          : null,
        malformed: malformed ? { kind: malformed.kind ?? "wrong-shape" } : null,
      };
    },

    // --- device events ------------------------------------------------------

    /** The device drops off or comes back; back online it applies whatever desired state it missed. */
    setOnline(deviceId: string, online: boolean): FakeDevice | undefined {
      const device = devices.get(deviceId);
      if (!device) return undefined;
      if (device.online === online) return device;
      device.online = online;
      if (online) device.lastSeenAt = iso();
      log(device, online ? "INFO" : "WARN", "net", online ? "link up, reconnected to fleet" : "link down, fleet connection lost");
      emit(makeEvent(device, "online", { origin: "system" }));
      if (online) {
        scheduleApply(device);
        for (const update of firmwareUpdates) {
          if (update.deviceId === deviceId && update.state === "scheduled") scheduleFirmware(update);
        }
      }
      return device;
    },

    /** Someone changes the device at the device: the reported config drifts from desired. */
    tamper(deviceId: string, changes: TamperChanges = {}): { kind: "ok"; config: ZoneConfig } | { kind: "not-found" } | { kind: "no-config" } {
      const device = devices.get(deviceId);
      if (!device) return { kind: "not-found" };
      const current = device.reported.config;
      if (!current) return { kind: "no-config" };
      const nothingGiven = Object.values(changes).every((v) => v === undefined);
      const volumeCeiling = nothingGiven
        ? current.volumeCeiling <= 90
          ? current.volumeCeiling + 10
          : current.volumeCeiling - 10
        : (changes.volumeCeiling ?? current.volumeCeiling);
      const drop = new Set(changes.dropPresetKeys ?? []);
      const next = zoneConfigSchema.parse({
        ...current,
        volumeCeiling,
        turnOnVolume: Math.min(changes.turnOnVolume ?? current.turnOnVolume, volumeCeiling),
        guestControls: { ...current.guestControls, ...changes.guestControls },
        presets: current.presets.filter((p) => !drop.has(p.key)),
      });
      device.reported = { ...device.reported, config: next, reportedAt: iso() };
      device.lastSeenAt = iso();
      log(device, "INFO", "ui", `local change: volume ceiling ${current.volumeCeiling} -> ${next.volumeCeiling}`);
      emit(makeEvent(device, "reported", { origin: "local" }));
      return { kind: "ok", config: next };
    },

    // --- proofs for tests ---------------------------------------------------

    /** How many times the device applied the desired version stored under this key. */
    applyCount(deviceId: string, idempotencyKey: string): number {
      return applies.filter((a) => a.deviceId === deviceId && a.idempotencyKey === idempotencyKey).length;
    },

    /** How many desired versions were created under this key (1 however often it is retried). */
    acceptCount(deviceId: string, idempotencyKey: string): number {
      return desiredVersions.filter((v) => v.deviceId === deviceId && v.idempotencyKey === idempotencyKey).length;
    },

    deliveries(): DeliveryRecord[] {
      return [...deliveries];
    },

    snapshot(): FleetStateDump {
      return structuredClone({
        devices: [...devices.values()],
        faults: store.faults(),
        desiredVersions,
        applies,
        firmwareUpdates,
        deliveries,
      });
    },

    /** Resolves when no apply, firmware step or webhook delivery is pending (held late reports excepted). */
    idle(): Promise<void> {
      if (busy === 0) return Promise.resolve();
      return new Promise((resolve) => idleWaiters.push(resolve));
    },

    /** Back to the seed: devices, faults, history and counters. */
    reset(): void {
      store.dispose();
      globalFaults = {};
      deviceFaults = new Map();
      idempotency = new Map();
      desiredVersions = [];
      applies = [];
      firmwareUpdates = [];
      deliveries = [];
      deliveryQueues = new Map();
      heldReports = new Map();
      seedDevices();
    },

    /** Cancels every timer (apply, firmware, retries, hangs) and stops deliveries in flight. */
    dispose(): void {
      epoch += 1;
      for (const timer of [...timers]) timer.cancel();
      applyTimers.clear();
      heldReports = new Map();
    },
  };
  return store;
}
