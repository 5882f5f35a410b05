import { describe, expect, it } from "vitest";
import { biquadComplexResponse, type BiquadCoefficients } from "@/lib/audio/biquad";
import { kWeightingCoefficients } from "@/lib/audio/k-weighting";

// ITU-R BS.1770-4, Annex 1, Table 1 (pre-filter, "stage 1") at 48 kHz.
const TABLE1: BiquadCoefficients = {
  b0: 1.53512485958697,
  b1: -2.69169618940638,
  b2: 1.19839281085285,
  a1: -1.69065929318241,
  a2: 0.73248077421585,
};
// ITU-R BS.1770-4, Annex 1, Table 2 (RLB weighting, "stage 2") at 48 kHz.
const TABLE2: BiquadCoefficients = { b0: 1.0, b1: -2.0, b2: 1.0, a1: -1.99004745483398, a2: 0.99007225036621 };

function magnitudeDb(sections: BiquadCoefficients[], f: number, fs: number): number {
  let mag = 1;
  for (const s of sections) {
    const { re, im } = biquadComplexResponse(s, f, fs);
    mag *= Math.hypot(re, im);
  }
  return 20 * Math.log10(mag);
}

describe("K-weighting coefficients derived from the analogue prototype", () => {
  it("reproduce BS.1770-4 Annex 1 Tables 1 and 2 at 48 kHz to 1e-8", () => {
    const { shelf, highpass } = kWeightingCoefficients(48_000);
    for (const key of ["b0", "b1", "b2", "a1", "a2"] as const) {
      // Source: ITU-R BS.1770-4 Annex 1 Table 1 (shelf) — published to 14 decimals.
      expect(Math.abs(shelf[key] - TABLE1[key]), `shelf ${key}`).toBeLessThan(1e-8);
      // Source: ITU-R BS.1770-4 Annex 1 Table 2 (RLB high-pass).
      expect(Math.abs(highpass[key] - TABLE2[key]), `high-pass ${key}`).toBeLessThan(1e-8);
    }
  });

  it.each([44_100, 96_000])("at %i Hz give the same response as the published 48 kHz filter below 10 kHz (±0.05 dB)", (fs) => {
    const derived = kWeightingCoefficients(fs);
    for (const f of [20, 40, 100, 500, 1000, 2000, 5000, 10_000]) {
      // Reference: the response of the BS.1770-4 Tables 1+2 filter at 48 kHz, evaluated at f.
      // Bilinear-transform warping differs by rate, so agreement is close but not exact near 10 kHz.
      const published = magnitudeDb([TABLE1, TABLE2], f, 48_000);
      expect(Math.abs(magnitudeDb([derived.shelf, derived.highpass], f, fs) - published)).toBeLessThan(0.05);
    }
  });

  it("rejects sample rates too low for the shelf", () => {
    expect(() => kWeightingCoefficients(3000)).toThrow(RangeError);
  });
});
