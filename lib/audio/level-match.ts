/**
 * Level matching: suggest a per-source loudness offset (trim) that brings each
 * source's measured integrated loudness to the zone's reference source, or to
 * an explicit target, and show what that does to its true peak.
 *
 * Our own arithmetic on BS.1770 measurements: offset = target - measured,
 * rounded to the trim step, clamped to the allowed trim range; predicted true
 * peak = measured true peak + applied offset (a gain change shifts every level
 * by the same dB). The default -1 dBTP ceiling option follows EBU R 128's
 * maximum permitted true peak for distribution; the default here is 0 dBTP.
 */

export interface MeasuredClip {
  readonly sourceId: string;
  /** -Infinity for a silent clip (see measureLoudness). */
  readonly integratedLufs: number;
  readonly truePeakDbtp: number;
}

export type LevelMatchTarget = { readonly referenceSourceId: string } | { readonly targetLufs: number };

export interface LevelMatchOptions {
  /** Allowed trim range in dB; default -24…+12. */
  readonly minTrimDb?: number;
  readonly maxTrimDb?: number;
  /** Rounding step in dB; default 0.5. */
  readonly stepDb?: number;
  /** Peak ceiling in dBTP for `wouldClip`; default 0. */
  readonly ceilingDbtp?: number;
}

export type LevelMatchSuggestion =
  | {
      readonly sourceId: string;
      readonly status: "ok";
      readonly measuredLufs: number;
      /** Exact difference to the target before rounding and clamping. */
      readonly exactOffsetDb: number;
      /** What to set: rounded to the step, clamped to the trim range. */
      readonly offsetDb: number;
      /** True when the clamp changed the rounded offset (the target cannot be reached). */
      readonly clamped: boolean;
      readonly resultingLufs: number;
      readonly predictedTruePeakDbtp: number;
      /** ceiling - predicted true peak; negative means clipping. */
      readonly headroomDb: number;
      readonly wouldClip: boolean;
    }
  | { readonly sourceId: string; readonly status: "silent" };

export interface LevelMatchResult {
  readonly targetLufs: number;
  readonly suggestions: LevelMatchSuggestion[];
}

/** Rounds half away from zero so +0.25 and -0.25 behave symmetrically. */
export function roundToStep(value: number, step: number): number {
  const rounded = Math.sign(value) * Math.round(Math.abs(value) / step) * step;
  return rounded === 0 ? 0 : rounded; // no -0 in user-facing numbers
}

export function suggestLevelMatch(
  clips: readonly MeasuredClip[],
  target: LevelMatchTarget,
  opts: LevelMatchOptions = {},
): LevelMatchResult {
  const minTrim = opts.minTrimDb ?? -24;
  const maxTrim = opts.maxTrimDb ?? 12;
  const step = opts.stepDb ?? 0.5;
  const ceiling = opts.ceilingDbtp ?? 0;
  if (!(minTrim <= maxTrim)) throw new RangeError(`trim range ${minTrim}…${maxTrim} dB is empty`);
  if (!(step > 0)) throw new RangeError(`step must be > 0, got ${step}`);

  let targetLufs: number;
  if ("referenceSourceId" in target) {
    const ref = clips.find((c) => c.sourceId === target.referenceSourceId);
    if (!ref) throw new RangeError(`reference source ${target.referenceSourceId} has no measured clip`);
    if (!Number.isFinite(ref.integratedLufs)) {
      throw new RangeError(`reference source ${target.referenceSourceId} is silent; choose another reference or a target`);
    }
    targetLufs = ref.integratedLufs;
  } else {
    if (!Number.isFinite(target.targetLufs)) throw new RangeError("target loudness must be a finite LUFS value");
    targetLufs = target.targetLufs;
  }

  const suggestions = clips.map((clip): LevelMatchSuggestion => {
    if (!Number.isFinite(clip.integratedLufs)) return { sourceId: clip.sourceId, status: "silent" };
    const exactOffsetDb = targetLufs - clip.integratedLufs;
    const rounded = roundToStep(exactOffsetDb, step);
    const offsetDb = Math.min(maxTrim, Math.max(minTrim, rounded));
    const predictedTruePeakDbtp = clip.truePeakDbtp + offsetDb;
    const headroomDb = ceiling - predictedTruePeakDbtp;
    return {
      sourceId: clip.sourceId,
      status: "ok",
      measuredLufs: clip.integratedLufs,
      exactOffsetDb,
      offsetDb,
      clamped: offsetDb !== rounded,
      resultingLufs: clip.integratedLufs + offsetDb,
      predictedTruePeakDbtp,
      headroomDb,
      wouldClip: predictedTruePeakDbtp > ceiling,
    };
  });
  return { targetLufs, suggestions };
}
