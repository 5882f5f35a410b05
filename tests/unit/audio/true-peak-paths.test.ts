/**
 * Every 4x true-peak path against the same published references, so none is
 * only compared with another: the JavaScript kernel (`simd: false`), the
 * WebAssembly SIMD kernel in double lanes (Float64Array input) and in float32
 * lanes (Float32Array input, what decodeWav returns).
 * References: EBU Tech 3341 (v4) Table 1 true-peak cases 15–19, tolerance
 * +0.2 / −0.4 dB, signals as in true-peak.test.ts (with 20 ms fades, see
 * there); a 997 Hz sine reads its amplitude (analytic) within 0.05 dB.
 */
import { describe, expect, it } from "vitest";
import { truePeakLinear } from "@/lib/audio/true-peak";
import { assembleTruePeakModule } from "@/lib/audio/true-peak-simd";
import { fractionalTone, tone } from "./signals";

const db = (x: number) => 20 * Math.log10(x);

const paths = [
  ["JavaScript kernel", (x: Float32Array) => [x, x], { simd: false }],
  ["SIMD, double lanes", (x: Float32Array) => [Float64Array.from(x), Float64Array.from(x)], {}],
  ["SIMD, float32 lanes", (x: Float32Array) => [x, x], {}],
] as const;

describe.each(paths)("%s", (_name, channels, opts) => {
  it.each([
    [15, 0.5, 1 / 4, 0, -6.0],
    [16, 0.5, 1 / 4, 45, -6.0],
    [17, 0.5, 1 / 6, 60, -6.0],
    [18, 0.5, 1 / 8, 67.5, -6.0],
    [19, 1.41, 1 / 4, 45, 3.0],
  ])("Tech 3341 case %i → %f dBTP (+0.2/−0.4 dB)", (_case, amplitude, fraction, phaseDeg, expected) => {
    const x = fractionalTone(amplitude, fraction, phaseDeg, 1, 48_000, 0.02);
    const peak = db(truePeakLinear(channels(x), 48_000, opts));
    expect(peak).toBeLessThanOrEqual(expected + 0.2);
    expect(peak).toBeGreaterThanOrEqual(expected - 0.4);
  });

  it.each([48_000, 96_000])("a 997 Hz sine of amplitude 0.7 at %i Hz reads 0.7 (±0.05 dB), odd length included", (fs) => {
    const x = tone(db(0.7), 2, fs, 997, 0.3).subarray(0, 2 * fs - 1);
    expect(Math.abs(db(truePeakLinear(channels(x), fs, opts)) - db(0.7))).toBeLessThan(0.05);
  });
});

it("the SIMD module is valid WebAssembly (Core Specification 2.0 with SIMD)", () => {
  expect(WebAssembly.validate(assembleTruePeakModule(12))).toBe(true);
});
