/**
 * True peak per ITU-R BS.1770-4 Annex 2: oversample, interpolate (low-pass),
 * take the absolute maximum. The oversampled rate must reach at least
 * 192 kHz (4x at 48 kHz), so factor = max(4, ceil(192000 / fs)): 4x at 48 and
 * 96 kHz, 5x at 44.1 kHz, 6x at 32 kHz.
 *
 * Interpolation filters are Kaiser-windowed sincs (beta 5), normalised to
 * unit DC gain; a sinc's integer phase is the input sample itself, so only
 * in-between points are computed. Floating point needs no 12.04 dB
 * pre-attenuation (the Annex's guard against fixed-point overflow).
 *  - 4x (the common case) runs as two 2x stages: a 16-tap half-sample
 *    interpolator, then a 10-tap one on the 2x signal (which only occupies
 *    the lower half of its band). Half-sample filters are symmetric, so each
 *    output costs half the multiplies: ~26 multiplies per input sample
 *    instead of 48 for a direct 3-phase x 16-tap polyphase filter.
 *  - Other factors use a direct polyphase filter, 16 taps per phase.
 * Interpolation error on a sine stays below 0.03 dB up to 0.4·fs (checked in
 * tests/unit/audio/true-peak.test.ts against the exact sine).
 *
 * Speed (measured in tests/bench/audio.ts):
 *  - the scan never stores the oversampled signal: each interpolator has a
 *    fused `peak` kernel that computes the in-between points and keeps only
 *    their running extremes, with the coefficients in locals and the
 *    half-sample values of stage 1 rotated through five locals;
 *  - at 4x, channels go two at a time through a WebAssembly SIMD version of
 *    that kernel (./true-peak-simd): bit-identical in double precision for
 *    Float64Array input, float32 lanes (error < 0.0001 dB, bound derived
 *    there) for Float32Array input such as decoded WAV files; the plain
 *    JavaScript kernel remains for runtimes without SIMD and other factors;
 *  - blocks of 512 samples are visited loudest first and skipped once
 *    (block sample peak) × G cannot beat the running maximum, where G is the
 *    largest L1 norm (sum |h|) of the interpolator's effective per-phase
 *    impulse responses. For a linear filter, |y| <= sum |h_m| |x_m| <=
 *    G · max|x| (triangle inequality), and the bound is reached by the input
 *    x_m = sign(h_m), so G is the tightest bound that needs nothing but the
 *    block's sample peak: skipping never changes the result. G is measured
 *    from the filters themselves at start-up (impulse response), ≈ 2.1
 *    (6.4 dB) for the 4x filters — not the looser product of the stages.
 */

import { loadSimdKernel, type SimdKernel } from "./true-peak-simd";

export interface TruePeakOptions {
  /** Oversampling factor; default max(4, ceil(192000 / sampleRate)). */
  readonly oversampling?: number;
  /** Use the WebAssembly SIMD kernel at 4x when the runtime has it (default true; see ./true-peak-simd). */
  readonly simd?: boolean;
}

const KAISER_BETA = 5;
const POLYPHASE_TAPS = 16;
const STAGE1_TAPS = 16;
const STAGE2_TAPS = 10;
const BLOCK = 512;

export function defaultOversampling(sampleRate: number): number {
  return Math.max(4, Math.ceil(192_000 / sampleRate));
}

/** Zeroth-order modified Bessel function of the first kind (series), for the Kaiser window. */
function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  const q = (x * x) / 4;
  for (let k = 1; k < 64; k++) {
    term *= q / (k * k);
    sum += term;
    if (term < sum * 1e-17) break;
  }
  return sum;
}

/**
 * Taps that interpolate the value at fractional position `frac` (0 < frac < 1)
 * between x[i] and x[i+1]: tap m multiplies x[i + m - taps/2 + 1].
 */
