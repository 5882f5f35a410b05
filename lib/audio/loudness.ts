/**
 * Programme loudness per ITU-R BS.1770-4 (Annex 1) and EBU R 128:
 *  - K-weighting (./k-weighting), channel weights G_i (BS.1770-4 Table 3);
 *  - 400 ms gating blocks with 75 % overlap (100 ms steps);
 *  - absolute gate -70 LKFS, relative gate -10 LU below the absolute-gated level;
 *  - l = -0.691 + 10 log10(sum_i G_i z_i).
 * Momentary = 400 ms, short-term = 3 s sliding windows (EBU Tech 3341), both
 * updated every 100 ms, ungated. Loudness range per EBU Tech 3342: 3 s
 * short-term values, absolute gate -70 LUFS, relative gate -20 LU, LRA = P95 - P10.
 * True peak per BS.1770-4 Annex 2 (./true-peak).
 *
 * Conventions: a measure that has nothing to measure (input shorter than one
 * 400 ms block, or every block below the absolute gate, or digital silence)
 * is -Infinity, never NaN. Loudness range is 0 when fewer than two short-term
 * values survive its gates (also the case for clips shorter than 3 s).
 */

import { accumulateKWeightedEnergy, accumulateKWeightedEnergyPair, kWeightingCoefficients } from "./k-weighting";
import { truePeakLinear, type TruePeakOptions } from "./true-peak";

export type ChannelLayout = "mono" | "stereo" | "5.0" | "5.1";

export interface LoudnessOptions {
  /**
   * Explicit per-channel weights G_i (overrides `layout`). BS.1770-4 Table 3:
   * L, R, C = 1.0; Ls, Rs = 1.41; LFE is not measured (weight 0).
   */
  readonly channelWeights?: readonly number[];
  /**
   * Channel order for the default weights. 5.1 follows the WAVE order
   * L, R, C, LFE, Ls, Rs; 5.0 is L, R, C, Ls, Rs. Default from the channel
   * count: 1 → mono, 2 → stereo, 5 → 5.0, 6 → 5.1; other counts weigh every
   * channel 1.0.
   */
  readonly layout?: ChannelLayout;
  /** Skip the true-peak scan (the most expensive part) when not needed. */
  readonly truePeak?: boolean | TruePeakOptions;
  /** Also return the momentary and short-term series (one value per 100 ms). */
  readonly includeSeries?: boolean;
}

export interface LoudnessMeasurement {
  readonly integratedLufs: number;
  readonly loudnessRangeLu: number;
  readonly maxMomentaryLufs: number;
  readonly maxShortTermLufs: number;
  readonly samplePeakDbfs: number;
  /** -Infinity when the true-peak scan was skipped via `truePeak: false`. */
  readonly truePeakDbtp: number;
  readonly durationSeconds: number;
  readonly sampleRate: number;
  readonly channelCount: number;
  /** Present with `includeSeries`: momentary[k] covers [k*0.1 s, k*0.1 s + 0.4 s). */
  readonly momentaryLufs?: Float64Array;
  /** Present with `includeSeries`: shortTerm[k] covers [k*0.1 s, k*0.1 s + 3 s). */
  readonly shortTermLufs?: Float64Array;
}

/** BS.1770-4 Annex 1: l = -0.691 + 10 log10(sum G_i z_i). */
const LOUDNESS_OFFSET = -0.691;
const ABSOLUTE_GATE_LUFS = -70;
const RELATIVE_GATE_LU = -10;
const LRA_RELATIVE_GATE_LU = -20;
const LRA_LOW_PERCENTILE = 0.1;
const LRA_HIGH_PERCENTILE = 0.95;
const STEPS_PER_MOMENTARY = 4;
const STEPS_PER_SHORT_TERM = 30;

export const MIN_SAMPLE_RATE = 8_000;
export const MAX_SAMPLE_RATE = 384_000;

