/**
 * ITU-R BS.1770-4 K-weighting (Annex 1): a high-frequency shelf ("pre-filter",
 * Table 1) followed by the RLB high-pass (Table 2). The Recommendation prints
 * coefficients for 48 kHz only, so we derive them for any rate from the
 * analogue prototype via the bilinear transform with prewarping
 * (K = tan(pi f0 / fs)). The prototype parameters are the ones published with
 * libebur128 (ebur128/ebur128.c, ebur128_init_filter), which reproduce the
 * 48 kHz table to ~1e-12; see tests/unit/audio/k-weighting.test.ts.
 */

import type { BiquadCoefficients } from "./biquad";

/** Shelf prototype: centre frequency, gain and Q (libebur128's derivation of BS.1770 Table 1). */
export const K_SHELF_PROTOTYPE = {
  f0Hz: 1681.974450955533,
  gainDb: 3.999843853973347,
  q: 0.7071752369554196,
  /** Exponent relating the band-edge gain Vb to the high-frequency gain Vh (Vb = Vh^x). */
  vbExponent: 0.4996667741545416,
} as const;

/** RLB high-pass prototype (libebur128's derivation of BS.1770 Table 2). */
export const K_HIGHPASS_PROTOTYPE = {
  f0Hz: 38.13547087602444,
  q: 0.5003270373238773,
} as const;

export interface KWeightingCoefficients {
  readonly shelf: BiquadCoefficients;
  /**
   * Numerator kept at [1, -2, 1] without dividing by a0, as Table 2 prints it;
   * the Recommendation's -0.691 dB constant is calibrated with that gain.
   */
  readonly highpass: BiquadCoefficients;
}

export function kWeightingCoefficients(sampleRate: number): KWeightingCoefficients {
  if (!(sampleRate > 2 * K_SHELF_PROTOTYPE.f0Hz) || !Number.isFinite(sampleRate)) {
    throw new RangeError(`K-weighting needs a sample rate above ${2 * K_SHELF_PROTOTYPE.f0Hz} Hz, got ${sampleRate}`);
  }
  const shelfK = Math.tan((Math.PI * K_SHELF_PROTOTYPE.f0Hz) / sampleRate);
  const q1 = K_SHELF_PROTOTYPE.q;
  const vh = Math.pow(10, K_SHELF_PROTOTYPE.gainDb / 20);
  const vb = Math.pow(vh, K_SHELF_PROTOTYPE.vbExponent);
  const shelfA0 = 1 + shelfK / q1 + shelfK * shelfK;
  const shelf: BiquadCoefficients = {
    b0: (vh + (vb * shelfK) / q1 + shelfK * shelfK) / shelfA0,
    b1: (2 * (shelfK * shelfK - vh)) / shelfA0,
    b2: (vh - (vb * shelfK) / q1 + shelfK * shelfK) / shelfA0,
    a1: (2 * (shelfK * shelfK - 1)) / shelfA0,
    a2: (1 - shelfK / q1 + shelfK * shelfK) / shelfA0,
  };

  const hpK = Math.tan((Math.PI * K_HIGHPASS_PROTOTYPE.f0Hz) / sampleRate);
  const q2 = K_HIGHPASS_PROTOTYPE.q;
  const hpA0 = 1 + hpK / q2 + hpK * hpK;
  const highpass: BiquadCoefficients = {
    b0: 1,
    b1: -2,
    b2: 1,
    a1: (2 * (hpK * hpK - 1)) / hpA0,
    a2: (1 - hpK / q2 + hpK * hpK) / hpA0,
  };
  return { shelf, highpass };
}

/**
 * Filters one channel through both K-weighting stages and calls back with the
 * sum of squared output over consecutive segments (the caller's 100 ms steps).
 * Float64 state, one pass, no allocation per sample.
 *
 * `boundaries[j]..boundaries[j+1]` is segment j; `sums[j]` receives
 * weight * sum(y^2) added to what is already there.
 */
