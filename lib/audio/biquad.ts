/**
 * Biquad coefficients exactly as the W3C Web Audio API specifies them for
 * BiquadFilterNode ("Filters Characteristics" section, which follows the
 * Audio EQ Cookbook), plus frequency-response evaluation in double precision.
 *
 * Units follow the spec on purpose: for "lowpass" and "highpass" the Q value
 * is in dB (alpha = sin(w0) / (2 * 10^(Q/20))); for bandpass, notch, allpass
 * and peaking it is linear (alpha = sin(w0) / (2Q)); the shelves ignore Q and
 * use a fixed slope S = 1. `eqBandToBiquad` is the friendlier entry point for
 * tone-curve bands, where a user types a linear Q for every type.
 */

export const WEB_AUDIO_BIQUAD_TYPES = [
  "lowpass",
  "highpass",
  "bandpass",
  "lowshelf",
  "highshelf",
  "peaking",
  "notch",
  "allpass",
] as const;

export type WebAudioBiquadType = (typeof WEB_AUDIO_BIQUAD_TYPES)[number];

/** Coefficients normalised by a0: H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2). */
export interface BiquadCoefficients {
  readonly b0: number;
  readonly b1: number;
  readonly b2: number;
  readonly a1: number;
  readonly a2: number;
}

export interface WebAudioBiquadParams {
  readonly type: WebAudioBiquadType;
  readonly frequencyHz: number;
  /** In dB for lowpass/highpass, linear for bandpass/notch/allpass/peaking, unused for shelves. */
  readonly q: number;
  /** Used by peaking and the shelves only. */
  readonly gainDb: number;
  readonly sampleRate: number;
}

const IDENTITY: BiquadCoefficients = { b0: 1, b1: 0, b2: 0, a1: 0, a2: 0 };
const SILENCE: BiquadCoefficients = { b0: 0, b1: 0, b2: 0, a1: 0, a2: 0 };

function gainOnly(linearGain: number): BiquadCoefficients {
  return { b0: linearGain, b1: 0, b2: 0, a1: 0, a2: 0 };
}

function normalise(
  b0: number,
  b1: number,
  b2: number,
  a0: number,
  a1: number,
  a2: number,
): BiquadCoefficients {
  return { b0: b0 / a0, b1: b1 / a0, b2: b2 / a0, a1: a1 / a0, a2: a2 / a0 };
}

/**
 * The spec's formulas are undefined (or degenerate) at f0 = 0 and f0 = Nyquist.
 * There we return the limit of each formula as f0 approaches the edge, which is
 * also what Chromium's implementation does; the spec leaves the edges open.
 */
function edgeCase(type: WebAudioBiquadType, atNyquist: boolean, a: number): BiquadCoefficients {
  switch (type) {
    case "lowpass":
      return atNyquist ? IDENTITY : SILENCE;
    case "highpass":
      return atNyquist ? SILENCE : IDENTITY;
    case "lowshelf":
      return atNyquist ? gainOnly(a * a) : IDENTITY;
    case "highshelf":
      return atNyquist ? IDENTITY : gainOnly(a * a);
    case "bandpass":
      return SILENCE;
    case "peaking":
    case "notch":
    case "allpass":
      return IDENTITY;
  }
}

/** Coefficients per the Web Audio spec, with the spec's own Q units. */
export function webAudioBiquad(params: WebAudioBiquadParams): BiquadCoefficients {
  const { type, frequencyHz, q, gainDb, sampleRate } = params;
  if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) {
    throw new RangeError(`sampleRate must be a positive number, got ${sampleRate}`);
  }
  if (!Number.isFinite(frequencyHz) || !Number.isFinite(q) || !Number.isFinite(gainDb)) {
    throw new RangeError("frequency, Q and gain must be finite numbers");
  }
  const nyquist = sampleRate / 2;
  // Spec: A = 10^(G/40), w0 = 2 pi f0 / Fs.
  const a = Math.pow(10, gainDb / 40);
  if (frequencyHz <= 0) return edgeCase(type, false, a);
  if (frequencyHz >= nyquist) return edgeCase(type, true, a);

  const w0 = (2 * Math.PI * frequencyHz) / sampleRate;
  const cosW0 = Math.cos(w0);
  const sinW0 = Math.sin(w0);

  switch (type) {
    case "lowpass":
    case "highpass": {
      // Spec: alpha_QdB = sin(w0) / (2 * 10^(Q/20)) — Q in dB for these two.
      const alpha = sinW0 / (2 * Math.pow(10, q / 20));
      if (type === "lowpass") {
        return normalise((1 - cosW0) / 2, 1 - cosW0, (1 - cosW0) / 2, 1 + alpha, -2 * cosW0, 1 - alpha);
      }
      return normalise((1 + cosW0) / 2, -(1 + cosW0), (1 + cosW0) / 2, 1 + alpha, -2 * cosW0, 1 - alpha);
    }
    case "bandpass":
    case "notch":
    case "allpass":
    case "peaking": {
      if (!(q > 0)) throw new RangeError(`Q must be > 0 for ${type}, got ${q}`);
      // Spec: alpha_Q = sin(w0) / (2Q) — linear Q.
      const alpha = sinW0 / (2 * q);
      if (type === "bandpass") {
        return normalise(alpha, 0, -alpha, 1 + alpha, -2 * cosW0, 1 - alpha);
      }
      if (type === "notch") {
        return normalise(1, -2 * cosW0, 1, 1 + alpha, -2 * cosW0, 1 - alpha);
      }
      if (type === "allpass") {
        return normalise(1 - alpha, -2 * cosW0, 1 + alpha, 1 + alpha, -2 * cosW0, 1 - alpha);
      }
      return normalise(1 + alpha * a, -2 * cosW0, 1 - alpha * a, 1 + alpha / a, -2 * cosW0, 1 - alpha / a);
    }
    case "lowshelf":
    case "highshelf": {
      // Spec: S = 1, alpha_S = sin(w0)/2 * sqrt((A + 1/A)(1/S - 1) + 2) = sin(w0)/2 * sqrt(2).
      const alphaS = (sinW0 / 2) * Math.SQRT2;
      const twoSqrtAAlpha = 2 * alphaS * Math.sqrt(a);
      if (type === "lowshelf") {
        return normalise(
          a * (a + 1 - (a - 1) * cosW0 + twoSqrtAAlpha),
          2 * a * (a - 1 - (a + 1) * cosW0),
          a * (a + 1 - (a - 1) * cosW0 - twoSqrtAAlpha),
          a + 1 + (a - 1) * cosW0 + twoSqrtAAlpha,
          -2 * (a - 1 + (a + 1) * cosW0),
          a + 1 + (a - 1) * cosW0 - twoSqrtAAlpha,
        );
      }
      return normalise(
        a * (a + 1 + (a - 1) * cosW0 + twoSqrtAAlpha),
        -2 * a * (a - 1 + (a + 1) * cosW0),
        a * (a + 1 + (a - 1) * cosW0 - twoSqrtAAlpha),
        a + 1 - (a - 1) * cosW0 + twoSqrtAAlpha,
        2 * (a - 1 - (a + 1) * cosW0),
        a + 1 - (a - 1) * cosW0 - twoSqrtAAlpha,
      );
    }
  }
}

