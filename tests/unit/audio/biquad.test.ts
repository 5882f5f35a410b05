/**
 * Biquads against the W3C Web Audio API spec, BiquadFilterNode "Filters
 * Characteristics" (WebAudio/web-audio-api index.bs, read via the search
 * tool), and properties stated in the Audio EQ Cookbook (R. Bristow-Johnson),
 * which the spec follows.
 *
 * Worked values: each expected coefficient below is the spec's formula
 * evaluated by hand (30-digit arithmetic, independent of lib/audio), with
 * the intermediate numbers shown.
 */
import { describe, expect, it } from "vitest";
import {
  biquadResponse,
  eqBandToBiquad,
  linearQToDb,
  webAudioBiquad,
  type BiquadCoefficients,
  type EqBandType,
} from "@/lib/audio/biquad";

function expectCoefficients(actual: BiquadCoefficients, expected: BiquadCoefficients): void {
  for (const k of ["b0", "b1", "b2", "a1", "a2"] as const) {
    expect(Math.abs(actual[k] - expected[k]), k).toBeLessThan(1e-13);
  }
}

describe("spec formulas at worked values", () => {
  it("peaking, f0 = 1 kHz, G = +6 dB, Q = 1 (linear), Fs = 48 kHz", () => {
    // A = 10^(6/40) = 1.4125375446227543
    // w0 = 2π·1000/48000 = 0.13089969389957472; cos w0 = 0.99144486137381041; sin w0 = 0.13052619222005159
    // alpha_Q = sin w0 / (2Q) = 0.065263096110025796
    // b0 = 1 + alpha_Q·A = 1.0921865735337347 ; b1 = -2 cos w0 = -1.9828897227476208 ; b2 = 1 - alpha_Q·A = 0.9078134264662653
    // a0 = 1 + alpha_Q/A = 1.0462027337669496 ; a1 = -2 cos w0 ; a2 = 1 - alpha_Q/A = 0.9537972662330504
    // normalised by a0:
    expectCoefficients(webAudioBiquad({ type: "peaking", frequencyHz: 1000, q: 1, gainDb: 6, sampleRate: 48_000 }), {
      b0: 1.043953086990335,
      b1: -1.8953207239365961,
      b2: 0.86772228475985647,
      a1: -1.8953207239365961,
      a2: 0.91167537175019151,
    });
  });

  it("lowpass, f0 = 2 kHz, Q = 0 dB (spec dB units), Fs = 48 kHz", () => {
    // w0 = 2π·2000/48000 = 0.26179938779914944; cos w0 = 0.96592582628906829; sin w0 = 0.25881904510252076
    // alpha_QdB = sin w0 / (2·10^(0/20)) = 0.12940952255126038
    // b0 = b2 = (1 - cos w0)/2 = 0.017037086855465855 ; b1 = 1 - cos w0 = 0.03407417371093171
    // a0 = 1 + alpha = 1.1294095225512604 ; a1 = -2 cos w0 = -1.9318516525781366 ; a2 = 1 - alpha = 0.8705904774487396
    expectCoefficients(webAudioBiquad({ type: "lowpass", frequencyHz: 2000, q: 0, gainDb: 0, sampleRate: 48_000 }), {
      b0: 0.015084950600540555,
      b1: 0.03016990120108111,
      b2: 0.015084950600540555,
      a1: -1.7104970464692145,
      a2: 0.7708368488713767,
    });
  });

  it("lowshelf, f0 = 100 Hz, G = +6 dB, Fs = 48 kHz (S = 1, Q unused)", () => {
    // A = 1.4125375446227543 ; w0 = 0.013089969389957472 ; cos w0 = 0.99991432757400703 ; sin w0 = 0.01308959557134444
    // alpha_S = sin w0 / 2 · sqrt(2) = 0.0092557417914870546 ; 2·sqrt(A)·alpha_S = 0.022000939471528528
    // a0 = (A+1) + (A-1) cos w0 + 2 sqrt(A) alpha_S = 2.8470406856247761 ; then each coefficient / a0:
    const expected = { b0: 1.003217895737233, b1: -1.9843644307768978, b2: 0.98138669874913173, a1: -1.9844243291390486, a2: 0.98454469612421399 };
    expectCoefficients(webAudioBiquad({ type: "lowshelf", frequencyHz: 100, q: 123, gainDb: 6, sampleRate: 48_000 }), expected);
  });

  it("EQ bands give a linear Q to highpass/lowpass, converted to the spec's dB: Q_dB = 20·log10(Q)", () => {
    // 20·log10(1/√2) = -3.0103 dB; 20·log10(2) = 6.0206 dB.
    expect(linearQToDb(Math.SQRT1_2)).toBeCloseTo(-3.0103, 4);
    expect(linearQToDb(2)).toBeCloseTo(6.0206, 4);
    // With Q_dB = 0 the spec's alpha equals the linear-Q alpha for Q = 1: same worked lowpass as above.
    expectCoefficients(eqBandToBiquad({ type: "lowpass", frequencyHz: 2000, q: 1, gainDb: 0 }, 48_000), {
      b0: 0.015084950600540555,
      b1: 0.03016990120108111,
      b2: 0.015084950600540555,
      a1: -1.7104970464692145,
      a2: 0.7708368488713767,
    });
  });
});