export function defaultChannelWeights(channelCount: number, layout?: ChannelLayout): number[] {
  const resolved =
    layout ??
    (channelCount === 1 ? "mono" : channelCount === 2 ? "stereo" : channelCount === 5 ? "5.0" : channelCount === 6 ? "5.1" : undefined);
  const expected: Record<ChannelLayout, number[]> = {
    mono: [1],
    stereo: [1, 1],
    "5.0": [1, 1, 1, 1.41, 1.41],
    "5.1": [1, 1, 1, 0, 1.41, 1.41],
  };
  if (resolved === undefined) return new Array<number>(channelCount).fill(1);
  const weights = expected[resolved];
  if (weights.length !== channelCount) {
    throw new RangeError(`layout ${resolved} has ${weights.length} channels, input has ${channelCount}`);
  }
  return weights;
}

function energyToLufs(meanSquare: number): number {
  return meanSquare > 0 ? LOUDNESS_OFFSET + 10 * Math.log10(meanSquare) : -Infinity;
}

function ampToDb(amplitude: number): number {
  return amplitude > 0 ? 20 * Math.log10(amplitude) : -Infinity;
}

/** Gated mean per BS.1770-4: absolute gate, then a gate `relativeLu` below the absolute-gated level. */
function gatedMean(energies: Float64Array, relativeLu: number): { mean: number; kept: number[] } {
  const absoluteThreshold = Math.pow(10, (ABSOLUTE_GATE_LUFS - LOUDNESS_OFFSET) / 10);
  let sum = 0;
  let count = 0;
  for (const z of energies) {
    if (z > absoluteThreshold) {
      sum += z;
      count++;
    }
  }
  if (count === 0) return { mean: 0, kept: [] };
  const relativeThreshold = (sum / count) * Math.pow(10, relativeLu / 10);
  let gatedSum = 0;
  const kept: number[] = [];
  for (const z of energies) {
    if (z > absoluteThreshold && z > relativeThreshold) {
      gatedSum += z;
      kept.push(z);
    }
  }
  return { mean: kept.length > 0 ? gatedSum / kept.length : 0, kept };
}

/** Nearest-rank percentile on a sorted array (index round((n - 1) p)). */
function percentileSorted(sorted: number[], p: number): number {
  return sorted[Math.round((sorted.length - 1) * p)]!;
}

