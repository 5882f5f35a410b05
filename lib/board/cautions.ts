import { computeHeadroom } from "@/lib/audio/headroom";
import { largestBoostDb, type ToneBand } from "@/lib/audio/tone-curve";

// Cautions on the zone board: short warnings, never blockers. Pure, so the
// board, the dialogs and the tests compute them the same way.

/**
 * Above this volume ceiling the board shows a hearing and speaker caution.
 * 80 % is a rule of thumb (common practice, no source): a device's volume
 * percentage does not map to a sound level, which depends on the amplifier,
 * the speakers and the room.
 */
export const VOLUME_CEILING_CAUTION_PERCENT = 80;

export const HEARING_NOTE =
  "Sustained levels above about 85 dBA carry a risk of hearing damage (NIOSH recommended exposure limit: 85 dBA over 8 hours), and high levels can damage speakers. Set ceilings with the room and the speakers in mind.";

export function volumeCeilingCaution(ceilingPercent: number): string | null {
  if (!(ceilingPercent > VOLUME_CEILING_CAUTION_PERCENT)) return null;
  return `A ceiling above ${VOLUME_CEILING_CAUTION_PERCENT} % can be loud enough to damage hearing and speakers. ${HEARING_NOTE}`;
}

const boostCache = new Map<string, number>();

function bandsKey(bands: readonly ToneBand[]) {
  return bands.map((b) => `${b.type}:${b.frequencyHz}:${b.gainDb}:${b.q}:${b.enabled !== false}`).join("|");
}

/**
 * Largest boost of a zone's tone curve and a source's (or preset's) tone curve
 * in series: biquads in series multiply, so their dB responses add, and the
 * combined curve's largest boost is what a peak can be raised by.
 * Memoised by band content: a board shows a handful of distinct curve pairs.
 */
export function chainBoostDb(zoneBands: readonly ToneBand[] | null, cardBands: readonly ToneBand[] | null): number {
  const bands = [...(zoneBands ?? []), ...(cardBands ?? [])];
  if (bands.length === 0) return 0;
  const key = bandsKey(bands);
  let boost = boostCache.get(key);
  if (boost === undefined) {
    boost = largestBoostDb(bands);
    if (boostCache.size > 500) boostCache.clear();
    boostCache.set(key, boost);
  }
  return boost;
}

export interface ClipCaution {
  predictedPeakDbtp: number;
  suggestedPreAttenuationDb: number;
  /** True when the peak comes from a measured level-match clip, false when full scale is assumed. */
  measured: boolean;
  message: string;
}

/**
 * Could a source or preset clip? Its loudness offset plus the largest boost of
 * its tone-curve chain, on top of its peak: the measured true peak of its
 * latest level-match clip when there is one, otherwise a master peaking at
 * full scale (0 dBTP, a conservative assumption: common practice, no source).
 * Arithmetic in lib/audio/headroom.ts.
 */
export function clipCaution(input: {
  loudnessOffsetDb: number;
  chainBoostDb: number;
  truePeakDbtp: number | null;
}): ClipCaution | null {
  const measured = input.truePeakDbtp !== null && Number.isFinite(input.truePeakDbtp);
  const result = computeHeadroom({
    truePeakDbtp: measured ? input.truePeakDbtp! : 0,
    loudnessOffsetDb: input.loudnessOffsetDb,
    largestBoostDb: Math.max(0, input.chainBoostDb),
  });
  if (!result.warning) return null;
  const peak = `${formatDb(result.predictedPeakDbtp)} dBTP`;
  const basis = measured ? "from its measured clip" : "if the material peaks at full scale";
  return {
    predictedPeakDbtp: result.predictedPeakDbtp,
    suggestedPreAttenuationDb: result.suggestedPreAttenuationDb,
    measured,
    message: `Could clip: peaks may reach ${peak} ${basis}. Lower the offset or the boost by ${formatDb(result.suggestedPreAttenuationDb, false)} dB; clipping is harsh on ears and speakers.`,
  };
}

/** Signed dB with one decimal, e.g. "+3.5", "−2", "0". */
export function formatDb(value: number, signed = true): string {
  const rounded = Math.round(value * 10) / 10;
  const text = Number.isInteger(rounded) ? String(Math.abs(rounded)) : Math.abs(rounded).toFixed(1);
  if (!signed) return text;
  if (rounded > 0) return `+${text}`;
  if (rounded < 0) return `−${text}`;
  return "0";
}
