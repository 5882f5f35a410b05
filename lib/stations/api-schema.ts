import { z } from "zod";

// The station directory: a hosted API we do not own, used to find internet radio
// stations an integrator can add to a zone as stream presets.
//
//   GET {base}/v1/stations?q=&genre=&limit=  → searchStationsResponseSchema
//
// Requests may carry `Authorization: Bearer <api key>`; errors are
// `{ error, message? }` with 4xx/5xx, and 429 carries Retry-After.

export const STATION_SEARCH_DEFAULT_LIMIT = 20;
export const STATION_SEARCH_MAX_LIMIT = 50;

export const stationCodecs = ["mp3", "aac", "opus", "vorbis", "flac"] as const;

export const stationSchema = z.object({
  id: z.string().min(1),
  name: z.string().min(1),
  /** Lower-case slug, e.g. "jazz", "hip-hop". */
  genre: z.string().min(1),
  tags: z.array(z.string()),
  /** ISO 3166-1 alpha-2. */
  country: z.string().regex(/^[A-Z]{2}$/),
  bitrateKbps: z.int().min(8).max(1411),
  codec: z.enum(stationCodecs),
  streamUrl: z.url({ protocol: /^https?$/ }),
  homepageUrl: z.url().nullable(),
});

export const searchStationsQuerySchema = z.object({
  q: z.string().trim().max(100).optional(),
  genre: z.string().trim().max(40).optional(),
  limit: z.coerce.number().int().min(1).max(STATION_SEARCH_MAX_LIMIT).default(STATION_SEARCH_DEFAULT_LIMIT),
});

export const searchStationsResponseSchema = z.object({
  stations: z.array(stationSchema),
  /** Matches before the limit was applied. */
  total: z.int().min(0),
});

export const stationErrorBodySchema = z.object({
  error: z.string(),
  message: z.string().optional(),
});

export type Station = z.infer<typeof stationSchema>;
export type StationCodec = (typeof stationCodecs)[number];
export type SearchStationsQuery = z.infer<typeof searchStationsQuerySchema>;
export type SearchStationsResponse = z.infer<typeof searchStationsResponseSchema>;
