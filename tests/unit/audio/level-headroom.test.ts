// Level matching and headroom are our own arithmetic (offset = target - measured; a gain change
// moves the true peak by the same dB); the worked examples below are computed by hand.
// The -1 dBTP ceiling used in one case is EBU R 128's maximum permitted true peak (recalled from memory).
import { describe, expect, it } from "vitest";
import { computeHeadroom } from "@/lib/audio/headroom";
import { roundToStep, suggestLevelMatch } from "@/lib/audio/level-match";

const clips = [
  { sourceId: "streamer", integratedLufs: -14.2, truePeakDbtp: -0.8 },
  { sourceId: "tv", integratedLufs: -23.0, truePeakDbtp: -6.0 },
  { sourceId: "turntable", integratedLufs: -19.74, truePeakDbtp: -3.2 },
  { sourceId: "quiet-mic", integratedLufs: -50.0, truePeakDbtp: -30.0 },
  { sourceId: "dead", integratedLufs: -Infinity, truePeakDbtp: -Infinity },
];

describe("level match", () => {
  it("brings sources to the reference source, rounded to 0.5 dB and clamped to -24…+12 dB", () => {
    const r = suggestLevelMatch(clips, { referenceSourceId: "tv" });
    const s = Object.fromEntries(r.suggestions.map((x) => [x.sourceId, x]));
    expect(r.targetLufs).toBe(-23);
    // streamer: -23 - (-14.2) = -8.8 → -9.0 dB; peak -0.8 - 9.0 = -9.8 dBTP.
    expect(s.streamer).toMatchObject({ status: "ok", offsetDb: -9, clamped: false, wouldClip: false });
    if (s.streamer?.status === "ok") expect(s.streamer.predictedTruePeakDbtp).toBeCloseTo(-9.8, 9);
    // turntable: -23 + 19.74 = -3.26 → -3.5 dB.
    expect(s.turntable).toMatchObject({ offsetDb: -3.5 });
    // quiet mic: +27 dB needed, clamped to +12 → resulting -38 LUFS, peak -18 dBTP.
    expect(s["quiet-mic"]).toMatchObject({ offsetDb: 12, clamped: true, resultingLufs: -38, predictedTruePeakDbtp: -18 });
    expect(s.dead).toEqual({ sourceId: "dead", status: "silent" });
  });

  it("flags what would clip against the ceiling (0 dBTP, or -1 dBTP per EBU R 128 distribution practice)", () => {
    const loudPeaks = [{ sourceId: "vinyl", integratedLufs: -20, truePeakDbtp: -1.5 }];
    const atZero = suggestLevelMatch(loudPeaks, { targetLufs: -18.5 }).suggestions[0]!;
    // +1.5 dB offset → peak 0.0 dBTP: not over 0.
    expect(atZero).toMatchObject({ offsetDb: 1.5, predictedTruePeakDbtp: 0, headroomDb: 0, wouldClip: false });
    const atMinusOne = suggestLevelMatch(loudPeaks, { targetLufs: -18.5 }, { ceilingDbtp: -1 }).suggestions[0]!;
    expect(atMinusOne).toMatchObject({ headroomDb: -1, wouldClip: true });
  });

  it("rounds half away from zero symmetrically", () => {
    expect(roundToStep(0.25, 0.5)).toBe(0.5);
    expect(roundToStep(-0.25, 0.5)).toBe(-0.5);
    expect(roundToStep(-0.24, 0.5)).toBe(0);
    expect(Object.is(roundToStep(-0.1, 0.5), -0)).toBe(false);
  });

  it("refuses a missing or silent reference", () => {
    expect(() => suggestLevelMatch(clips, { referenceSourceId: "nope" })).toThrow(/no measured clip/);
    expect(() => suggestLevelMatch(clips, { referenceSourceId: "dead" })).toThrow(/silent/);
  });
});

describe("headroom", () => {
  it("offset + largest boost + true peak against 0 dBFS", () => {
    // -1.2 dBTP + 3 dB offset + 4.5 dB boost = +6.3 dBTP → 6.3 dB over, pre-attenuate 6.5 dB (0.5 dB steps, rounded up).
    const r = computeHeadroom({ truePeakDbtp: -1.2, loudnessOffsetDb: 3, largestBoostDb: 4.5 });
    expect(r.predictedPeakDbtp).toBeCloseTo(6.3, 9);
    expect(r.headroomDb).toBeCloseTo(-6.3, 9);
    expect(r.warning).toBe(true);
    expect(r.suggestedPreAttenuationDb).toBe(6.5);
  });

  it("no warning and no attenuation when the chain stays under the ceiling", () => {
    // -9 dBTP - 2 dB + 6 dB = -5 dBTP → 5 dB of headroom.
    expect(computeHeadroom({ truePeakDbtp: -9, loudnessOffsetDb: -2, largestBoostDb: 6 })).toEqual({
      predictedPeakDbtp: -5,
      headroomDb: 5,
      warning: false,
      suggestedPreAttenuationDb: 0,
    });
    // Exactly 1.0 dB over rounds to 1.0, not 1.5.
    expect(computeHeadroom({ truePeakDbtp: -2, loudnessOffsetDb: 0, largestBoostDb: 3 }).suggestedPreAttenuationDb).toBe(1);
    // A custom ceiling (-1 dBTP): -0.5 dBTP is 0.5 dB over.
    expect(computeHeadroom({ truePeakDbtp: -0.5, loudnessOffsetDb: 0, largestBoostDb: 0 }, { ceilingDbtp: -1 })).toMatchObject({
      warning: true,
      suggestedPreAttenuationDb: 0.5,
    });
  });
});
