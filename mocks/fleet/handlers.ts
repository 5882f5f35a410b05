import { http, HttpResponse, type HttpHandler } from "msw";
import { z } from "zod";
import {
  DEVICE_PAGE_DEFAULT_LIMIT,
  IDEMPOTENCY_KEY_HEADER,
  firmwareUpdateRequestSchema,
  listDevicesQuerySchema,
  putDesiredRequestSchema,
  type ErrorBody,
} from "@/lib/fleet/api-schema";
import {
  clearFaultsBodySchema,
  setFaultsBodySchema,
  tamperChangesSchema,
  type FleetSimulationConfig,
  type FleetStore,
} from "./store";

// msw handlers for the device-fleet API and the fake's control endpoints. Paths
// start with `*/` so the same handlers serve setupServer in tests (any base URL)
// and the real local server (mocks/fleet-server.ts).

export interface FleetHandlersOptions {
  store: FleetStore;
  webhookUrl: string;
  webhookSecret: string;
  apiKey: string;
  applyDelayMs: number;
  now?: () => number;
  /** Delivers webhooks; defaults to the store's `deliver` (globalThis.fetch unless injected). */
  fetch?: FleetSimulationConfig["deliver"];
}

type Params = { deviceId: string };

const error = (status: number, body: ErrorBody & Record<string, unknown>, headers?: HeadersInit) =>
  HttpResponse.json(body, { status, headers });

async function readJson<T>(request: Request, schema: z.ZodType<T>, emptyAs?: unknown): Promise<{ ok: true; data: T } | { ok: false; response: Response }> {
  const text = await request.text();
  let raw: unknown;
  try {
    raw = text.trim() === "" && emptyAs !== undefined ? emptyAs : JSON.parse(text);
  } catch {
    return { ok: false, response: error(400, { error: "invalid_json", message: "Request body is not JSON" }) };
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    return {
      ok: false,
      response: error(400, { error: "invalid_request", message: z.prettifyError(parsed.error) }),
    };
  }
  return { ok: true, data: parsed.data };
}

