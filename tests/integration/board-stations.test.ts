import { setupServer } from "msw/node";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { GET as stationsRoute } from "@/app/api/stations/route";
import { POST as createPresetRoute } from "@/app/api/zones/[zoneId]/presets/route";
import type { BoardWriteResult } from "@/lib/board/types";
import type { SearchStationsResponse } from "@/lib/stations/api-schema";
import { createStationHandlers } from "@/mocks/stations/handlers";
import { createStationDirectoryState, type StationFaultSpec } from "@/mocks/stations/state";
import { query } from "./helpers/database";
import { as, zoneByName } from "./helpers/board";
import { callRoute, people } from "./helpers/http";

// The station directory is faked with the same msw handlers as the local fake
// server (mocks/stations), intercepting the route handler's real fetch.

const state = createStationDirectoryState();
const server = setupServer(...createStationHandlers({ state }));

beforeAll(() => server.listen({ onUnhandledRequest: "bypass" }));
beforeEach(() => {
  vi.stubEnv("STATIONS_BASE_URL", "https://stations.test");
  vi.stubEnv("STATIONS_TIMEOUT_MS", "300");
});
afterEach(() => {
  state.clearFaults();
  vi.unstubAllEnvs();
});
afterAll(() => {
  state.dispose();
  server.close();
});

function search(email: string, qs: string) {
  return as(email, stationsRoute, { path: `/api/stations?${qs}` });
}

async function savedState() {
  const [row] = await query<{ presets: number; audits: number }>(
    "select (select count(*)::int from stream_presets) as presets, (select count(*)::int from audit_events) as audits",
  );
  return row;
}

describe("GET /api/stations (station directory)", () => {
  it("finds stations by name and by genre", async () => {
    const byName = await search(people.integrator, "q=lantern");
    expect(byName.status).toBe(200);
    const names = (byName.json as unknown as SearchStationsResponse).stations.map((s) => s.name);
    expect(names).toContain("Harbor Lantern Jazz");
    const byGenre = await search(people.installer, "genre=classical");
    const found = byGenre.json as unknown as SearchStationsResponse;
    expect(found.stations.length).toBeGreaterThan(3);
    expect(found.stations.every((s) => s.genre === "classical" || s.tags.includes("classical"))).toBe(true);
  });

  it("adds the chosen station as a preset", async () => {
    const found = (await search(people.integrator, "q=cloudberry")).json as unknown as SearchStationsResponse;
    const chosen = found.stations[0];
    const zone = await zoneByName("Brightwater loft", "Bedroom");
    const res = await as(people.integrator, createPresetRoute, {
      method: "POST",
      path: `/api/zones/${zone.id}/presets`,
      params: { zoneId: zone.id },
      body: { version: zone.version, name: chosen.name, streamUrl: chosen.streamUrl, genre: chosen.genre, directoryId: chosen.id, loudnessOffsetDb: 0, toneCurveId: null },
    });
    expect(res.status).toBe(201);
    expect((res.json as unknown as BoardWriteResult).zones[0].presets.at(-1)).toMatchObject({ name: chosen.name, directoryId: chosen.id, streamUrl: chosen.streamUrl });
  });

  it.each<[string, StationFaultSpec, number, string, RegExp]>([
    ["the directory fails (503)", { serverErrors: { count: 1, status: 503 } }, 502, "stations:unavailable", /unavailable right now/],
    ["the directory rate-limits", { rateLimit: { count: 1, retryAfterSeconds: 2 } }, 429, "stations:rate-limited", /Too many station searches/],
    ["the directory answers garbage", { malformed: { count: 1, kind: "wrong-shape" } }, 502, "stations:unavailable", /could not read/],
    ["the directory answers truncated JSON", { malformed: { count: 1, kind: "truncated" } }, 502, "stations:unavailable", /could not read/],
  ])("when %s: a clear message and nothing saved", async (_label, faults, status, code, message) => {
    const before = await savedState();
    state.setFaults(faults);
    const res = await search(people.integrator, "q=jazz");
    expect(res.status).toBe(status);
    expect(res.json.error?.code).toBe(code);
    expect(res.json.error?.message).toMatch(message);
    expect(await savedState()).toEqual(before);
  });

  it("when the directory does not answer in time: a timeout message within the configured timeout, nothing saved", async () => {
    const before = await savedState();
    state.setFaults({ hang: { ms: 10_000, calls: 1 } });
    const started = Date.now();
    const res = await search(people.integrator, "q=jazz");
    expect(Date.now() - started).toBeLessThan(3000);
    expect(res.status).toBe(504);
    expect(res.json.error?.code).toBe("stations:timeout");
    expect(res.json.error?.message).toMatch(/did not answer in time/);
    expect(await savedState()).toEqual(before);
    // The next search works again.
    expect((await search(people.integrator, "q=jazz")).status).toBe(200);
  });

  it("refuses people who may not edit zones, and an empty search", async () => {
    expect((await search(people.support, "q=jazz")).status).toBe(403);
    expect((await search(people.homeowner, "q=jazz")).status).toBe(403);
    expect((await callRoute(stationsRoute, { path: "/api/stations?q=jazz" })).status).toBe(401);
    const empty = await search(people.integrator, "q=%20&genre=");
    expect(empty.status).toBe(400);
    expect(empty.json.error?.fieldErrors?.q?.[0]).toMatch(/station name or a genre/);
  });
});
