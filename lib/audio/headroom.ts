/**
 * Headroom check for one source through one zone: the source's measured true
 * peak, raised by its loudness offset and by the tone curve's largest boost,
 * against a ceiling (0 dBFS by default).
 *
 * Our own arithmetic, deliberately conservative: it assumes the clip's peak
 * can fall at the boosted frequency, so the sum is an upper bound. The
 * suggested pre-attenuation is rounded up to the step so it always suffices.
 */

export interface HeadroomInput {
  readonly truePeakDbtp: number;
  readonly loudnessOffsetDb: number;
  /** From tone-curve `largestBoostDb` (>= 0). */
  readonly largestBoostDb: number;
}

export interface HeadroomOptions {
  /** Default 0 dBTP (digital full scale). */
  readonly ceilingDbtp?: number;
  /** Rounding step for the suggestion; default 0.5 dB. */
  readonly stepDb?: number;
}

export interface HeadroomResult {
  readonly predictedPeakDbtp: number;
  /** ceiling - predicted peak; negative means the chain would clip. */
  readonly headroomDb: number;
  readonly warning: boolean;
  /** Attenuation (>= 0 dB) to put before the boost so the peak stays under the ceiling. */
  readonly suggestedPreAttenuationDb: number;
}

export function computeHeadroom(input: HeadroomInput, opts: HeadroomOptions = {}): HeadroomResult {
  const ceiling = opts.ceilingDbtp ?? 0;
  const step = opts.stepDb ?? 0.5;
  if (!(step > 0)) throw new RangeError(`step must be > 0, got ${step}`);
  if (!(input.largestBoostDb >= 0)) throw new RangeError("largestBoostDb must be >= 0");
  if (!Number.isFinite(input.loudnessOffsetDb)) throw new RangeError("loudnessOffsetDb must be finite");
  // A silent clip (true peak -Infinity) has all the headroom there is.
  const predictedPeakDbtp = input.truePeakDbtp + input.loudnessOffsetDb + input.largestBoostDb;
  const headroomDb = ceiling - predictedPeakDbtp;
  const warning = predictedPeakDbtp > ceiling;
  // Round the excess up to the step (small epsilon so 1.0000000001 is not 1.5).
  const suggestedPreAttenuationDb = warning ? Math.ceil((predictedPeakDbtp - ceiling) / step - 1e-9) * step : 0;
  return { predictedPeakDbtp, headroomDb, warning, suggestedPreAttenuationDb };
}
