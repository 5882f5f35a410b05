/**
 * Tone-curve schemas shared by forms, actions, route handlers and the
 * JSON/CSV import in lib/audio/tone-curve.ts. Q is linear for every band type
 * (lib/audio/biquad.ts converts it to the Web Audio spec's dB Q for the
 * high-pass/low-pass); shelves ignore it.
 */

import { z } from "zod";

export const TONE_BAND_TYPES = ["peaking", "lowshelf", "highshelf", "highpass", "lowpass", "notch"] as const;

export const TONE_LIMITS = {
  minFrequencyHz: 10,
  maxFrequencyHz: 24_000,
  minGainDb: -24,
  maxGainDb: 12,
  minQ: 0.1,
  maxQ: 20,
  defaultMaxBands: 10,
} as const;

export const toneBandTypeSchema = z.enum(TONE_BAND_TYPES, {
  error: `Type must be one of: ${TONE_BAND_TYPES.join(", ")}.`,
});

export const toneBandSchema = z.object({
  type: toneBandTypeSchema,
  frequencyHz: z
    .number({ error: "Frequency must be a number." })
    .min(TONE_LIMITS.minFrequencyHz, `Frequency must be at least ${TONE_LIMITS.minFrequencyHz} Hz.`)
    .max(TONE_LIMITS.maxFrequencyHz, `Frequency must be at most ${TONE_LIMITS.maxFrequencyHz} Hz.`),
  gainDb: z
    .number({ error: "Gain must be a number." })
    .min(TONE_LIMITS.minGainDb, `Gain must be at least ${TONE_LIMITS.minGainDb} dB.`)
    .max(TONE_LIMITS.maxGainDb, `Gain must be at most +${TONE_LIMITS.maxGainDb} dB.`),
  q: z
    .number({ error: "Q must be a number." })
    .min(TONE_LIMITS.minQ, `Q must be at least ${TONE_LIMITS.minQ}.`)
    .max(TONE_LIMITS.maxQ, `Q must be at most ${TONE_LIMITS.maxQ}.`),
  enabled: z.boolean({ error: "Enabled must be true or false." }).optional(),
});

export type ToneBandInput = z.input<typeof toneBandSchema>;
export type ToneBand = z.output<typeof toneBandSchema>;

export function makeToneCurveSchema(maxBands: number = TONE_LIMITS.defaultMaxBands) {
  return z.object({
    bands: z.array(toneBandSchema).max(maxBands, `A tone curve has at most ${maxBands} bands.`),
  });
}

export const toneCurveSchema = makeToneCurveSchema();

export type ToneCurve = z.output<typeof toneCurveSchema>;
