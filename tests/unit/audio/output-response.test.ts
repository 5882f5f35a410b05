/**
 * Summed output response (lib/audio/output-response.ts). Sources beside each
 * check:
 *  - Linkwitz, "Active Crossover Networks for Noncoincident Drivers", JAES
 *    1976: Linkwitz-Riley low and high branches are in phase at every
 *    frequency for LR4 (−6.02 dB each at fc) and sum to an all-pass (flat
 *    magnitude); LR2's branches are 180° apart and sum flat only with one
 *    branch inverted.
 *  - LR4 branch values at fc, derived from the same definition: each
 *    second-order Butterworth section at s = j is 1/(j√2), so the low-pass is
 *    (1/(j√2))² = −1/2 and the high-pass (j²/(j√2))² = −1/2 (analytic). With a
 *    time offset τ between them the sum at fc is |½ + ½ e^(−j2π fc τ)| =
 *    |cos(π fc τ)| (analytic), a null when τ is half a period.
 *  - Speed of sound 343 m/s (dry air, 20 °C), as PRODUCT.md states it; the
 *    alignment module's default.
 *  - Peaking band gain at its own frequency is exactly G dB: W3C Web Audio
 *    API, BiquadFilterNode "peaking" (Audio EQ Cookbook), H(f0) = A² with
 *    A = 10^(G/40).
 * The digital sections at 48 kHz are bilinear transforms prewarped at fc, so
 * their value at fc equals the analogue one and a sum that is an all-pass in
 * analogue stays an all-pass (the transform is linear).
 */
import { describe, expect, it } from "vitest";
import { outputLayoutResponse, type LayoutOutput, type OutputLayoutInput } from "@/lib/audio/output-response";
import { logFrequencyGrid } from "@/lib/audio/tone-curve";

const out = (id: string, role: LayoutOutput["role"], metres: number, extra: Partial<LayoutOutput> = {}): LayoutOutput => ({
  id,
  role,
  distance: { value: metres, unit: "m" },
  latencyMs: 0,
  trimDb: 0,
  polarityInverted: false,
  ...extra,
});

const lr4 = { alignment: "linkwitz-riley" as const, slopeDbPerOctave: 24 as const, frequencyHz: 80 };
const grid = logFrequencyGrid(20, 20_000, 24);

