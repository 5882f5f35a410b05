import type { z } from "zod";
import {
  DEVICE_PAGE_MAX_LIMIT,
  IDEMPOTENCY_KEY_HEADER,
  deviceStateResponseSchema,
  errorBodySchema,
  firmwareResponseSchema,
  firmwareUpdateAcceptedSchema,
  listDevicesResponseSchema,
  putDesiredAcceptedSchema,
  unsupportedBodySchema,
  versionConflictBodySchema,
  type DeviceStateResponse,
  type DeviceSummary,
  type FirmwareResponse,
  type FirmwareUpdateAccepted,
  type FirmwareUpdateRequest,
  type ListDevicesResponse,
  type PutDesiredAccepted,
  type PutDesiredRequest,
} from "@/lib/fleet/api-schema";

// Typed client for the device-fleet API (see api-schema.ts for the contract).
//
// Retries: network errors, timeouts, 5xx and 429 are retried with exponential
// backoff and full jitter (delay = random × min(cap, base × 2^attempt)), or after
// the server's Retry-After when it sends one. Other 4xx are final: retrying a
// rejected request cannot succeed. Retrying a PUT/POST is safe only because every
// write carries the caller's Idempotency-Key, which the fleet deduplicates.

export type FleetErrorCode =
  | "fleet:timeout"
  | "fleet:unavailable"
  | "fleet:rate-limited"
  | "fleet:conflict"
  | "fleet:unsupported"
  | "fleet:not-found"
  | "fleet:unauthorized"
  | "fleet:bad-request"
  | "fleet:bad-response";

const RETRYABLE_CODES: ReadonlySet<FleetErrorCode> = new Set([
  "fleet:timeout",
  "fleet:unavailable",
  "fleet:rate-limited",
]);

export class FleetError extends Error {
  readonly code: FleetErrorCode;
  /** HTTP status of the last answer; null when none came (network error, timeout). */
  readonly status: number | null;
  /** How long the fleet asked us to wait (Retry-After), when it did. */
  readonly retryAfterMs: number | null;
  /** Why the model cannot take a config (fleet:unsupported); empty otherwise. */
  readonly reasons: string[];
  /** The fleet's desired version on a version conflict (fleet:conflict). */
  readonly currentVersion: number | null;
  /** Attempts made, retries included. */
  readonly attempts: number;
  /** True when a later attempt may succeed (the push worker reschedules these). */
  readonly retryable: boolean;

  constructor(init: {
    code: FleetErrorCode;
    message: string;
    status?: number | null;
    retryAfterMs?: number | null;
    reasons?: string[];
    currentVersion?: number | null;
    attempts?: number;
    cause?: unknown;
  }) {
    super(init.message, init.cause === undefined ? undefined : { cause: init.cause });
    this.name = "FleetError";
    this.code = init.code;
    this.status = init.status ?? null;
    this.retryAfterMs = init.retryAfterMs ?? null;
    this.reasons = init.reasons ?? [];
    this.currentVersion = init.currentVersion ?? null;
    this.attempts = init.attempts ?? 1;
    this.retryable = RETRYABLE_CODES.has(init.code);
  }

  withAttempts(attempts: number): FleetError {
    return new FleetError({
      code: this.code,
      message: this.message,
      status: this.status,
      retryAfterMs: this.retryAfterMs,
      reasons: this.reasons,
      currentVersion: this.currentVersion,
      attempts,
      cause: this.cause,
    });
  }
}

export function isFleetError(value: unknown): value is FleetError {
  return value instanceof FleetError;
}

export interface FleetClientOptions {
  baseUrl: string;
  apiKey: string;
  fetch?: typeof globalThis.fetch;
  /** Per attempt, covering the whole answer (headers and body). */
  timeoutMs?: number;
  /** Retries after the first attempt. */
  maxRetries?: number;
  /** Injected for tests: how the client waits between attempts. */
  sleep?: (ms: number) => Promise<void>;
  /** Injected for tests: uniform in [0, 1) for the jitter. */
  random?: () => number;
  /** Injected for tests: epoch ms, used to read an HTTP-date Retry-After. */
  now?: () => number;
  baseDelayMs?: number;
  maxDelayMs?: number;
  /**
   * A Retry-After longer than this is not waited out inside the call: the error is
   * thrown at once (with retryAfterMs) so a worker can reschedule instead of blocking.
   */
  maxRetryAfterMs?: number;
}