function fractionalTaps(frac: number, taps: number): Float64Array {
  const half = taps / 2;
  const i0Beta = besselI0(KAISER_BETA);
  const h = new Float64Array(taps);
  let sum = 0;
  for (let m = 0; m < taps; m++) {
    const t = frac - (m - half + 1); // distance in samples from the output instant
    const sinc = Math.sin(Math.PI * t) / (Math.PI * t);
    const r = t / half;
    h[m] = (sinc * besselI0(KAISER_BETA * Math.sqrt(Math.max(0, 1 - r * r)))) / i0Beta;
    sum += h[m]!;
  }
  for (let m = 0; m < taps; m++) h[m] = h[m]! / sum;
  return h;
}

interface Interpolator {
  readonly factor: number;
  /** Samples of context needed on each side of a block. */
  readonly margin: number;
  /**
   * Largest L1 norm of the effective impulse response of any phase: the exact
   * upper bound of |interpolated| / max|input in reach| (see the header).
   */
  readonly gainBound: number;
  /**
   * Fills `out` with the oversampled signal for input indices [0, count) of
   * `xs` (a Float64 copy with `margin` samples of context before index 0):
   * out[i * factor + p] = value at i + p / factor.
   */
  readonly run: (xs: Float64Array, count: number, out: Float64Array) => void;
  /**
   * The same points as `run` (samples included), but only their largest
   * absolute value: what the true-peak scan needs, without the buffer.
   */
  readonly peak: (xs: Float64Array, count: number) => number;
  /** The two-stage 4x filter's a0…a7, c0…c4 (for the SIMD kernel); absent for polyphase. */
  readonly stageCoefficients?: Float64Array;
}

/** Largest per-phase L1 norm of the interpolator's effective impulse responses. */
function measuredGainBound(factor: number, margin: number, run: Interpolator["run"]): number {
  // An impulse in the middle of a zero block; every output phase sees it once per tap.
  const count = 4 * margin + 4;
  const xs = new Float64Array(count + 2 * margin);
  xs[margin + 2 * margin] = 1;
  const out = new Float64Array(count * factor);
  run(xs, count, out);
  let bound = 1;
  for (let p = 1; p < factor; p++) {
    let s = 0;
    for (let i = 0; i < count; i++) s += Math.abs(out[i * factor + p]!);
    if (s > bound) bound = s;
  }
  return bound;
}

