import { computeHeadroom } from "@/lib/audio/headroom";
import { suggestLevelMatch } from "@/lib/audio/level-match";
import { TRIM, targetKey, type ClipTargetKind, type LevelMatchTargetChoice } from "@/lib/validation/level-match";

// Pure: the level-match table of a zone. From each source's and station's
// latest measured clip, the suggested loudness offset towards the chosen
// reference or target (lib/audio/level-match.ts: rounded to the trim step,
// clamped to the trim range) and the headroom it leaves once the tone curves'
// largest boost is added (lib/audio/headroom.ts). The page and the tests both
// compute it here, so what is shown is what is applied.

export interface MeasuredClipDto {
  id: string;
  fileName: string;
  /** null: nothing above the gate (silence). */
  integratedLufs: number | null;
  loudnessRangeLu: number | null;
  truePeakDbtp: number | null;
  samplePeakDbfs: number | null;
  durationSeconds: number;
  sampleRate: number;
  channelCount: number;
  uploadedByName: string | null;
  createdAt: string;
}

export interface LevelMatchItem {
  kind: ClipTargetKind;
  id: string;
  label: string;
  enabled: boolean;
  loudnessOffsetDb: number;
  /** Largest boost of the zone curve and this item's curve in series, dB. */
  chainBoostDb: number;
  clip: MeasuredClipDto | null;
}

export interface LevelMatchRow extends LevelMatchItem {
  key: string;
  status: "no-clip" | "silent" | "ok";
  suggestion: {
    offsetDb: number;
    exactOffsetDb: number;
    clamped: boolean;
    resultingLufs: number;
    /** The suggestion differs from the offset set now. */
    changes: boolean;
  } | null;
  headroom: {
    predictedPeakDbtp: number;
    headroomDb: number;
    wouldClip: boolean;
    suggestedPreAttenuationDb: number;
  } | null;
}

export interface LevelMatchTable {
  targetLufs: number | null;
  /** Why there are no suggestions (e.g. the reference has no clip). */
  problem: string | null;
  rows: LevelMatchRow[];
}

export function levelMatchTable(items: readonly LevelMatchItem[], target: LevelMatchTargetChoice): LevelMatchTable {
  const measured = items.filter((i) => i.clip !== null);
  const clips = measured.map((i) => ({
    sourceId: targetKey(i.kind, i.id),
    integratedLufs: i.clip!.integratedLufs ?? -Infinity,
    truePeakDbtp: i.clip!.truePeakDbtp ?? -Infinity,
  }));
  let problem: string | null = null;
  let suggestions = new Map<string, ReturnType<typeof suggestLevelMatch>["suggestions"][number]>();
  let targetLufs: number | null = null;
  if (target.kind === "reference") {
    const ref = items.find((i) => i.kind === target.ref.kind && i.id === target.ref.id);
    if (!ref) problem = "The reference is not a source or stream preset of this zone.";
    else if (!ref.clip) problem = `“${ref.label}” has no measured clip yet; upload one or choose another reference.`;
    else if (ref.clip.integratedLufs === null) problem = `“${ref.label}”'s clip is silent; choose another reference or a target level.`;
  }
  if (!problem && clips.length > 0) {
    const result = suggestLevelMatch(
      clips,
      target.kind === "reference" ? { referenceSourceId: targetKey(target.ref.kind, target.ref.id) } : { targetLufs: target.lufs },
      { minTrimDb: TRIM.minDb, maxTrimDb: TRIM.maxDb, stepDb: TRIM.stepDb },
    );
    targetLufs = result.targetLufs;
    suggestions = new Map(result.suggestions.map((s) => [s.sourceId, s]));
  } else if (!problem && target.kind === "lufs") {
    targetLufs = target.lufs;
  }
  const rows = items.map((item): LevelMatchRow => {
    const key = targetKey(item.kind, item.id);
    const base = { ...item, key };
    if (!item.clip) return { ...base, status: "no-clip", suggestion: null, headroom: null };
    const s = suggestions.get(key);
    if (item.clip.integratedLufs === null || (s && s.status === "silent")) return { ...base, status: "silent", suggestion: null, headroom: null };
    if (!s || s.status !== "ok") return { ...base, status: "ok", suggestion: null, headroom: null };
    const h =
      item.clip.truePeakDbtp === null
        ? null
        : computeHeadroom({ truePeakDbtp: item.clip.truePeakDbtp, loudnessOffsetDb: s.offsetDb, largestBoostDb: Math.max(0, item.chainBoostDb) });
    return {
      ...base,
      status: "ok",
      suggestion: {
        offsetDb: s.offsetDb,
        exactOffsetDb: s.exactOffsetDb,
        clamped: s.clamped,
        resultingLufs: s.resultingLufs,
        changes: s.offsetDb !== item.loudnessOffsetDb,
      },
      headroom: h && {
        predictedPeakDbtp: h.predictedPeakDbtp,
        headroomDb: h.headroomDb,
        wouldClip: h.warning,
        suggestedPreAttenuationDb: h.suggestedPreAttenuationDb,
      },
    };
  });
  return { targetLufs, problem, rows };
}
