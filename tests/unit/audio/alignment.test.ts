import { describe, expect, it } from "vitest";
import { AlignmentInputError, computeAlignment, speedOfSoundAt, toMetres } from "@/lib/audio/alignment";

// Worked values are our own arithmetic on t = d / c (c = 343 m/s: dry air at 20 °C, PRODUCT.md;
// common practice). c(T) = 331.3 + 0.606·T is the usual linear approximation (recalled from memory).
const out = (id: string, value: number, unit: "m" | "cm" | "in", latencyMs = 0) => ({ id, distance: { value, unit }, latencyMs, trimDb: 0 });

describe("alignment", () => {
  it("3 m → 8.746 ms of flight (3/343 s); the farthest output gets no delay", () => {
    const r = computeAlignment([out("far", 3, "m"), out("near", 1, "m")]);
    const far = r.outputs.find((o) => o.id === "far")!;
    const near = r.outputs.find((o) => o.id === "near")!;
    expect(far.arrivalMs).toBeCloseTo((3 / 343) * 1000, 9); // 8.7464 ms
    expect(far.delayMs).toBe(0);
    expect(near.delayMs).toBeCloseTo((2 / 343) * 1000, 9); // 5.8309 ms
  });

  it("mixed units: 300 cm = 118.11 in = 3 m (1 in = 25.4 mm exactly)", () => {
    expect(toMetres(300, "cm")).toBeCloseTo(3, 12);
    expect(toMetres(118.11, "in")).toBeCloseTo(3, 4); // 118.11 × 0.0254 = 2.999994 m
    const r = computeAlignment([out("a", 3, "m"), out("b", 300, "cm"), out("c", 118.11, "in")]);
    for (const o of r.outputs) expect(o.delayMs).toBeLessThan(0.0001);
  });

  it("a subwoofer with 8 ms of its own latency: the mains wait for it", () => {
    // Sub at 2 m: 5.831 + 8 = 13.831 ms; mains at 3 m: 8.746 ms → mains delayed by 5.085 ms, sub 0.
    const r = computeAlignment([out("sub", 2, "m", 8), out("left", 3, "m"), out("right", 3, "m")]);
    const get = (id: string) => r.outputs.find((o) => o.id === id)!;
    expect(get("sub").delayMs).toBe(0);
    expect(get("left").delayMs).toBeCloseTo(8 + (2 / 343) * 1000 - (3 / 343) * 1000, 9);
    expect(get("left").delayMs).toBeCloseTo(5.0845, 3);
    expect(get("right").delayMs).toBeCloseTo(get("left").delayMs, 12);
  });

  it("temperature: c = 331.3 + 0.606·T", () => {
    expect(speedOfSoundAt(20)).toBeCloseTo(343.42, 9);
    expect(speedOfSoundAt(0)).toBeCloseTo(331.3, 9);
    const r = computeAlignment([out("a", 3.4342, "m")], { temperatureC: 20 });
    expect(r.speedOfSound).toBeCloseTo(343.42, 9);
    expect(r.outputs[0]!.arrivalMs).toBeCloseTo(10, 9);
  });

  it("rejects negative distances, absurd distances and latencies, duplicate ids, cold rooms", () => {
    expect(() => computeAlignment([out("a", -1, "m")])).toThrow(AlignmentInputError);
    expect(() => computeAlignment([out("a", 31, "m")])).toThrow(/30 m/);
    expect(() => computeAlignment([out("a", 2, "m", 150)])).toThrow(/latency/);
    expect(() => computeAlignment([out("a", 2, "m"), out("a", 3, "m")])).toThrow(/twice/);
    expect(() => computeAlignment([out("a", 2, "m")], { temperatureC: -80 })).toThrow(AlignmentInputError);
    expect(computeAlignment([]).outputs).toEqual([]);
  });
});