function twoStageInterpolator(): Interpolator {
  const s1 = fractionalTaps(0.5, STAGE1_TAPS).slice(0, STAGE1_TAPS / 2); // symmetric: keep one half
  const s2 = fractionalTaps(0.5, STAGE2_TAPS).slice(0, STAGE2_TAPS / 2);
  const h1 = STAGE1_TAPS / 2;
  const h2 = STAGE2_TAPS / 2;
  // The 2x signal needs h2 extra 2x-samples of context, i.e. ceil(h2 / 2) input samples.
  const margin = h1 + Math.ceil(h2 / 2) + 1;
  let z = new Float64Array(0);
  if (h1 !== 8 || h2 !== 5) throw new Error("two-stage kernel is unrolled for 16 + 10 taps");
  const coefficients = Float64Array.from([...s1, ...s2]);
  const run = (xs: Float64Array, count: number, out: Float64Array): void => {
    const [a0, a1, a2, a3, a4, a5, a6, a7, c0, c1, c2, c3, c4] = coefficients as unknown as number[];
    // Stage 1 over input indices [lo, count + margin - h1): z[2j] = x[j], z[2j+1] = x[j + 1/2].
    const lo = -(margin - h1);
    const zLen = 2 * (count - lo + (margin - h1));
    if (z.length < zLen) z = new Float64Array(zLen);
    const zz = z;
    for (let j = lo, k = 0; j < count + margin - h1; j++, k += 2) {
      const c = j + margin; // index of x[j] in xs
      zz[k] = xs[c]!;
      zz[k + 1] =
        a0! * (xs[c - 7]! + xs[c + 8]!) +
        a1! * (xs[c - 6]! + xs[c + 7]!) +
        a2! * (xs[c - 5]! + xs[c + 6]!) +
        a3! * (xs[c - 4]! + xs[c + 5]!) +
        a4! * (xs[c - 3]! + xs[c + 4]!) +
        a5! * (xs[c - 2]! + xs[c + 3]!) +
        a6! * (xs[c - 1]! + xs[c + 2]!) +
        a7! * (xs[c]! + xs[c + 1]!);
    }
    // Stage 2: quarter points between z[k] and z[k+1], symmetric 10-tap sums.
    for (let i = 0, k = -2 * lo, o = 0; i < count; i++, k += 2, o += 4) {
      out[o] = zz[k]!;
      out[o + 1] =
        c0! * (zz[k - 4]! + zz[k + 5]!) +
        c1! * (zz[k - 3]! + zz[k + 4]!) +
        c2! * (zz[k - 2]! + zz[k + 3]!) +
        c3! * (zz[k - 1]! + zz[k + 2]!) +
        c4! * (zz[k]! + zz[k + 1]!);
      out[o + 2] = zz[k + 1]!;
      out[o + 3] =
        c0! * (zz[k - 3]! + zz[k + 6]!) +
        c1! * (zz[k - 2]! + zz[k + 5]!) +
        c2! * (zz[k - 1]! + zz[k + 4]!) +
        c3! * (zz[k]! + zz[k + 3]!) +
        c4! * (zz[k + 1]! + zz[k + 2]!);
    }
  };
  /**
   * The hot loop of the whole analysis. Same sums in the same order as `run`
   * (so the same values to the last bit); H(j) is the stage-1 half-sample
   * value at j + 1/2, kept for j = i-2 … i+2 in locals.
   */
  const peak = (xs: Float64Array, count: number): number => {
    const a0 = coefficients[0]!, a1 = coefficients[1]!, a2 = coefficients[2]!, a3 = coefficients[3]!;
    const a4 = coefficients[4]!, a5 = coefficients[5]!, a6 = coefficients[6]!, a7 = coefficients[7]!;
    const c0 = coefficients[8]!, c1 = coefficients[9]!, c2 = coefficients[10]!, c3 = coefficients[11]!, c4 = coefficients[12]!;
    const half = (c: number): number =>
      a0 * (xs[c - 7]! + xs[c + 8]!) +
      a1 * (xs[c - 6]! + xs[c + 7]!) +
      a2 * (xs[c - 5]! + xs[c + 6]!) +
      a3 * (xs[c - 4]! + xs[c + 5]!) +
      a4 * (xs[c - 3]! + xs[c + 4]!) +
      a5 * (xs[c - 2]! + xs[c + 3]!) +
      a6 * (xs[c - 1]! + xs[c + 2]!) +
      a7 * (xs[c]! + xs[c + 1]!);
    let hm2 = half(margin - 2);
    let hm1 = half(margin - 1);
    let h0 = half(margin);
    let hp1 = half(margin + 1);
    let hi = 0;
    let lo = 0;
    for (let i = 0, c = margin; i < count; i++, c++) {
      const hp2 =
        a0 * (xs[c - 5]! + xs[c + 10]!) +
        a1 * (xs[c - 4]! + xs[c + 9]!) +
        a2 * (xs[c - 3]! + xs[c + 8]!) +
        a3 * (xs[c - 2]! + xs[c + 7]!) +
        a4 * (xs[c - 1]! + xs[c + 6]!) +
        a5 * (xs[c]! + xs[c + 5]!) +
        a6 * (xs[c + 1]! + xs[c + 4]!) +
        a7 * (xs[c + 2]! + xs[c + 3]!);
      const x0 = xs[c]!;
      const q1 =
        c0 * (xs[c - 2]! + hp2) + c1 * (hm2 + xs[c + 2]!) + c2 * (xs[c - 1]! + hp1) + c3 * (hm1 + xs[c + 1]!) + c4 * (x0 + h0);
      const q3 =
        c0 * (hm2 + xs[c + 3]!) + c1 * (xs[c - 1]! + hp2) + c2 * (hm1 + xs[c + 2]!) + c3 * (x0 + hp1) + c4 * (h0 + xs[c + 1]!);
      if (x0 > hi) hi = x0;
      if (x0 < lo) lo = x0;
      if (q1 > hi) hi = q1;
      if (q1 < lo) lo = q1;
      if (h0 > hi) hi = h0;
      if (h0 < lo) lo = h0;
      if (q3 > hi) hi = q3;
      if (q3 < lo) lo = q3;
      hm2 = hm1;
      hm1 = h0;
      h0 = hp1;
      hp1 = hp2;
    }
    return hi > -lo ? hi : -lo;
  };
  return { factor: 4, margin, gainBound: measuredGainBound(4, margin, run), run, peak, stageCoefficients: coefficients };
}