export interface CallOptions {
  /** Cancels the call and any pending retry. */
  signal?: AbortSignal;
}

export interface WriteOptions extends CallOptions {
  /** Chosen by the caller and stable across retries and restarts, e.g. `${revisionId}:${deviceId}`. */
  idempotencyKey: string;
}

export interface FleetClient {
  listDevices(query?: { cursor?: string; limit?: number }, options?: CallOptions): Promise<ListDevicesResponse>;
  /** Follows nextCursor until the end. */
  listAllDevices(options?: CallOptions & { pageSize?: number }): Promise<DeviceSummary[]>;
  getDevice(deviceId: string, options?: CallOptions): Promise<DeviceStateResponse>;
  putDesired(deviceId: string, body: PutDesiredRequest, options: WriteOptions): Promise<PutDesiredAccepted>;
  getFirmware(deviceId: string, options?: CallOptions): Promise<FirmwareResponse>;
  scheduleFirmwareUpdate(
    deviceId: string,
    body: FirmwareUpdateRequest,
    options: WriteOptions,
  ): Promise<FirmwareUpdateAccepted>;
  getLogs(deviceId: string, options?: CallOptions): Promise<string>;
}

interface RequestSpec {
  method: "GET" | "PUT" | "POST";
  path: string;
  query?: Record<string, string | number | undefined>;
  body?: unknown;
  idempotencyKey?: string;
  accept: "json" | "text";
  signal?: AbortSignal;
}

interface RawAnswer {
  status: number;
  headers: Headers;
  text: string;
}

const defaultSleep = (ms: number, signal?: AbortSignal) =>
  new Promise<void>((resolve, reject) => {
    if (signal?.aborted) return reject(signal.reason);
    const timer = setTimeout(() => {
      signal?.removeEventListener("abort", onAbort);
      resolve();
    }, ms);
    const onAbort = () => {
      clearTimeout(timer);
      reject(signal?.reason);
    };
    signal?.addEventListener("abort", onAbort, { once: true });
  });

/** Retry-After is either delay-seconds or an HTTP-date (RFC 9110 §10.2.3). */
export function parseRetryAfter(value: string | null, nowMs: number): number | null {
  if (value === null) return null;
  const text = value.trim();
  if (/^\d+$/.test(text)) return Number(text) * 1000;
  const date = Date.parse(text);
  if (Number.isNaN(date)) return null;
  return Math.max(0, date - nowMs);
}

function describeIssues(error: z.ZodError): string {
  return error.issues
    .slice(0, 3)
    .map((issue) => `${issue.path.join(".") || "(root)"}: ${issue.message}`)
    .join("; ");
}