export function measureLoudness(
  channels: readonly Float32Array[] | readonly Float64Array[],
  sampleRate: number,
  opts: LoudnessOptions = {},
): LoudnessMeasurement {
  if (!Number.isFinite(sampleRate) || sampleRate < MIN_SAMPLE_RATE || sampleRate > MAX_SAMPLE_RATE) {
    throw new RangeError(`sample rate must be ${MIN_SAMPLE_RATE}–${MAX_SAMPLE_RATE} Hz, got ${sampleRate}`);
  }
  const channelCount = channels.length;
  if (channelCount === 0) throw new RangeError("at least one channel is required");
  const length = channels[0]!.length;
  for (const ch of channels) {
    if (ch.length !== length) throw new RangeError("all channels must have the same length");
  }
  const weights = opts.channelWeights ? [...opts.channelWeights] : defaultChannelWeights(channelCount, opts.layout);
  if (weights.length !== channelCount || weights.some((w) => !(w >= 0) || !Number.isFinite(w))) {
    throw new RangeError(`expected ${channelCount} non-negative channel weights`);
  }

  // 100 ms steps; boundaries rounded so any rate (e.g. 11025 Hz) works.
  const stepCount = Math.floor(length / (sampleRate / 10));
  const boundaries = new Float64Array(stepCount + 1);
  for (let j = 0; j <= stepCount; j++) boundaries[j] = Math.round((j * sampleRate) / 10);
  const stepEnergy = new Float64Array(stepCount);
  const coefficients = kWeightingCoefficients(sampleRate);
  let samplePeak = 0;
  // Measured channels two at a time (see accumulateKWeightedEnergyPair); the
  // order of additions into stepEnergy is the same as one channel at a time.
  const measured = weights.flatMap((w, c) => (w > 0 && stepCount > 0 ? [c] : []));
  for (let k = 0; k + 1 < measured.length; k += 2) {
    const [a, b] = [measured[k]!, measured[k + 1]!];
    const peaks = accumulateKWeightedEnergyPair(channels[a]!, channels[b]!, coefficients, boundaries, [weights[a]!, weights[b]!], stepEnergy);
    samplePeak = Math.max(samplePeak, peaks[0], peaks[1]);
  }
  if (measured.length % 2 === 1) {
    accumulateKWeightedEnergy(channels[measured[measured.length - 1]!]!, coefficients, boundaries, weights[measured[measured.length - 1]!]!, stepEnergy);
  }
  const peakDone = new Set(measured.slice(0, measured.length - (measured.length % 2)));
  for (let c = 0; c < channelCount; c++) {
    if (peakDone.has(c)) continue;
    const x = channels[c]!;
    for (let i = 0; i < length; i++) {
      const v = x[i]! < 0 ? -x[i]! : x[i]!;
      if (v > samplePeak) samplePeak = v;
    }
  }

  const windowEnergies = (steps: number): Float64Array => {
    const count = Math.max(0, stepCount - steps + 1);
    const out = new Float64Array(count);
    // Summed afresh per window (not a running sum) so silence after a loud
    // passage is exactly zero rather than a rounding residue.
    for (let k = 0; k < count; k++) {
      let sum = 0;
      for (let j = k; j < k + steps; j++) sum += stepEnergy[j]!;
      // Mean square over the exact number of samples in the window.
      out[k] = sum / (boundaries[k + steps]! - boundaries[k]!);
    }
    return out;
  };

  const blockEnergy = windowEnergies(STEPS_PER_MOMENTARY);
  const shortTermEnergy = windowEnergies(STEPS_PER_SHORT_TERM);

  const integrated = gatedMean(blockEnergy, RELATIVE_GATE_LU);
  const integratedLufs = energyToLufs(integrated.mean);

  let maxBlock = 0;
  for (const z of blockEnergy) if (z > maxBlock) maxBlock = z;
  let maxShort = 0;
  for (const z of shortTermEnergy) if (z > maxShort) maxShort = z;

  const lraGate = gatedMean(shortTermEnergy, LRA_RELATIVE_GATE_LU);
  let loudnessRangeLu = 0;
  if (lraGate.kept.length >= 2) {
    // Percentiles of energy equal percentiles of level (monotonic). Rounded to
    // 1e-6 LU so a steady tone reads 0 rather than a 1e-15 rounding residue.
    const sorted = lraGate.kept.sort((a, b) => a - b);
    const range = 10 * Math.log10(percentileSorted(sorted, LRA_HIGH_PERCENTILE) / percentileSorted(sorted, LRA_LOW_PERCENTILE));
    loudnessRangeLu = Math.round(range * 1e6) / 1e6;
  }

  let truePeakDbtp = -Infinity;
  if (opts.truePeak !== false) {
    const tpOpts = typeof opts.truePeak === "object" ? opts.truePeak : {};
    // True peak is never below the sample peak (phase 0 is the sample itself).
    truePeakDbtp = ampToDb(Math.max(samplePeak, truePeakLinear(channels, sampleRate, tpOpts)));
  }

  const result: LoudnessMeasurement = {
    integratedLufs,
    loudnessRangeLu,
    maxMomentaryLufs: energyToLufs(maxBlock),
    maxShortTermLufs: energyToLufs(maxShort),
    samplePeakDbfs: ampToDb(samplePeak),
    truePeakDbtp,
    durationSeconds: length / sampleRate,
    sampleRate,
    channelCount,
  };
  if (!opts.includeSeries) return result;
  return {
    ...result,
    momentaryLufs: blockEnergy.map(energyToLufs),
    shortTermLufs: shortTermEnergy.map(energyToLufs),
  };
}