function polyphaseInterpolator(factor: number): Interpolator {
  const phases = Array.from({ length: factor - 1 }, (_, p) => fractionalTaps((p + 1) / factor, POLYPHASE_TAPS));
  const half = POLYPHASE_TAPS / 2;
  const margin = half + 1;
  if (POLYPHASE_TAPS !== 16) throw new Error("polyphase kernel is unrolled for 16 taps");
  const run = (xs: Float64Array, count: number, out: Float64Array): void => {
    // Phase by phase, so each phase's 16 taps stay in locals across the loop.
    for (let p = 0; p < phases.length; p++) {
      const h = phases[p]!;
      const h0 = h[0]!, h1 = h[1]!, h2 = h[2]!, h3 = h[3]!, h4 = h[4]!, h5 = h[5]!, h6 = h[6]!, h7 = h[7]!;
      const h8 = h[8]!, h9 = h[9]!, h10 = h[10]!, h11 = h[11]!, h12 = h[12]!, h13 = h[13]!, h14 = h[14]!, h15 = h[15]!;
      for (let i = 0, b = margin - half + 1, o = p + 1; i < count; i++, b++, o += factor) {
        out[o] =
          h0 * xs[b]! + h1 * xs[b + 1]! + h2 * xs[b + 2]! + h3 * xs[b + 3]! +
          h4 * xs[b + 4]! + h5 * xs[b + 5]! + h6 * xs[b + 6]! + h7 * xs[b + 7]! +
          h8 * xs[b + 8]! + h9 * xs[b + 9]! + h10 * xs[b + 10]! + h11 * xs[b + 11]! +
          h12 * xs[b + 12]! + h13 * xs[b + 13]! + h14 * xs[b + 14]! + h15 * xs[b + 15]!;
      }
    }
    for (let i = 0, o = 0; i < count; i++, o += factor) out[o] = xs[i + margin]!;
  };
  const peak = (xs: Float64Array, count: number): number => {
    let hi = 0;
    let lo = 0;
    for (let i = 0, c = margin; i < count; i++, c++) {
      const v = xs[c]!;
      if (v > hi) hi = v;
      if (v < lo) lo = v;
    }
    for (let p = 0; p < phases.length; p++) {
      const h = phases[p]!;
      const h0 = h[0]!, h1 = h[1]!, h2 = h[2]!, h3 = h[3]!, h4 = h[4]!, h5 = h[5]!, h6 = h[6]!, h7 = h[7]!;
      const h8 = h[8]!, h9 = h[9]!, h10 = h[10]!, h11 = h[11]!, h12 = h[12]!, h13 = h[13]!, h14 = h[14]!, h15 = h[15]!;
      for (let i = 0, b = margin - half + 1; i < count; i++, b++) {
        const v =
          h0 * xs[b]! + h1 * xs[b + 1]! + h2 * xs[b + 2]! + h3 * xs[b + 3]! +
          h4 * xs[b + 4]! + h5 * xs[b + 5]! + h6 * xs[b + 6]! + h7 * xs[b + 7]! +
          h8 * xs[b + 8]! + h9 * xs[b + 9]! + h10 * xs[b + 10]! + h11 * xs[b + 11]! +
          h12 * xs[b + 12]! + h13 * xs[b + 13]! + h14 * xs[b + 14]! + h15 * xs[b + 15]!;
        if (v > hi) hi = v;
        if (v < lo) lo = v;
      }
    }
    return hi > -lo ? hi : -lo;
  };
  return { factor, margin, gainBound: measuredGainBound(factor, margin, run), run, peak };
}