export function createFleetHandlers(options: FleetHandlersOptions): HttpHandler[] {
  const { store, apiKey } = options;
  store.configure({
    webhookUrl: options.webhookUrl,
    webhookSecret: options.webhookSecret,
    applyDelayMs: options.applyDelayMs,
    now: options.now,
    deliver: options.fetch,
  });

  /**
   * Wraps an API route with the infrastructure faults (they strike before the
   * service looks at the request, as a load balancer or gateway would) and auth.
   */
  function api(deviceIdOf: (params: Params) => string | null, handle: (request: Request, params: Params) => Promise<Response>) {
    return async ({ request, params }: { request: Request; params: Params }): Promise<Response> => {
      const faults = store.takeRequestFaults(deviceIdOf(params));
      if (faults.latencyMs > 0) await store.wait(faults.latencyMs, request.signal);
      if (faults.hang && !faults.hang.afterProcessing) {
        await store.wait(faults.hang.ms, request.signal);
        return error(504, { error: "gateway_timeout", message: "Upstream did not answer" });
      }
      if (faults.serverError) {
        return error(faults.serverError.status, { error: "unavailable", message: "Fleet service temporarily unavailable" });
      }
      if (faults.rateLimit) {
        const { retryAfterSeconds, format } = faults.rateLimit;
        const retryAfter =
          format === "http-date" ? new Date(store.now() + retryAfterSeconds * 1000).toUTCString() : String(retryAfterSeconds);
        return error(429, { error: "rate_limited", message: "Too many requests" }, { "retry-after": retryAfter });
      }
      if (request.headers.get("authorization") !== `Bearer ${apiKey}`) {
        return error(401, { error: "unauthorized", message: "Missing or invalid API key" });
      }
      if (faults.malformed) {
        return faults.malformed.kind === "truncated"
          ? new HttpResponse('{"device":{"deviceId":', { status: 200, headers: { "content-type": "application/json" } })
          : HttpResponse.json({ result: "ok", items: "not-a-list" });
      }
      const response = await handle(request, params);
      if (faults.hang?.afterProcessing) {
        await store.wait(faults.hang.ms, request.signal);
        return error(504, { error: "gateway_timeout", message: "Upstream did not answer" });
      }
      return response;
    };
  }

  const noDevice = () => null;
  const byDevice = (params: Params) => params.deviceId;
  const notFound = (deviceId: string) => error(404, { error: "not_found", message: `No device ${deviceId}` });

  function idempotencyKey(request: Request): string | Response {
    const key = request.headers.get(IDEMPOTENCY_KEY_HEADER)?.trim();
    if (!key || key.length > 255) {
      return error(400, { error: "idempotency_key_required", message: `${IDEMPOTENCY_KEY_HEADER} header (1–255 characters) is required` });
    }
    return key;
  }

  const keyReused = () =>
    error(400, {
      error: "idempotency_key_reused",
      message: "This Idempotency-Key was already used with a different request body",
    });

  return [
    // --- the API ------------------------------------------------------------
    http.get<Params>(
      "*/v1/devices",
      api(noDevice, async (request) => {
        const url = new URL(request.url);
        const query = listDevicesQuerySchema.safeParse({
          cursor: url.searchParams.get("cursor") || undefined,
          limit: url.searchParams.get("limit") || undefined,
        });
        if (!query.success) return error(400, { error: "invalid_request", message: z.prettifyError(query.error) });
        const page = store.listDevices(query.data.cursor, query.data.limit ?? DEVICE_PAGE_DEFAULT_LIMIT);
        if (!page) return error(400, { error: "invalid_cursor", message: "Unknown cursor" });
        return HttpResponse.json(page);
      }),
    ),

    http.get<Params>(
      "*/v1/devices/:deviceId",
      api(byDevice, async (_request, { deviceId }) => {
        const state = store.deviceState(deviceId);
        return state ? HttpResponse.json(state) : notFound(deviceId);
      }),
    ),

    http.put<Params>(
      "*/v1/devices/:deviceId/desired",
      api(byDevice, async (request, { deviceId }) => {
        const key = idempotencyKey(request);
        if (key instanceof Response) return key;
        if (!store.getDevice(deviceId)) return notFound(deviceId);
        const body = await readJson(request, putDesiredRequestSchema);
        if (!body.ok) return body.response;
        const result = store.putDesired(deviceId, body.data, key);
        switch (result.kind) {
          case "accepted":
            return HttpResponse.json({ version: result.version, accepted: true, duplicate: result.duplicate }, { status: 202 });
          case "conflict":
            return error(409, {
              error: "version_conflict",
              currentVersion: result.currentVersion,
              message: `Desired version is ${result.currentVersion}`,
            });
          case "unsupported":
            return error(422, { error: "unsupported", reasons: result.reasons });
          case "key-reused":
            return keyReused();
          case "not-found":
            return notFound(deviceId);
        }
      }),
    ),

    http.get<Params>(
      "*/v1/devices/:deviceId/firmware",
      api(byDevice, async (_request, { deviceId }) => {
        const firmware = store.getFirmware(deviceId);
        return firmware ? HttpResponse.json(firmware) : notFound(deviceId);
      }),
    ),

    http.post<Params>(
      "*/v1/devices/:deviceId/firmware-updates",
      api(byDevice, async (request, { deviceId }) => {
        const key = idempotencyKey(request);
        if (key instanceof Response) return key;
        if (!store.getDevice(deviceId)) return notFound(deviceId);
        const body = await readJson(request, firmwareUpdateRequestSchema);
        if (!body.ok) return body.response;
        const result = store.scheduleFirmwareUpdate(deviceId, body.data, key);
        switch (result.kind) {
          case "accepted":
            return HttpResponse.json({ updateId: result.updateId }, { status: 202 });
          case "unsupported":
            return error(422, { error: "unsupported", reasons: result.reasons });
          case "key-reused":
            return keyReused();
          case "not-found":
            return notFound(deviceId);
        }
      }),
    ),

    http.get<Params>(
      "*/v1/devices/:deviceId/logs",
      api(byDevice, async (_request, { deviceId }) => {
        const text = store.logs(deviceId);
        return text === undefined ? notFound(deviceId) : HttpResponse.text(text);
      }),
    ),

    // --- control endpoints of the fake (no auth: local only) -----------------
    http.post("*/__fleet/faults", async ({ request }) => {
      const body = await readJson(request, setFaultsBodySchema);
      if (!body.ok) return body.response;
      const { deviceId, ...spec } = body.data;
      if (deviceId && !store.getDevice(deviceId)) return notFound(deviceId);
      store.setFaults(spec, deviceId);
      return HttpResponse.json({ faults: store.faults() });
    }),

    http.delete("*/__fleet/faults", async ({ request }) => {
      const body = await readJson(request, clearFaultsBodySchema, {});
      if (!body.ok) return body.response;
      store.clearFaults(body.data.deviceId);
      return HttpResponse.json({ faults: store.faults() });
    }),

    http.post<Params>("*/__fleet/devices/:deviceId/online", async ({ request, params }) => {
      const body = await readJson(request, z.object({ online: z.boolean() }));
      if (!body.ok) return body.response;
      const device = store.setOnline(params.deviceId, body.data.online);
      return device ? HttpResponse.json({ deviceId: device.deviceId, online: device.online }) : notFound(params.deviceId);
    }),

    http.post<Params>("*/__fleet/devices/:deviceId/tamper", async ({ request, params }) => {
      const body = await readJson(request, tamperChangesSchema, {});
      if (!body.ok) return body.response;
      const result = store.tamper(params.deviceId, body.data);
      if (result.kind === "not-found") return notFound(params.deviceId);
      if (result.kind === "no-config") {
        return error(409, { error: "no_reported_config", message: "The device has not applied any configuration yet" });
      }
      return HttpResponse.json({ deviceId: params.deviceId, reported: store.deviceState(params.deviceId)?.reported });
    }),

    http.get("*/__fleet/state", () => HttpResponse.json(store.snapshot())),

    http.post("*/__fleet/reset", () => {
      store.reset();
      return HttpResponse.json({ ok: true });
    }),
  ];
}
