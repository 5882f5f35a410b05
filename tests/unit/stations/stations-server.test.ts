import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createStationDirectoryClient } from "@/lib/stations/client";
import { startStationsServer, type RunningStationsServer } from "@/mocks/stations-server";

// The station directory fake as a real HTTP server; no msw interception in this file.

let running: RunningStationsServer;
beforeAll(async () => {
  running = await startStationsServer({ port: 0, apiKey: "stations-key" });
});
afterAll(() => running?.close());

describe("startStationsServer", () => {
  it("answers searches over real HTTP, checks the key and takes faults", async () => {
    const client = createStationDirectoryClient({ baseUrl: running.url, apiKey: "stations-key", timeoutMs: 2000 });
    const result = await client.searchStations({ query: "harbor" });
    expect(result.stations.map((s) => s.name)).toEqual(["Harbor Lantern Jazz"]);

    await expect(
      createStationDirectoryClient({ baseUrl: running.url, apiKey: "wrong" }).searchStations({ query: "jazz" }),
    ).rejects.toMatchObject({ code: "stations:rejected", status: 401 });

    const fault = await fetch(`${running.url}/__stations/faults`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ serverErrors: { count: 1 } }),
    });
    expect(fault.status).toBe(200);
    await expect(client.searchStations({ query: "jazz" })).rejects.toMatchObject({ code: "stations:unavailable", status: 503 });
    const jazz = running.state.stations.filter((s) => s.genre === "jazz" || s.name.toLowerCase().includes("jazz"));
    await expect(client.searchStations({ query: "jazz" })).resolves.toMatchObject({ total: jazz.length });
  });
});