const interpolators = new Map<number, Interpolator>();

function interpolatorFor(factor: number): Interpolator {
  if (!Number.isInteger(factor) || factor < 2) throw new RangeError(`oversampling must be an integer >= 2, got ${factor}`);
  let interp = interpolators.get(factor);
  if (!interp) {
    interp = factor === 4 ? twoStageInterpolator() : polyphaseInterpolator(factor);
    interpolators.set(factor, interp);
  }
  return interp;
}

/** Copies x[start - margin, end + margin) into a Float64Array, zero outside the signal. */
function contextCopy(x: ArrayLike<number>, start: number, end: number, margin: number, into: Float64Array): Float64Array {
  const len = end - start + 2 * margin;
  const xs = into.length >= len ? into : new Float64Array(len);
  const first = start - margin;
  const lo = Math.max(0, -first);
  const hi = Math.min(len, x.length - first);
  for (let k = 0; k < lo && k < len; k++) xs[k] = 0;
  for (let k = lo; k < hi; k++) xs[k] = x[first + k]!;
  for (let k = Math.max(lo, hi); k < len; k++) xs[k] = 0;
  return xs;
}

/**
 * The whole oversampled signal of one channel: out[i * L + p] is the value at
 * i + p / L (the signal is taken as zero outside its samples). For tests and
 * previews; the true-peak scan works block by block without this buffer.
 */
export function oversample(x: ArrayLike<number>, factor: number): Float64Array {
  const interp = interpolatorFor(factor);
  const xs = contextCopy(x, 0, x.length, interp.margin, new Float64Array(0));
  const out = new Float64Array(x.length * factor);
  interp.run(xs, x.length, out);
  return out;
}

/** The exact skip bound of the interpolator used at this factor (see the header). */
export function truePeakGainBound(factor: number): number {
  return interpolatorFor(factor).gainBound;
}

/** Sample peak of each block and of each block's reach (the block plus `margin` samples either side). */
function blockReach(x: ArrayLike<number>, margin: number): Float64Array {
  const n = x.length;
  const blocks = Math.ceil(n / BLOCK);
  const own = new Float64Array(blocks);
  for (let b = 0; b < blocks; b++) {
    const end = Math.min(n, (b + 1) * BLOCK);
    let hi = 0;
    let lo = 0;
    for (let i = b * BLOCK; i < end; i++) {
      const v = x[i]!;
      if (v > hi) hi = v;
      if (v < lo) lo = v;
    }
    own[b] = hi > -lo ? hi : -lo;
  }
  const reach = new Float64Array(blocks);
  for (let b = 0; b < blocks; b++) {
    let m = own[b]!;
    // margin < BLOCK, so the reach touches at most the neighbouring blocks' edges.
    if (b > 0) for (let i = b * BLOCK - margin; i < b * BLOCK; i++) m = Math.max(m, Math.abs(x[i]!));
    if (b + 1 < blocks) for (let i = (b + 1) * BLOCK; i < Math.min(n, (b + 1) * BLOCK + margin); i++) m = Math.max(m, Math.abs(x[i]!));
    reach[b] = m;
  }
  return reach;
}

