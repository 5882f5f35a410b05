/**
 * Crossover filters as cascades of second-order sections.
 *
 *  - Butterworth of order n (n = 2, 4, 8 → 12/24/48 dB/oct): n/2 sections with
 *    Q_k = 1 / (2 cos θ_k), θ_k = (2k - 1) π / (2n) — the Butterworth poles.
 *  - Linkwitz-Riley of order n (LR2/LR4/LR8 → 12/24/48 dB/oct): the square of a
 *    Butterworth of order n/2 (Linkwitz, "Active Crossover Networks for
 *    Noncoincident Drivers", JAES 1976). LR2 is (first-order)², i.e. one
 *    section with Q = 0.5; LR4 is two Q = 1/√2 sections; LR8 is the order-4
 *    Butterworth twice.
 *
 * `crossoverAnalogResponse` evaluates the analogue prototype at s = jω/ωc
 * (what the published properties are stated for). `crossoverSections` gives
 * the device's biquads at a sample rate via the Web Audio / Audio EQ Cookbook
 * lowpass/highpass (bilinear transform prewarped at fc), and
 * `crossoverDigitalResponse` evaluates those.
 */

import { biquadComplexResponse, eqBandToBiquad, type BiquadCoefficients } from "./biquad";

export type CrossoverAlignment = "butterworth" | "linkwitz-riley";
export type CrossoverSlope = 12 | 24 | 48;
export type CrossoverBranch = "lowpass" | "highpass";

export interface CrossoverSpec {
  readonly alignment: CrossoverAlignment;
  readonly slopeDbPerOctave: CrossoverSlope;
  readonly frequencyHz: number;
}

export interface Complex {
  readonly re: number;
  readonly im: number;
}

export interface CrossoverPoint extends Complex {
  readonly magnitudeDb: number;
  readonly phaseRad: number;
}

/** Butterworth section Qs for an even order n. */
export function butterworthQs(order: number): number[] {
  if (!Number.isInteger(order) || order < 2 || order % 2 !== 0) throw new RangeError(`order must be even, got ${order}`);
  const qs: number[] = [];
  for (let k = 1; k <= order / 2; k++) {
    const theta = ((2 * k - 1) * Math.PI) / (2 * order);
    qs.push(1 / (2 * Math.cos(theta)));
  }
  return qs;
}

/** Linear Qs of the second-order sections that make up one branch. */
export function sectionQs(alignment: CrossoverAlignment, slope: CrossoverSlope): number[] {
  const order = slope / 6;
  if (alignment === "butterworth") return butterworthQs(order);
  // LR2 = two first-order Butterworth poles at -1: s^2 + 2s + 1, Q = 0.5.
  if (order === 2) return [0.5];
  const half = butterworthQs(order / 2);
  return [...half, ...half];
}

function mul(a: Complex, b: Complex): Complex {
  return { re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re };
}

function point(h: Complex): CrossoverPoint {
  const mag = Math.hypot(h.re, h.im);
  return { re: h.re, im: h.im, magnitudeDb: 20 * Math.log10(mag), phaseRad: Math.atan2(h.im, h.re) };
}

/** Analogue H(jω) of one branch: product over sections of 1/(s²+s/Q+1) or s²/(s²+s/Q+1), s = j f/fc. */
export function crossoverAnalogResponse(spec: CrossoverSpec, branch: CrossoverBranch, frequencyHz: number): CrossoverPoint {
  return point(analogComplex(spec, branch, frequencyHz));
}

function analogComplex(spec: CrossoverSpec, branch: CrossoverBranch, frequencyHz: number): Complex {
  validateSpec(spec);
  const w = frequencyHz / spec.frequencyHz; // s = j w
  let h: Complex = { re: 1, im: 0 };
  for (const q of sectionQs(spec.alignment, spec.slopeDbPerOctave)) {
    // s^2 + s/Q + 1 at s = jw → (1 - w^2) + j (w / Q)
    const den: Complex = { re: 1 - w * w, im: w / q };
    const num: Complex = branch === "lowpass" ? { re: 1, im: 0 } : { re: -w * w, im: 0 };
    const d2 = den.re * den.re + den.im * den.im;
    h = mul(h, { re: (num.re * den.re + num.im * den.im) / d2, im: (num.im * den.re - num.re * den.im) / d2 });
  }
  return h;
}

export interface SumOptions {
  /** Invert the high-pass branch before summing (needed for LR2's flat sum). */
  readonly invertHighpass?: boolean;
}

/** LP + HP (optionally HP inverted), analogue prototypes. */
export function crossoverAnalogSum(spec: CrossoverSpec, frequencyHz: number, opts: SumOptions = {}): CrossoverPoint {
  const lp = analogComplex(spec, "lowpass", frequencyHz);
  const hp = analogComplex(spec, "highpass", frequencyHz);
  const sign = opts.invertHighpass ? -1 : 1;
  return point({ re: lp.re + sign * hp.re, im: lp.im + sign * hp.im });
}

/** Biquad sections for one branch at a sample rate (bilinear, prewarped at fc). */
export function crossoverSections(spec: CrossoverSpec, branch: CrossoverBranch, sampleRate: number): BiquadCoefficients[] {
  validateSpec(spec);
  if (spec.frequencyHz >= sampleRate / 2) throw new RangeError("crossover frequency must be below Nyquist");
  return sectionQs(spec.alignment, spec.slopeDbPerOctave).map((q) =>
    eqBandToBiquad({ type: branch, frequencyHz: spec.frequencyHz, gainDb: 0, q }, sampleRate),
  );
}

function cascadeComplex(sections: readonly BiquadCoefficients[], frequencyHz: number, sampleRate: number): Complex {
  let h: Complex = { re: 1, im: 0 };
  for (const s of sections) h = mul(h, biquadComplexResponse(s, frequencyHz, sampleRate));
  return h;
}

export function crossoverDigitalResponse(
  spec: CrossoverSpec,
  branch: CrossoverBranch,
  frequencyHz: number,
  sampleRate: number,
): CrossoverPoint {
  return point(cascadeComplex(crossoverSections(spec, branch, sampleRate), frequencyHz, sampleRate));
}

export function crossoverDigitalSum(
  spec: CrossoverSpec,
  frequencyHz: number,
  sampleRate: number,
  opts: SumOptions = {},
): CrossoverPoint {
  const lp = cascadeComplex(crossoverSections(spec, "lowpass", sampleRate), frequencyHz, sampleRate);
  const hp = cascadeComplex(crossoverSections(spec, "highpass", sampleRate), frequencyHz, sampleRate);
  const sign = opts.invertHighpass ? -1 : 1;
  return point({ re: lp.re + sign * hp.re, im: lp.im + sign * hp.im });
}

function validateSpec(spec: CrossoverSpec): void {
  if (!Number.isFinite(spec.frequencyHz) || spec.frequencyHz <= 0) {
    throw new RangeError(`crossover frequency must be > 0 Hz, got ${spec.frequencyHz}`);
  }
  if (![12, 24, 48].includes(spec.slopeDbPerOctave)) {
    throw new RangeError(`slope must be 12, 24 or 48 dB/octave, got ${spec.slopeDbPerOctave}`);
  }
}
