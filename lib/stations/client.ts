import { z } from "zod";
import {
  STATION_SEARCH_DEFAULT_LIMIT,
  searchStationsResponseSchema,
  stationErrorBodySchema,
  type SearchStationsResponse,
} from "@/lib/stations/api-schema";

// Client for the station directory. Search is interactive (someone is typing in a
// dialog), so there are no retries: a failure surfaces at once with a message the
// dialog can show, and the person simply searches again.

export type StationDirectoryErrorCode =
  | "stations:timeout"
  | "stations:unavailable"
  | "stations:rate-limited"
  | "stations:rejected"
  | "stations:bad-response";

const MESSAGES: Record<StationDirectoryErrorCode, string> = {
  "stations:timeout": "The station directory did not answer in time. Try again in a moment.",
  "stations:unavailable": "The station directory is unavailable right now. Try again later.",
  "stations:rate-limited": "Too many station searches at once. Wait a few seconds and try again.",
  "stations:rejected": "The station directory refused this search.",
  "stations:bad-response": "The station directory sent an answer we could not read.",
};

export class StationDirectoryError extends Error {
  readonly code: StationDirectoryErrorCode;
  readonly status: number | null;
  readonly retryAfterMs: number | null;
  /** What went wrong in technical terms, for logs; `message` is for people. */
  readonly detail: string;

  constructor(init: {
    code: StationDirectoryErrorCode;
    detail: string;
    status?: number | null;
    retryAfterMs?: number | null;
    cause?: unknown;
  }) {
    super(MESSAGES[init.code], init.cause === undefined ? undefined : { cause: init.cause });
    this.name = "StationDirectoryError";
    this.code = init.code;
    this.detail = init.detail;
    this.status = init.status ?? null;
    this.retryAfterMs = init.retryAfterMs ?? null;
  }
}

export interface StationDirectoryClientOptions {
  baseUrl: string;
  apiKey?: string;
  fetch?: typeof globalThis.fetch;
  timeoutMs?: number;
}

export interface SearchStationsInput {
  query?: string;
  genre?: string;
  limit?: number;
  signal?: AbortSignal;
}

export interface StationDirectoryClient {
  searchStations(input: SearchStationsInput): Promise<SearchStationsResponse>;
}

function retryAfterMs(value: string | null): number | null {
  if (value === null) return null;
  if (/^\d+$/.test(value.trim())) return Number(value.trim()) * 1000;
  const date = Date.parse(value);
  return Number.isNaN(date) ? null : Math.max(0, date - Date.now());
}

export function createStationDirectoryClient(options: StationDirectoryClientOptions): StationDirectoryClient {
  const baseUrl = options.baseUrl.replace(/\/+$/, "");
  const doFetch = options.fetch ?? ((input, init) => globalThis.fetch(input, init));
  const timeoutMs = options.timeoutMs ?? 5000;

  return {
    async searchStations({ query, genre, limit = STATION_SEARCH_DEFAULT_LIMIT, signal }) {
      const search = new URLSearchParams();
      if (query?.trim()) search.set("q", query.trim());
      if (genre?.trim()) search.set("genre", genre.trim());
      search.set("limit", String(limit));
      const url = `${baseUrl}/v1/stations?${search}`;

      const timeout = AbortSignal.timeout(timeoutMs);
      const combined = signal ? AbortSignal.any([signal, timeout]) : timeout;
      let status: number;
      let headers: Headers;
      let text: string;
      try {
        const response = await doFetch(url, {
          headers: {
            accept: "application/json",
            ...(options.apiKey ? { authorization: `Bearer ${options.apiKey}` } : {}),
          },
          signal: combined,
        });
        status = response.status;
        headers = response.headers;
        text = await response.text();
      } catch (error) {
        if (signal?.aborted) throw signal.reason ?? error;
        if (timeout.aborted) {
          throw new StationDirectoryError({ code: "stations:timeout", detail: `no answer within ${timeoutMs} ms`, cause: error });
        }
        const reason = error instanceof Error ? error.message : String(error);
        throw new StationDirectoryError({ code: "stations:unavailable", detail: `network error: ${reason}`, cause: error });
      }

      if (status < 200 || status >= 300) {
        let detail = `HTTP ${status}`;
        try {
          const body = stationErrorBodySchema.safeParse(JSON.parse(text));
          if (body.success) detail += `: ${body.data.message ?? body.data.error}`;
        } catch {
          // A non-JSON error body adds nothing we can use.
        }
        const code: StationDirectoryErrorCode =
          status === 429 ? "stations:rate-limited" : status >= 500 ? "stations:unavailable" : "stations:rejected";
        throw new StationDirectoryError({ code, detail, status, retryAfterMs: retryAfterMs(headers.get("retry-after")) });
      }

      let json: unknown;
      try {
        json = JSON.parse(text);
      } catch (error) {
        throw new StationDirectoryError({ code: "stations:bad-response", detail: "body is not JSON", status, cause: error });
      }
      const parsed = searchStationsResponseSchema.safeParse(json);
      if (!parsed.success) {
        const issues = parsed.error.issues
          .slice(0, 3)
          .map((i) => `${i.path.join(".") || "(root)"}: ${i.message}`)
          .join("; ");
        throw new StationDirectoryError({ code: "stations:bad-response", detail: issues, status, cause: parsed.error });
      }
      return parsed.data;
    },
  };
}

// Read here until lib/env.ts takes over; empty strings count as unset.
const stationDirectoryEnvSchema = z.object({
  STATIONS_BASE_URL: z.url().default("http://127.0.0.1:4020"),
  STATIONS_API_KEY: z.string().min(1).optional(),
  STATIONS_TIMEOUT_MS: z.coerce.number().int().min(100).max(60_000).default(5000),
});

export function readStationDirectoryEnv(env: Record<string, string | undefined> = process.env) {
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = stationDirectoryEnvSchema.safeParse(present);
  if (!parsed.success) throw new Error(`Invalid station directory environment:\n${z.prettifyError(parsed.error)}`);
  return parsed.data;
}

let defaultClient: { key: string; client: StationDirectoryClient } | null = null;

/** One search against the directory configured by the environment. */
export function searchStations(input: SearchStationsInput): Promise<SearchStationsResponse> {
  const env = readStationDirectoryEnv();
  const key = JSON.stringify(env);
  if (defaultClient?.key !== key) {
    defaultClient = {
      key,
      client: createStationDirectoryClient({
        baseUrl: env.STATIONS_BASE_URL,
        apiKey: env.STATIONS_API_KEY,
        timeoutMs: env.STATIONS_TIMEOUT_MS,
      }),
    };
  }
  return defaultClient.client.searchStations(input);
}
