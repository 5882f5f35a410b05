/**
 * The summed response of a zone's outputs at the listening position: each
 * output's crossover branch (./crossover: the main pair gets the high-pass,
 * subwoofers the low-pass), its trim, its polarity and its arrival time
 * (distance / c + own latency + the delay it is given, ./alignment) as a
 * phase term e^(-j 2π f t), summed as complex pressures, then shaped by the
 * zone's tone curve (./tone-curve, Web Audio biquads).
 *
 * Modelling choices (ours, stated so the plot is read correctly): the main
 * pair and the subwoofers each count as one branch — the mains' average and
 * the subwoofers' average are summed, i.e. a system whose subwoofer level is
 * matched to the mains, which is what trims are for; a full-range line out
 * feeds another amplifier and is not part of the sum; rooms are not
 * modelled. Without a crossover, or without subwoofers, every output plays
 * full range.
 */

import { computeAlignment, type AlignmentOptions, type AlignmentOutput, type AlignmentResult } from "./alignment";
import { biquadComplexResponse, eqBandToBiquad } from "./biquad";
import { crossoverSections, type CrossoverSpec } from "./crossover";
import { logFrequencyGrid, type ToneBand } from "./tone-curve";

export type OutputRole = "main_left" | "main_right" | "subwoofer" | "line_out";

export interface LayoutOutput extends AlignmentOutput {
  readonly role: OutputRole;
  readonly polarityInverted: boolean;
}

export interface OutputLayoutInput {
  readonly crossover: CrossoverSpec | null;
  readonly outputs: readonly LayoutOutput[];
}

export interface OutputResponse {
  readonly frequenciesHz: Float64Array;
  /** The sum with the computed delays applied, tone curve included, dB. */
  readonly alignedDb: Float64Array;
  /** The same sum without the delays (each output as it arrives), dB. */
  readonly unalignedDb: Float64Array;
  /** The main pair's branch (high-pass when crossed over), trims and polarity included, dB. */
  readonly mainsDb: Float64Array | null;
  /** The subwoofers' branch (low-pass), dB. */
  readonly subsDb: Float64Array | null;
  /** The zone's tone curve alone, dB. */
  readonly toneCurveDb: Float64Array;
  readonly alignment: AlignmentResult;
}

interface Complex {
  re: number;
  im: number;
}

function cascade(sections: ReturnType<typeof crossoverSections>, f: number, fs: number): Complex {
  let re = 1;
  let im = 0;
  for (const s of sections) {
    const h = biquadComplexResponse(s, f, fs);
    const r = re * h.re - im * h.im;
    im = re * h.im + im * h.re;
    re = r;
  }
  return { re, im };
}

const toDb = (h: Complex) => 10 * Math.log10(h.re * h.re + h.im * h.im);

export function outputLayoutResponse(
  layout: OutputLayoutInput,
  toneCurve: readonly ToneBand[] = [],
  opts: AlignmentOptions & { sampleRate?: number; grid?: ArrayLike<number> } = {},
): OutputResponse {
  const fs = opts.sampleRate ?? 48_000;
  const grid = Float64Array.from(opts.grid ?? logFrequencyGrid(20, 20_000, 24));
  const alignment = computeAlignment(layout.outputs, opts);
  const arrivals = new Map(alignment.outputs.map((o) => [o.id, o]));
  const acoustic = layout.outputs.filter((o) => o.role !== "line_out");
  const mains = acoustic.filter((o) => o.role !== "subwoofer");
  const subs = acoustic.filter((o) => o.role === "subwoofer");
  const crossed = layout.crossover !== null && mains.length > 0 && subs.length > 0;
  const hp = crossed ? crossoverSections(layout.crossover!, "highpass", fs) : [];
  const lp = crossed ? crossoverSections(layout.crossover!, "lowpass", fs) : [];
  const curve = toneCurve.filter((b) => b.enabled !== false).map((b) => eqBandToBiquad(b, fs));
  // Times relative to the earliest arrival keep the phase terms small; only differences matter.
  const t0 = Math.min(0, ...alignment.outputs.map((o) => o.arrivalMs));

  const n = grid.length;
  const alignedDb = new Float64Array(n);
  const unalignedDb = new Float64Array(n);
  const mainsDb = mains.length ? new Float64Array(n) : null;
  const subsDb = subs.length ? new Float64Array(n) : null;
  const toneCurveDb = new Float64Array(n);

  for (let i = 0; i < n; i++) {
    const f = grid[i]!;
    const branchHp = crossed ? cascade(hp, f, fs) : { re: 1, im: 0 };
    const branchLp = crossed ? cascade(lp, f, fs) : { re: 1, im: 0 };
    const tc = cascade(curve, f, fs);
    toneCurveDb[i] = toDb(tc);
    const group = (list: readonly LayoutOutput[], branch: Complex, withDelay: boolean): Complex => {
      let re = 0;
      let im = 0;
      for (const o of list) {
        const a = arrivals.get(o.id)!;
        const tMs = a.arrivalMs + (withDelay ? a.delayMs : 0) - t0;
        const phase = -2 * Math.PI * f * (tMs / 1000);
        const gain = Math.pow(10, o.trimDb / 20) * (o.polarityInverted ? -1 : 1);
        const c = Math.cos(phase) * gain;
        const s = Math.sin(phase) * gain;
        re += branch.re * c - branch.im * s;
        im += branch.re * s + branch.im * c;
      }
      return list.length ? { re: re / list.length, im: im / list.length } : { re: 0, im: 0 };
    };
    const total = (withDelay: boolean): Complex => {
      const m = group(mains, branchHp, withDelay);
      const s = group(subs, branchLp, withDelay);
      const sum = { re: m.re + s.re, im: m.im + s.im };
      return { re: sum.re * tc.re - sum.im * tc.im, im: sum.re * tc.im + sum.im * tc.re };
    };
    alignedDb[i] = toDb(total(true));
    unalignedDb[i] = toDb(total(false));
    if (mainsDb) mainsDb[i] = toDb(group(mains, branchHp, true));
    if (subsDb) subsDb[i] = toDb(group(subs, branchLp, true));
  }
  return { frequenciesHz: grid, alignedDb, unalignedDb, mainsDb, subsDb, toneCurveDb, alignment };
}
