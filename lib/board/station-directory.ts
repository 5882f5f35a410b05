import "server-only";
import { AppError } from "@/lib/errors";
import type { SearchStationsResponse } from "@/lib/stations/api-schema";
import { searchStations, StationDirectoryError } from "@/lib/stations/client";

// The station directory as the board uses it: the client from lib/stations
// (configured by STATIONS_BASE_URL), its failures turned into AppErrors whose
// messages the preset dialog shows as they are.

export async function findStations(input: { query: string; genre: string; limit?: number }): Promise<SearchStationsResponse> {
  try {
    return await searchStations({ query: input.query, genre: input.genre, limit: input.limit ?? 20 });
  } catch (error) {
    if (!(error instanceof StationDirectoryError)) throw error;
    console.warn(`[stations] ${error.code}: ${error.detail}`);
    const code =
      error.code === "stations:timeout" ? "stations:timeout" : error.code === "stations:rate-limited" ? "stations:rate-limited" : "stations:unavailable";
    throw new AppError(code, {
      message: error.message,
      details: { reason: error.code, ...(error.retryAfterMs !== null ? { retryAfterMs: error.retryAfterMs } : {}) },
    });
  }
}