describe("Audio EQ Cookbook properties", () => {
  const fs = 48_000;
  it.each([
    [1000, 6, 1],
    [63, -9, 4],
    [12_000, 3.5, 0.7],
  ])("peaking: gain at f0 equals gainDb (f0 %i Hz, %f dB, Q %f)", (f0, gainDb, q) => {
    // Cookbook: peakingEQ has |H| = A² (= gainDb) at w0.
    const c = eqBandToBiquad({ type: "peaking", frequencyHz: f0, gainDb, q }, fs);
    expect(biquadResponse(c, f0, fs).magnitudeDb).toBeCloseTo(gainDb, 9);
  });

  it.each(["lowshelf", "highshelf"] as const)("%s: half the gain at f0 (the cookbook's shelf midpoint)", (type) => {
    // Cookbook: for shelves f0 is the midpoint frequency — |H(f0)| = A, i.e. gainDb/2.
    for (const gainDb of [6, -12]) {
      const c = eqBandToBiquad({ type, frequencyHz: 800, gainDb, q: 1 }, fs);
      expect(biquadResponse(c, 800, fs).magnitudeDb).toBeCloseTo(gainDb / 2, 9);
      // and the full gain far on the shelf side:
      const far = type === "lowshelf" ? 10 : 23_000;
      expect(biquadResponse(c, far, fs).magnitudeDb).toBeCloseTo(gainDb, 1);
    }
  });

  it.each(["highpass", "lowpass"] as const)("%s with Q = 1/√2 (linear): -3.01 dB at f0", (type) => {
    // Cookbook (BLT prewarped at f0): |H(f0)| = Q → 20·log10(0.7071) = -3.0103 dB.
    const c = eqBandToBiquad({ type, frequencyHz: 80, gainDb: 0, q: Math.SQRT1_2 }, fs);
    expect(biquadResponse(c, 80, fs).magnitudeDb).toBeCloseTo(-3.0103, 4);
  });

  it("notch: -∞ at f0 (numerator zero on the unit circle)", () => {
    // Cookbook notch: b = [1, -2cos w0, 1] has its zeros at e^{±j w0}.
    const c = eqBandToBiquad({ type: "notch", frequencyHz: 60, gainDb: 0, q: 10 }, fs);
    expect(biquadResponse(c, 60, fs).magnitudeDb).toBeLessThan(-200);
    expect(Math.abs(biquadResponse(c, 1000, fs).magnitudeDb)).toBeLessThan(0.01);
  });

  it("phase: a lowpass lags by 90° at f0 (second-order section at resonance)", () => {
    // Textbook second-order low-pass: arg H(j w0) = -90°; the BLT maps w0 to f0 exactly.
    const c = eqBandToBiquad({ type: "lowpass", frequencyHz: 1000, gainDb: 0, q: 0.9 }, fs);
    expect(biquadResponse(c, 1000, fs).phaseRad).toBeCloseTo(-Math.PI / 2, 9);
  });

  it("edge frequencies use the limits of the formulas (spec leaves f0 = 0 and Nyquist open)", () => {
    const types: EqBandType[] = ["peaking", "lowshelf", "highshelf", "highpass", "lowpass", "notch"];
    for (const type of types) {
      const c = eqBandToBiquad({ type, frequencyHz: 30_000, gainDb: 6, q: 1 }, 44_100);
      for (const k of ["b0", "b1", "b2", "a1", "a2"] as const) expect(Number.isFinite(c[k])).toBe(true);
    }
    // Lowshelf above Nyquist boosts everything by the full gain; lowpass passes everything.
    expect(biquadResponse(eqBandToBiquad({ type: "lowshelf", frequencyHz: 30_000, gainDb: 6, q: 1 }, 44_100), 1000, 44_100).magnitudeDb).toBeCloseTo(6, 9);
    expect(biquadResponse(eqBandToBiquad({ type: "lowpass", frequencyHz: 30_000, gainDb: 0, q: 1 }, 44_100), 1000, 44_100).magnitudeDb).toBeCloseTo(0, 9);
  });

  it("rejects non-positive linear Q", () => {
    expect(() => eqBandToBiquad({ type: "peaking", frequencyHz: 100, gainDb: 3, q: 0 }, fs)).toThrow(RangeError);
    expect(() => linearQToDb(-1)).toThrow(RangeError);
  });
});
