import { setupServer } from "msw/node";
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { stationSchema } from "@/lib/stations/api-schema";
import { createStationDirectoryClient, searchStations, StationDirectoryError } from "@/lib/stations/client";
import { stationCatalogue } from "@/mocks/stations/catalogue";
import { createStationHandlers } from "@/mocks/stations/handlers";
import { createStationDirectoryState } from "@/mocks/stations/state";

const baseUrl = "https://stations.test";
const state = createStationDirectoryState();
const server = setupServer(...createStationHandlers({ state }));
const client = createStationDirectoryClient({ baseUrl, timeoutMs: 1000 });

async function catchStationError(promise: Promise<unknown>): Promise<StationDirectoryError> {
  const error = await promise.then(
    () => {
      throw new Error("expected a StationDirectoryError");
    },
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(StationDirectoryError);
  return error as StationDirectoryError;
}

const setFaults = (body: object) =>
  fetch(`${baseUrl}/__stations/faults`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });

beforeAll(() => server.listen({ onUnhandledRequest: "error" }));
afterEach(() => {
  state.clearFaults();
  vi.unstubAllEnvs();
});
afterAll(() => {
  state.dispose();
  server.close();
});

describe("invented station catalogue", () => {
  it("has about forty valid, unique stations, all streaming from example.net", () => {
    expect(stationCatalogue.length).toBeGreaterThanOrEqual(38);
    for (const station of stationCatalogue) {
      expect(stationSchema.parse(station)).toEqual(station);
      expect(new URL(station.streamUrl).hostname.endsWith("example.net")).toBe(true);
      if (station.homepageUrl) expect(new URL(station.homepageUrl).hostname.endsWith("example.net")).toBe(true);
    }
    expect(new Set(stationCatalogue.map((s) => s.id)).size).toBe(stationCatalogue.length);
    expect(new Set(stationCatalogue.map((s) => s.name)).size).toBe(stationCatalogue.length);
  });
});

describe("station directory client", () => {
  it("searches by text, genre and limit and parses the results", async () => {
    const jazz = await client.searchStations({ query: "jazz" });
    expect(jazz.stations.map((s) => s.name)).toContain("Harbor Lantern Jazz");
    expect(jazz.stations.every((s) => `${s.name} ${s.genre} ${s.tags.join(" ")}`.toLowerCase().includes("jazz"))).toBe(true);
    expect(jazz.total).toBe(jazz.stations.length);

    const classical = await client.searchStations({ genre: "classical", limit: 3 });
    expect(classical.stations).toHaveLength(3);
    expect(classical.total).toBe(stationCatalogue.filter((s) => s.genre === "classical").length);
    expect(classical.stations.every((s) => s.genre === "classical")).toBe(true);

    const both = await client.searchStations({ query: "piano", genre: "classical" });
    expect(both.stations.map((s) => s.name)).toEqual(["Quiet Quarry Piano"]);

    const none = await client.searchStations({ query: "zzz-no-such-station" });
    expect(none).toEqual({ stations: [], total: 0 });
  });

  it("ranks name matches first", async () => {
    const result = await client.searchStations({ query: "rock" });
    // Two have "rock" in the name; the punk station only by genre.
    expect(result.stations.map((s) => s.name)).toEqual(["Amber Signal Rock", "Kestrel Desert Rock", "Cinder Block Punk"]);
  });

  it("maps 5xx to stations:unavailable with a readable message", async () => {
    await setFaults({ serverErrors: { count: 1, status: 502 } });
    const error = await catchStationError(client.searchStations({ query: "folk" }));
    expect(error).toMatchObject({ code: "stations:unavailable", status: 502 });
    expect(error.message).toBe("The station directory is unavailable right now. Try again later.");
    expect(error.detail).toContain("Directory index is rebuilding");
    // The fault was for one call only.
    await expect(client.searchStations({ query: "folk" })).resolves.toMatchObject({ total: 3 });
  });

  it("maps a hanging directory to stations:timeout", async () => {
    await setFaults({ hang: { ms: 10_000, calls: 1 } });
    const started = Date.now();
    const error = await catchStationError(createStationDirectoryClient({ baseUrl, timeoutMs: 120 }).searchStations({ query: "jazz" }));
    expect(error.code).toBe("stations:timeout");
    expect(error.message).toBe("The station directory did not answer in time. Try again in a moment.");
    expect(Date.now() - started).toBeLessThan(5000);
  });

  it("maps a malformed body to stations:bad-response", async () => {
    await setFaults({ malformed: { count: 1, kind: "wrong-shape" } });
    const shape = await catchStationError(client.searchStations({ query: "jazz" }));
    expect(shape.code).toBe("stations:bad-response");
    expect(shape.message).toBe("The station directory sent an answer we could not read.");
    expect(shape.detail).toMatch(/stations\.0\.|total/);

    await setFaults({ malformed: { count: 1, kind: "truncated" } });
    const truncated = await catchStationError(client.searchStations({ query: "jazz" }));
    expect(truncated.code).toBe("stations:bad-response");
    expect(truncated.detail).toBe("body is not JSON");
  });

  it("maps 429 to stations:rate-limited with the Retry-After", async () => {
    await setFaults({ rateLimit: { count: 1, retryAfterSeconds: 4 } });
    const error = await catchStationError(client.searchStations({ query: "jazz" }));
    expect(error).toMatchObject({ code: "stations:rate-limited", status: 429, retryAfterMs: 4000 });
  });

  it("adds latency when asked, and still answers", async () => {
    await setFaults({ latencyMs: 80 });
    const started = Date.now();
    await client.searchStations({ query: "lounge" });
    expect(Date.now() - started).toBeGreaterThanOrEqual(75);
  });

  it("maps an unreachable directory to stations:unavailable", async () => {
    const down = createStationDirectoryClient({
      baseUrl,
      fetch: async () => {
        throw new TypeError("fetch failed");
      },
    });
    const error = await catchStationError(down.searchStations({ query: "jazz" }));
    expect(error).toMatchObject({ code: "stations:unavailable", status: null });
  });

  it("searchStations() uses the directory configured by the environment", async () => {
    vi.stubEnv("STATIONS_BASE_URL", baseUrl);
    vi.stubEnv("STATIONS_TIMEOUT_MS", "1500");
    const result = await searchStations({ query: "tortoise" });
    expect(result.stations.map((s) => s.name)).toEqual(["Sleepy Tortoise Lo-Fi"]);
    vi.stubEnv("STATIONS_BASE_URL", "not a url");
    expect(() => searchStations({ query: "x" })).toThrow(/STATIONS_BASE_URL/);
  });
});