export function createFleetClient(options: FleetClientOptions): FleetClient {
  const baseUrl = options.baseUrl.replace(/\/+$/, "");
  const doFetch = options.fetch ?? ((input, init) => globalThis.fetch(input, init));
  const timeoutMs = options.timeoutMs ?? 10_000;
  const maxRetries = options.maxRetries ?? 3;
  const random = options.random ?? Math.random;
  const now = options.now ?? Date.now;
  const baseDelayMs = options.baseDelayMs ?? 200;
  const maxDelayMs = options.maxDelayMs ?? 10_000;
  const maxRetryAfterMs = options.maxRetryAfterMs ?? 30_000;
  const sleep = (ms: number, signal?: AbortSignal) =>
    options.sleep ? options.sleep(ms) : defaultSleep(ms, signal);

  function url(spec: RequestSpec): string {
    const search = new URLSearchParams();
    for (const [key, value] of Object.entries(spec.query ?? {})) {
      if (value !== undefined) search.set(key, String(value));
    }
    const qs = search.toString();
    return `${baseUrl}${spec.path}${qs ? `?${qs}` : ""}`;
  }

  function what(spec: RequestSpec): string {
    return `${spec.method} ${spec.path}`;
  }

  /** One attempt: an answer (any status), or a FleetError for timeout/network failure. */
  async function attempt(spec: RequestSpec): Promise<RawAnswer> {
    const headers: Record<string, string> = {
      authorization: `Bearer ${options.apiKey}`,
      accept: spec.accept === "json" ? "application/json" : "text/plain",
    };
    if (spec.body !== undefined) headers["content-type"] = "application/json";
    if (spec.idempotencyKey !== undefined) headers[IDEMPOTENCY_KEY_HEADER] = spec.idempotencyKey;

    const timeout = AbortSignal.timeout(timeoutMs);
    const signal = spec.signal ? AbortSignal.any([spec.signal, timeout]) : timeout;
    try {
      const response = await doFetch(url(spec), {
        method: spec.method,
        headers,
        body: spec.body === undefined ? undefined : JSON.stringify(spec.body),
        signal,
      });
      // Reading the body stays under the same signal, so a stalled body also times out.
      const text = await response.text();
      return { status: response.status, headers: response.headers, text };
    } catch (error) {
      if (spec.signal?.aborted) throw spec.signal.reason ?? error;
      if (timeout.aborted) {
        throw new FleetError({
          code: "fleet:timeout",
          message: `Fleet did not answer ${what(spec)} within ${timeoutMs} ms`,
          cause: error,
        });
      }
      throw new FleetError({
        code: "fleet:unavailable",
        message: `Fleet unreachable for ${what(spec)}: ${error instanceof Error ? error.message : String(error)}`,
        cause: error,
      });
    }
  }

  function parseJson(spec: RequestSpec, answer: RawAnswer): unknown {
    try {
      return JSON.parse(answer.text);
    } catch (error) {
      throw new FleetError({
        code: "fleet:bad-response",
        status: answer.status,
        message: `Fleet answered ${what(spec)} with ${answer.status} and a body that is not JSON`,
        cause: error,
      });
    }
  }

  function safeJson(text: string): unknown {
    try {
      return JSON.parse(text);
    } catch {
      return undefined;
    }
  }

  /** Maps a non-2xx answer to a FleetError (retryable or not). */
  function errorFor(spec: RequestSpec, answer: RawAnswer): FleetError {
    const { status } = answer;
    const body = safeJson(answer.text);
    const parsedError = errorBodySchema.safeParse(body);
    const detail = parsedError.success ? (parsedError.data.message ?? parsedError.data.error) : answer.text.slice(0, 200);
    const retryAfterMs = parseRetryAfter(answer.headers.get("retry-after"), now());
    const base = { status, retryAfterMs };

    if (status === 429) {
      return new FleetError({ ...base, code: "fleet:rate-limited", message: `Fleet rate-limited ${what(spec)}` });
    }
    if (status >= 500) {
      return new FleetError({ ...base, code: "fleet:unavailable", message: `Fleet answered ${what(spec)} with ${status}: ${detail}` });
    }
    if (status === 401 || status === 403) {
      return new FleetError({ ...base, code: "fleet:unauthorized", message: `Fleet refused the API key for ${what(spec)} (${status})` });
    }
    if (status === 404) {
      return new FleetError({ ...base, code: "fleet:not-found", message: `Fleet does not know ${spec.path}` });
    }
    if (status === 409) {
      const conflict = versionConflictBodySchema.safeParse(body);
      const currentVersion = conflict.success ? conflict.data.currentVersion : null;
      return new FleetError({
        ...base,
        code: "fleet:conflict",
        currentVersion,
        message: `Fleet version conflict on ${what(spec)}${currentVersion === null ? "" : ` (current version ${currentVersion})`}`,
      });
    }
    if (status === 422) {
      const unsupported = unsupportedBodySchema.safeParse(body);
      if (unsupported.success) {
        return new FleetError({
          ...base,
          code: "fleet:unsupported",
          reasons: unsupported.data.reasons,
          message: `The device cannot take this configuration: ${unsupported.data.reasons.join("; ")}`,
        });
      }
    }
    return new FleetError({ ...base, code: "fleet:bad-request", message: `Fleet rejected ${what(spec)} with ${status}: ${detail}` });
  }

  function backoffMs(retryIndex: number): number {
    return Math.floor(random() * Math.min(maxDelayMs, baseDelayMs * 2 ** retryIndex));
  }

  async function send(spec: RequestSpec): Promise<RawAnswer> {
    let attempts = 0;
    for (;;) {
      attempts += 1;
      let failure: FleetError;
      try {
        const answer = await attempt(spec);
        if (answer.status >= 200 && answer.status < 300) return answer;
        failure = errorFor(spec, answer);
      } catch (error) {
        if (!(error instanceof FleetError)) throw error;
        failure = error;
      }
      if (!failure.retryable || attempts > maxRetries) throw failure.withAttempts(attempts);
      if (failure.retryAfterMs !== null && failure.retryAfterMs > maxRetryAfterMs) throw failure.withAttempts(attempts);
      await sleep(failure.retryAfterMs ?? backoffMs(attempts - 1), spec.signal);
    }
  }

  async function sendJson<T>(spec: RequestSpec, schema: z.ZodType<T>): Promise<T> {
    const answer = await send(spec);
    const parsed = schema.safeParse(parseJson(spec, answer));
    if (!parsed.success) {
      throw new FleetError({
        code: "fleet:bad-response",
        status: answer.status,
        message: `Fleet answered ${what(spec)} with an unexpected body: ${describeIssues(parsed.error)}`,
        cause: parsed.error,
      });
    }
    return parsed.data;
  }

  const devicePath = (deviceId: string, rest = "") => `/v1/devices/${encodeURIComponent(deviceId)}${rest}`;

  const client: FleetClient = {
    listDevices(query = {}, callOptions = {}) {
      return sendJson(
        { method: "GET", path: "/v1/devices", query, accept: "json", signal: callOptions.signal },
        listDevicesResponseSchema,
      );
    },

    async listAllDevices(callOptions = {}) {
      const devices: DeviceSummary[] = [];
      let cursor: string | undefined;
      const limit = Math.min(callOptions.pageSize ?? DEVICE_PAGE_MAX_LIMIT, DEVICE_PAGE_MAX_LIMIT);
      do {
        const page = await client.listDevices({ cursor, limit }, callOptions);
        devices.push(...page.devices);
        cursor = page.nextCursor ?? undefined;
      } while (cursor);
      return devices;
    },

    getDevice(deviceId, callOptions = {}) {
      return sendJson(
        { method: "GET", path: devicePath(deviceId), accept: "json", signal: callOptions.signal },
        deviceStateResponseSchema,
      );
    },

    putDesired(deviceId, body, writeOptions) {
      return sendJson(
        {
          method: "PUT",
          path: devicePath(deviceId, "/desired"),
          body,
          idempotencyKey: writeOptions.idempotencyKey,
          accept: "json",
          signal: writeOptions.signal,
        },
        putDesiredAcceptedSchema,
      );
    },

    getFirmware(deviceId, callOptions = {}) {
      return sendJson(
        { method: "GET", path: devicePath(deviceId, "/firmware"), accept: "json", signal: callOptions.signal },
        firmwareResponseSchema,
      );
    },

    scheduleFirmwareUpdate(deviceId, body, writeOptions) {
      return sendJson(
        {
          method: "POST",
          path: devicePath(deviceId, "/firmware-updates"),
          body,
          idempotencyKey: writeOptions.idempotencyKey,
          accept: "json",
          signal: writeOptions.signal,
        },
        firmwareUpdateAcceptedSchema,
      );
    },

    async getLogs(deviceId, callOptions = {}) {
      const spec: RequestSpec = { method: "GET", path: devicePath(deviceId, "/logs"), accept: "text", signal: callOptions.signal };
      const answer = await send(spec);
      const type = answer.headers.get("content-type") ?? "";
      if (!type.startsWith("text/plain")) {
        throw new FleetError({
          code: "fleet:bad-response",
          status: answer.status,
          message: `Fleet answered ${what(spec)} with ${type || "no content type"} instead of text/plain`,
        });
      }
      return answer.text;
    },
  };
  return client;
}