export function accumulateKWeightedEnergy(
  samples: ArrayLike<number>,
  coefficients: KWeightingCoefficients,
  boundaries: Int32Array | Float64Array,
  weight: number,
  sums: Float64Array,
): void {
  const { b0: p0, b1: p1, b2: p2, a1: pa1, a2: pa2 } = coefficients.shelf;
  const { b0: r0, b1: r1, b2: r2, a1: ra1, a2: ra2 } = coefficients.highpass;
  // Transposed direct form II states for the two sections.
  let s1 = 0;
  let s2 = 0;
  let t1 = 0;
  let t2 = 0;
  const segments = boundaries.length - 1;
  for (let j = 0; j < segments; j++) {
    const start = boundaries[j]!;
    const end = boundaries[j + 1]!;
    let acc = 0;
    for (let i = start; i < end; i++) {
      const x = samples[i]!;
      const y1 = p0 * x + s1;
      s1 = p1 * x - pa1 * y1 + s2;
      s2 = p2 * x - pa2 * y1;
      const y2 = r0 * y1 + t1;
      t1 = r1 * y1 - ra1 * y2 + t2;
      t2 = r2 * y1 - ra2 * y2;
      acc += y2 * y2;
    }
    sums[j]! += weight * acc;
  }
}

/**
 * `accumulateKWeightedEnergy` for two channels in one pass (same arithmetic
 * per channel, so the same sums). Each channel's recursion is a chain of
 * dependent multiply-adds; running two independent chains side by side lets
 * the CPU overlap them, which nearly halves the time for stereo. Also
 * returns each channel's sample peak (largest |x|), found on the way.
 */
export function accumulateKWeightedEnergyPair(
  left: ArrayLike<number>,
  right: ArrayLike<number>,
  coefficients: KWeightingCoefficients,
  boundaries: Int32Array | Float64Array,
  weights: readonly [number, number],
  sums: Float64Array,
): [number, number] {
  const { b0: p0, b1: p1, b2: p2, a1: pa1, a2: pa2 } = coefficients.shelf;
  const { b0: r0, b1: r1, b2: r2, a1: ra1, a2: ra2 } = coefficients.highpass;
  const [wl, wr] = weights;
  let ls1 = 0, ls2 = 0, lt1 = 0, lt2 = 0;
  let rs1 = 0, rs2 = 0, rt1 = 0, rt2 = 0;
  let lPeak = 0;
  let rPeak = 0;
  const segments = boundaries.length - 1;
  for (let j = 0; j < segments; j++) {
    const start = boundaries[j]!;
    const end = boundaries[j + 1]!;
    let lAcc = 0;
    let rAcc = 0;
    for (let i = start; i < end; i++) {
      const xl = left[i]!;
      const xr = right[i]!;
      const ly1 = p0 * xl + ls1;
      const ry1 = p0 * xr + rs1;
      ls1 = p1 * xl - pa1 * ly1 + ls2;
      rs1 = p1 * xr - pa1 * ry1 + rs2;
      ls2 = p2 * xl - pa2 * ly1;
      rs2 = p2 * xr - pa2 * ry1;
      const ly2 = r0 * ly1 + lt1;
      const ry2 = r0 * ry1 + rt1;
      lt1 = r1 * ly1 - ra1 * ly2 + lt2;
      rt1 = r1 * ry1 - ra1 * ry2 + rt2;
      lt2 = r2 * ly1 - ra2 * ly2;
      rt2 = r2 * ry1 - ra2 * ry2;
      lAcc += ly2 * ly2;
      rAcc += ry2 * ry2;
      if (xl > lPeak) lPeak = xl;
      else if (-xl > lPeak) lPeak = -xl;
      if (xr > rPeak) rPeak = xr;
      else if (-xr > rPeak) rPeak = -xr;
    }
    sums[j]! += wl * lAcc;
    sums[j]! += wr * rAcc;
  }
  // Samples after the last whole segment count for the peak too.
  for (let i = segments > 0 ? boundaries[segments]! : 0; i < left.length; i++) {
    lPeak = Math.max(lPeak, Math.abs(left[i]!));
    rPeak = Math.max(rPeak, Math.abs(right[i]!));
  }
  return [lPeak, rPeak];
}
