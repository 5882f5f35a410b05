import { http, HttpResponse, type HttpHandler } from "msw";
import { z } from "zod";
import { searchStationsQuerySchema } from "@/lib/stations/api-schema";
import { createStationDirectoryState, stationFaultSpecSchema, type StationDirectoryState } from "./state";

// msw handlers for the station directory fake. Host-agnostic (`*/`) so they serve
// setupServer in tests and the real local server (mocks/stations-server.ts) alike.

export interface StationHandlersOptions {
  state?: StationDirectoryState;
  /** When set, requests without `Authorization: Bearer <apiKey>` get 401. */
  apiKey?: string;
}

export function createStationHandlers(options: StationHandlersOptions = {}): HttpHandler[] {
  const state = options.state ?? createStationDirectoryState();

  return [
    http.get("*/v1/stations", async ({ request }) => {
      const faults = state.takeFaults();
      if (faults.latencyMs > 0) await state.wait(faults.latencyMs, request.signal);
      if (faults.hang) {
        await state.wait(faults.hang.ms, request.signal);
        return HttpResponse.json({ error: "gateway_timeout" }, { status: 504 });
      }
      if (faults.serverErrors) {
        return HttpResponse.json(
          { error: "unavailable", message: "Directory index is rebuilding" },
          { status: faults.serverErrors.status ?? 503 },
        );
      }
      if (faults.rateLimit) {
        return HttpResponse.json(
          { error: "rate_limited", message: "Slow down" },
          { status: 429, headers: { "retry-after": String(faults.rateLimit.retryAfterSeconds ?? 1) } },
        );
      }
      if (options.apiKey && request.headers.get("authorization") !== `Bearer ${options.apiKey}`) {
        return HttpResponse.json({ error: "unauthorized", message: "Missing or invalid API key" }, { status: 401 });
      }
      if (faults.malformed) {
        return faults.malformed.kind === "truncated"
          ? new HttpResponse('{"stations":[{"id":"st-0', { status: 200, headers: { "content-type": "application/json" } })
          : HttpResponse.json({ stations: [{ id: 42, title: "no name here" }], total: "many" });
      }

      const url = new URL(request.url);
      const query = searchStationsQuerySchema.safeParse({
        q: url.searchParams.get("q") ?? undefined,
        genre: url.searchParams.get("genre") || undefined,
        limit: url.searchParams.get("limit") || undefined,
      });
      if (!query.success) {
        return HttpResponse.json({ error: "invalid_request", message: z.prettifyError(query.error) }, { status: 400 });
      }
      return HttpResponse.json(state.search(query.data));
    }),

    http.post("*/__stations/faults", async ({ request }) => {
      let raw: unknown;
      try {
        raw = await request.json();
      } catch {
        return HttpResponse.json({ error: "invalid_json" }, { status: 400 });
      }
      const spec = stationFaultSpecSchema.safeParse(raw);
      if (!spec.success) {
        return HttpResponse.json({ error: "invalid_request", message: z.prettifyError(spec.error) }, { status: 400 });
      }
      state.setFaults(spec.data);
      return HttpResponse.json({ faults: state.faults() });
    }),

    http.delete("*/__stations/faults", () => {
      state.clearFaults();
      return HttpResponse.json({ faults: state.faults() });
    }),
  ];
}
