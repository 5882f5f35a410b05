/**
 * Crossovers. Sources: the Butterworth magnitude |H(jω)|² = 1/(1 + (ω/ωc)^(2n))
 * (textbook definition, recalled from memory) → -3.01 dB at fc for any order;
 * Linkwitz, "Active Crossover Networks for Noncoincident Drivers", JAES 1976:
 * Linkwitz-Riley branches are squared Butterworths, -6.02 dB each at fc, and
 * LR4 low + high sum to an all-pass (flat magnitude); LR2 sums flat only with
 * one branch inverted, and in phase it cancels at fc.
 */
import { describe, expect, it } from "vitest";
import {
  butterworthQs,
  crossoverAnalogResponse,
  crossoverAnalogSum,
  crossoverDigitalResponse,
  crossoverDigitalSum,
  crossoverSections,
  type CrossoverSlope,
} from "@/lib/audio/crossover";
import { logFrequencyGrid } from "@/lib/audio/tone-curve";

const FS = 48_000;
const slopes: CrossoverSlope[] = [12, 24, 48];
const grid = logFrequencyGrid(20, 20_000, 48);

describe("Butterworth", () => {
  it.each(slopes)("%i dB/oct: -3.01 dB at fc for both branches (analogue and at 48 kHz)", (slope) => {
    const spec = { alignment: "butterworth" as const, slopeDbPerOctave: slope, frequencyHz: 80 };
    for (const branch of ["lowpass", "highpass"] as const) {
      // 10·log10(1/2) = -3.0103 dB.
      expect(crossoverAnalogResponse(spec, branch, 80).magnitudeDb).toBeCloseTo(-3.0103, 4);
      expect(crossoverDigitalResponse(spec, branch, 80, FS).magnitudeDb).toBeCloseTo(-3.0103, 4);
    }
  });

  it.each(slopes)("%i dB/oct: matches 1/(1 + (f/fc)^2n) one decade above and below", (slope) => {
    const n = slope / 6;
    const spec = { alignment: "butterworth" as const, slopeDbPerOctave: slope, frequencyHz: 100 };
    const expected = -10 * Math.log10(1 + Math.pow(10, 2 * n)); // e.g. n = 4: -80.0 dB
    expect(crossoverAnalogResponse(spec, "lowpass", 1000).magnitudeDb).toBeCloseTo(expected, 6);
    expect(crossoverAnalogResponse(spec, "highpass", 10).magnitudeDb).toBeCloseTo(expected, 6);
  });

  it("section Qs are the Butterworth pole Qs 1/(2 cos θk)", () => {
    // θk = (2k-1)π/(2n): n = 2 → 0.7071; n = 4 → 0.5412, 1.3066 (standard Butterworth tables, recalled from memory).
    expect(butterworthQs(2)[0]).toBeCloseTo(0.7071, 4);
    expect(butterworthQs(4).map((q) => +q.toFixed(4))).toEqual([0.5412, 1.3066]);
  });
});

describe("Linkwitz-Riley (Linkwitz, JAES 1976)", () => {
  it.each(slopes)("LR %i dB/oct: each branch -6.02 dB at fc", (slope) => {
    const spec = { alignment: "linkwitz-riley" as const, slopeDbPerOctave: slope, frequencyHz: 120 };
    for (const branch of ["lowpass", "highpass"] as const) {
      expect(crossoverAnalogResponse(spec, branch, 120).magnitudeDb).toBeCloseTo(-6.0206, 4);
      expect(crossoverDigitalResponse(spec, branch, 120, FS).magnitudeDb).toBeCloseTo(-6.0206, 4);
    }
  });

  it("LR4: low + high sums flat within 0.01 dB from 20 Hz to 20 kHz", () => {
    const spec = { alignment: "linkwitz-riley" as const, slopeDbPerOctave: 24 as const, frequencyHz: 80 };
    for (const f of grid) {
      expect(Math.abs(crossoverAnalogSum(spec, f).magnitudeDb), `analogue ${f.toFixed(1)} Hz`).toBeLessThan(0.01);
      expect(Math.abs(crossoverDigitalSum(spec, f, FS).magnitudeDb), `48 kHz ${f.toFixed(1)} Hz`).toBeLessThan(0.01);
    }
  });

  it("LR2: flat only with the high-pass inverted; summed in phase it has a deep notch at fc", () => {
    const spec = { alignment: "linkwitz-riley" as const, slopeDbPerOctave: 12 as const, frequencyHz: 100 };
    for (const f of grid) {
      expect(Math.abs(crossoverAnalogSum(spec, f, { invertHighpass: true }).magnitudeDb)).toBeLessThan(0.01);
    }
    expect(crossoverAnalogSum(spec, 100).magnitudeDb).toBeLessThan(-100);
    expect(crossoverDigitalSum(spec, 100, FS).magnitudeDb).toBeLessThan(-100);
    // Away from fc the in-phase sum (1 + s²)/(1 + s)² recovers: two octaves up, s = 4j → 15/17 → -1.087 dB.
    expect(crossoverAnalogSum(spec, 400).magnitudeDb).toBeCloseTo(20 * Math.log10(15 / 17), 9);
  });

  it("LR8: the in-phase sum is flat too (squared order-4 Butterworth)", () => {
    const spec = { alignment: "linkwitz-riley" as const, slopeDbPerOctave: 48 as const, frequencyHz: 2500 };
    for (const f of grid) expect(Math.abs(crossoverAnalogSum(spec, f).magnitudeDb)).toBeLessThan(0.01);
  });

  it("device sections: LR4 is two Q = 0.7071 sections, LR2 one Q = 0.5 section", () => {
    expect(crossoverSections({ alignment: "linkwitz-riley", slopeDbPerOctave: 24, frequencyHz: 80 }, "lowpass", FS)).toHaveLength(2);
    expect(crossoverSections({ alignment: "linkwitz-riley", slopeDbPerOctave: 12, frequencyHz: 80 }, "highpass", FS)).toHaveLength(1);
    expect(crossoverSections({ alignment: "butterworth", slopeDbPerOctave: 48, frequencyHz: 80 }, "highpass", FS)).toHaveLength(4);
    expect(() => crossoverSections({ alignment: "butterworth", slopeDbPerOctave: 24, frequencyHz: 30_000 }, "lowpass", FS)).toThrow(RangeError);
  });
});