/** Block indices, loudest reach first. */
function loudestFirst(reach: Float64Array): Int32Array {
  const order = Int32Array.from({ length: reach.length }, (_, b) => b);
  return order.sort((p, q) => reach[q]! - reach[p]!);
}

/**
 * The input range a block scans: the first block also covers the ring-in
 * before sample 0 (from the zeros before it); one extra input index at the
 * end so the points after the block's last sample (and after the signal's
 * end, where it rings out) are included.
 */
function blockRange(b: number, n: number): [number, number] {
  return [b === 0 ? -1 : b * BLOCK, Math.min(n, b * BLOCK + BLOCK) + 1];
}

let simdKernel: SimdKernel | null | undefined;

function simdFor(interp: Interpolator): SimdKernel | null {
  if (!interp.stageCoefficients) return null;
  if (simdKernel === undefined) {
    simdKernel = loadSimdKernel(interp.stageCoefficients, interp.margin, BLOCK + 2 + 2 * interp.margin);
  }
  return simdKernel;
}

/**
 * Two channels through the SIMD kernel, blocks of either channel loudest
 * first: float32 lanes for Float32Array samples (what decodeWav returns),
 * double lanes otherwise (see ./true-peak-simd for both).
 */
function stereoPeak(kernel: SimdKernel, margin: number, gainBound: number, left: ArrayLike<number>, right: ArrayLike<number>, best: number): number {
  const n = left.length;
  const reachL = blockReach(left, margin);
  const reachR = right === left ? reachL : blockReach(right, margin);
  const reach = reachL.map((v, b) => Math.max(v, reachR[b]!));
  const single = left instanceof Float32Array && right instanceof Float32Array;
  const frames = single ? kernel.frames32 : kernel.frames64;
  for (const b of loudestFirst(reach)) {
    if (reach[b]! * gainBound <= best) break;
    const [start, end] = blockRange(b, n);
    const first = start - margin;
    const len = end - start + 2 * margin;
    // Zeros outside the signal; the copy loop itself stays branch-free inside it.
    const lo = Math.max(0, -first);
    const hi = Math.min(len, n - first);
    frames.fill(0, 0, 2 * lo);
    for (let k = lo, i = first + lo; k < hi; k++, i++) {
      frames[2 * k] = left[i]!;
      frames[2 * k + 1] = right[i]!;
    }
    if (hi < len) frames.fill(0, 2 * Math.max(lo, hi), 2 * len);
    const [pl, pr] = single ? kernel.peak32(end - start) : kernel.peak64(end - start);
    if (pl > best) best = pl;
    if (pr > best) best = pr;
  }
  return best;
}

/** Largest true peak (linear, full scale = 1.0) over all channels; 0 for empty input. */
export function truePeakLinear(channels: readonly ArrayLike<number>[], sampleRate: number, opts: TruePeakOptions = {}): number {
  const interp = interpolatorFor(opts.oversampling ?? defaultOversampling(sampleRate));
  const { margin, gainBound } = interp;
  let best = 0;
  const kernel = opts.simd === false ? null : simdFor(interp);
  let rest = channels;
  if (kernel) {
    // Channels two by two (an odd last one with itself).
    for (let c = 0; c < channels.length; c += 2) {
      const left = channels[c]!;
      const right = channels[c + 1] ?? left;
      if (left.length === 0) continue;
      best = stereoPeak(kernel, margin, gainBound, left, right, best);
    }
    rest = [];
  }
  let scratch: Float64Array = new Float64Array(BLOCK + 3 * margin);
  for (const x of rest) {
    const n = x.length;
    if (n === 0) continue;
    const reach = blockReach(x, margin);
    for (const b of loudestFirst(reach)) {
      if (reach[b]! * gainBound <= best) break;
      const [start, end] = blockRange(b, n);
      scratch = contextCopy(x, start, end, margin, scratch);
      const v = interp.peak(scratch, end - start);
      if (v > best) best = v;
    }
  }
  return best;
}