/** The band types a tone curve offers; all take a linear Q from the user. */
export type EqBandType = "peaking" | "lowshelf" | "highshelf" | "highpass" | "lowpass" | "notch";

export interface EqBandParams {
  readonly type: EqBandType;
  readonly frequencyHz: number;
  readonly gainDb: number;
  /** Linear Q for every type (e.g. 0.707 for a Butterworth-like high-pass). Ignored by shelves. */
  readonly q: number;
}

/** Linear Q → the spec's dB Q for lowpass/highpass: Q_dB = 20 log10(Q). */
export function linearQToDb(qLinear: number): number {
  if (!(qLinear > 0)) throw new RangeError(`linear Q must be > 0, got ${qLinear}`);
  return 20 * Math.log10(qLinear);
}

/**
 * Maps an EQ band (linear Q everywhere) onto the spec's parameters and returns
 * the spec's coefficients, so the maths stays the spec's.
 */
export function eqBandToWebAudioParams(band: EqBandParams, sampleRate: number): WebAudioBiquadParams {
  const q = band.type === "lowpass" || band.type === "highpass" ? linearQToDb(band.q) : band.q;
  return { type: band.type, frequencyHz: band.frequencyHz, q, gainDb: band.gainDb, sampleRate };
}

export function eqBandToBiquad(band: EqBandParams, sampleRate: number): BiquadCoefficients {
  return webAudioBiquad(eqBandToWebAudioParams(band, sampleRate));
}

export interface FrequencyResponsePoint {
  /** Linear magnitude |H(e^jw)|. */
  readonly magnitude: number;
  /** 20 log10 |H|; -Infinity at an exact zero. */
  readonly magnitudeDb: number;
  /** arg H(e^jw) in radians, (-pi, pi]. */
  readonly phaseRad: number;
  readonly re: number;
  readonly im: number;
}

/** H(e^jw) of one section at `frequencyHz`, evaluated in double precision. */
export function biquadComplexResponse(
  c: BiquadCoefficients,
  frequencyHz: number,
  sampleRate: number,
): { re: number; im: number } {
  const w = (2 * Math.PI * frequencyHz) / sampleRate;
  const c1 = Math.cos(w);
  const s1 = Math.sin(w);
  const c2 = Math.cos(2 * w);
  const s2 = Math.sin(2 * w);
  // z^-1 = cos w - j sin w, z^-2 = cos 2w - j sin 2w.
  const nr = c.b0 + c.b1 * c1 + c.b2 * c2;
  const ni = -(c.b1 * s1 + c.b2 * s2);
  const dr = 1 + c.a1 * c1 + c.a2 * c2;
  const di = -(c.a1 * s1 + c.a2 * s2);
  const den = dr * dr + di * di;
  return { re: (nr * dr + ni * di) / den, im: (ni * dr - nr * di) / den };
}

export function biquadResponse(
  c: BiquadCoefficients,
  frequencyHz: number,
  sampleRate: number,
): FrequencyResponsePoint {
  const { re, im } = biquadComplexResponse(c, frequencyHz, sampleRate);
  const magnitude = Math.hypot(re, im);
  return { magnitude, magnitudeDb: 20 * Math.log10(magnitude), phaseRad: Math.atan2(im, re), re, im };
}

/** Magnitude in dB of one section; convenience for plots. */
export function biquadMagnitudeDb(c: BiquadCoefficients, frequencyHz: number, sampleRate: number): number {
  return biquadResponse(c, frequencyHz, sampleRate).magnitudeDb;
}

/**
 * Runs one section over a buffer (transposed direct form II, Float64 state).
 * Used by the K-weighting and available for device-side previews.
 */
export function applyBiquadInPlace(c: BiquadCoefficients, x: Float64Array): void {
  const { b0, b1, b2, a1, a2 } = c;
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < x.length; i++) {
    const input = x[i]!;
    const y = b0 * input + s1;
    s1 = b1 * input - a1 * y + s2;
    s2 = b2 * input - a2 * y;
    x[i] = y;
  }
}