describe("summed output response", () => {
  it("LR4 at 80 Hz, mains and subwoofer equally far: flat within 0.01 dB (Linkwitz 1976: LR4 sums to an all-pass)", () => {
    const layout: OutputLayoutInput = { crossover: lr4, outputs: [out("l", "main_left", 3), out("r", "main_right", 3), out("s", "subwoofer", 3)] };
    const r = outputLayoutResponse(layout, [], { grid });
    for (const v of r.alignedDb) expect(Math.abs(v)).toBeLessThan(0.01);
    // Each branch is −6.02 dB at fc (Linkwitz 1976).
    const g = Float64Array.from([80]);
    const one = outputLayoutResponse(layout, [], { grid: g });
    expect(one.mainsDb![0]).toBeCloseTo(-6.0206, 3);
    expect(one.subsDb![0]).toBeCloseTo(-6.0206, 3);
  });

  it("LR4 with the subwoofer's polarity inverted cancels at fc (branches in phase, Linkwitz 1976)", () => {
    const layout: OutputLayoutInput = {
      crossover: lr4,
      outputs: [out("l", "main_left", 3), out("r", "main_right", 3), out("s", "subwoofer", 3, { polarityInverted: true })],
    };
    const r = outputLayoutResponse(layout, [], { grid: Float64Array.from([80, 20, 2000]) });
    expect(r.alignedDb[0]).toBeLessThan(-60);
    // Far from fc one branch dominates: about 0 dB.
    expect(Math.abs(r.alignedDb[1]!)).toBeLessThan(0.2);
    expect(Math.abs(r.alignedDb[2]!)).toBeLessThan(0.01);
  });

  it("LR2 sums flat only with one branch inverted (Linkwitz 1976)", () => {
    const lr2 = { alignment: "linkwitz-riley" as const, slopeDbPerOctave: 12 as const, frequencyHz: 100 };
    const inPhase = outputLayoutResponse({ crossover: lr2, outputs: [out("l", "main_left", 2), out("s", "subwoofer", 2)] }, [], {
      grid: Float64Array.from([100]),
    });
    expect(inPhase.alignedDb[0]).toBeLessThan(-60);
    const inverted = outputLayoutResponse(
      { crossover: lr2, outputs: [out("l", "main_left", 2), out("s", "subwoofer", 2, { polarityInverted: true })] },
      [],
      { grid },
    );
    for (const v of inverted.alignedDb) expect(Math.abs(v)).toBeLessThan(0.01);
  });

  it("a subwoofer half a period (at fc) farther away nulls at fc without alignment, and sums flat with it (analytic, c = 343 m/s)", () => {
    const tau = 1 / 80 / 2; // 6.25 ms
    const extra = 343 * tau; // 2.14375 m
    const layout: OutputLayoutInput = { crossover: lr4, outputs: [out("l", "main_left", 3), out("r", "main_right", 3), out("s", "subwoofer", 3 + extra)] };
    const r = outputLayoutResponse(layout, [], { grid: Float64Array.from([80, 40, 160]) });
    expect(r.unalignedDb[0]).toBeLessThan(-60);
    // The mains are delayed by 6.25 ms so everything arrives with the subwoofer.
    expect(r.alignment.outputs.find((o) => o.id === "l")!.delayMs).toBeCloseTo(6.25, 9);
    expect(r.alignment.outputs.find((o) => o.id === "s")!.delayMs).toBe(0);
    for (const v of r.alignedDb) expect(Math.abs(v)).toBeLessThan(0.01);
  });

  it("a quarter-period offset leaves |cos(π/4)| = −3.01 dB at fc (analytic)", () => {
    const tau = 1 / 80 / 4;
    const layout: OutputLayoutInput = { crossover: lr4, outputs: [out("l", "main_left", 3), out("s", "subwoofer", 3 + 343 * tau)] };
    const r = outputLayoutResponse(layout, [], { grid: Float64Array.from([80]) });
    expect(r.unalignedDb[0]).toBeCloseTo(20 * Math.log10(Math.cos(Math.PI / 4)), 4);
  });

  it("the sub's own latency counts like distance (1 ms = 0.343 m at 343 m/s)", () => {
    const layout: OutputLayoutInput = {
      crossover: lr4,
      outputs: [out("l", "main_left", 3), out("s", "subwoofer", 3, { latencyMs: (1000 / 80) / 2 })],
    };
    const r = outputLayoutResponse(layout, [], { grid: Float64Array.from([80]) });
    expect(r.unalignedDb[0]).toBeLessThan(-60);
    expect(Math.abs(r.alignedDb[0]!)).toBeLessThan(0.01);
  });

  it("the zone's tone curve shapes the sum: a +4 dB peaking band reads +4 dB at its frequency (Web Audio spec, H(f0) = A²)", () => {
    const layout: OutputLayoutInput = { crossover: lr4, outputs: [out("l", "main_left", 3), out("s", "subwoofer", 3)] };
    const r = outputLayoutResponse(layout, [{ type: "peaking", frequencyHz: 1000, gainDb: 4, q: 1.4 }], { grid: Float64Array.from([1000]) });
    expect(r.alignedDb[0]).toBeCloseTo(4, 6);
    expect(r.toneCurveDb[0]).toBeCloseTo(4, 6);
  });

  it("a subwoofer trimmed by −6 dB reads about −6 dB two octaves below an LR4 crossover (HP branch −48 dB there, Linkwitz 1976 slope)", () => {
    const layout: OutputLayoutInput = { crossover: lr4, outputs: [out("l", "main_left", 3), out("s", "subwoofer", 3, { trimDb: -6 })] };
    const r = outputLayoutResponse(layout, [], { grid: Float64Array.from([20]) });
    expect(r.alignedDb[0]).toBeGreaterThan(-6.1);
    expect(r.alignedDb[0]).toBeLessThan(-5.9);
  });

  it("without subwoofers the mains play full range and a line out is not part of the sum (our modelling choice)", () => {
    const r = outputLayoutResponse(
      { crossover: lr4, outputs: [out("l", "main_left", 3), out("r", "main_right", 3.5), out("x", "line_out", 10, { trimDb: -20 })] },
      [],
      { grid: Float64Array.from([1000, 50]) },
    );
    expect(r.subsDb).toBeNull();
    // Aligned, two equal full-range outputs average to 0 dB.
    expect(Math.abs(r.alignedDb[0]!)).toBeLessThan(1e-9);
    expect(Math.abs(r.alignedDb[1]!)).toBeLessThan(1e-9);
  });
});
