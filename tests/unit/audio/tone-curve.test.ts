import { describe, expect, it } from "vitest";
import {
  curveResponse,
  largestBoostDb,
  logFrequencyGrid,
  parseToneCurveCsv,
  parseToneCurveJson,
  toneCurveToCsv,
  toneCurveToJson,
  type ToneBand,
} from "@/lib/audio/tone-curve";
import { makeToneCurveSchema, toneBandSchema } from "@/lib/validation/tone-curve";

const bands: ToneBand[] = [
  { type: "highpass", frequencyHz: 25, gainDb: 0, q: 0.707 },
  { type: "lowshelf", frequencyHz: 120, gainDb: 3, q: 1 },
  { type: "peaking", frequencyHz: 1000, gainDb: 4.5, q: 2 },
  { type: "notch", frequencyHz: 60, gainDb: 0, q: 8, enabled: false },
];

describe("log frequency grid", () => {
  it("20 Hz–20 kHz at 24 points per octave: log2(1000) = 9.966 octaves → 240 steps + the end point", () => {
    const g = logFrequencyGrid(20, 20_000, 24);
    expect(g[0]).toBe(20);
    expect(g[g.length - 1]).toBe(20_000);
    expect(g.length).toBe(241);
    expect(g[24]).toBeCloseTo(40, 9); // one octave = 24 points
  });
});

describe("curve response", () => {
  it("a single peaking band reads its gain at f0 (Audio EQ Cookbook peaking property)", () => {
    const r = curveResponse([{ type: "peaking", frequencyHz: 1000, gainDb: -7, q: 3 }], 48_000, [1000]);
    expect(r[0]).toBeCloseTo(-7, 9);
  });

  it("cascaded bands add in dB; disabled bands are skipped", () => {
    // |H1·H2| = |H1|·|H2| → dB add (our arithmetic); the disabled 60 Hz notch would read -∞ at 60 Hz.
    const grid = [60, 120, 1000, 5000];
    const all = curveResponse(bands, 48_000, grid);
    const sum = bands
      .filter((b) => b.enabled !== false)
      .map((b) => curveResponse([b], 48_000, grid))
      .reduce((acc, r) => acc.map((v, i) => v + r[i]!));
    all.forEach((v, i) => expect(v).toBeCloseTo(sum[i]!, 9));
    expect(Number.isFinite(all[0]!)).toBe(true);
  });

  it("largest boost: a +4.5 dB peaking band gives 4.5 dB; cuts only give 0", () => {
    expect(largestBoostDb([{ type: "peaking", frequencyHz: 3150, gainDb: 4.5, q: 1.4 }])).toBeCloseTo(4.5, 6);
    expect(largestBoostDb([{ type: "peaking", frequencyHz: 200, gainDb: -6, q: 1 }])).toBe(0);
    expect(largestBoostDb([])).toBe(0);
    // Overlapping boosts exceed either band alone.
    const overlapping: ToneBand[] = [
      { type: "lowshelf", frequencyHz: 200, gainDb: 6, q: 1 },
      { type: "peaking", frequencyHz: 100, gainDb: 3, q: 1 },
    ];
    expect(largestBoostDb(overlapping)).toBeGreaterThan(6);
  });
});

describe("JSON and CSV exchange (our own format)", () => {
  it("round-trips through JSON and CSV", () => {
    const curve = { bands };
    const fromJson = parseToneCurveJson(toneCurveToJson(curve));
    expect(fromJson).toEqual({ ok: true, value: curve });
    const csv = toneCurveToCsv(curve);
    expect(csv.split("\n")[0]).toBe("type,frequency_hz,gain_db,q,enabled");
    const fromCsv = parseToneCurveCsv(csv);
    expect(fromCsv.ok && fromCsv.value.bands.map((b) => ({ ...b, enabled: b.enabled ?? true }))).toEqual(
      bands.map((b) => ({ ...b, enabled: b.enabled ?? true })),
    );
    expect(toneCurveToCsv({ bands: bands.slice(0, 2) }).split("\n")[0]).toBe("type,frequency_hz,gain_db,q");
  });

  it("CSV errors name the line and the column", () => {
    const csv = ["type,frequency_hz,gain_db,q", "peaking,1000,loud,1", "shelf,100,3,1", "highpass,5,0,0.7", "peaking,200,3"].join("\n");
    const r = parseToneCurveCsv(csv);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors).toContain('Line 2, gain_db: "loud" is not a number.');
      expect(r.errors).toContain("Line 5: expected 4 values, found 3.");
    }
    const r2 = parseToneCurveCsv(["type,frequency_hz,gain_db,q", "shelf,100,3,1", "highpass,5,0,0.7", "peaking,1000,20,1"].join("\n"));
    expect(r2.ok).toBe(false);
    if (!r2.ok) {
      expect(r2.errors.some((e) => e.startsWith("Line 2, type:"))).toBe(true);
      expect(r2.errors).toContain("Line 3, frequency_hz: Frequency must be at least 10 Hz.");
      expect(r2.errors).toContain("Line 4, gain_db: Gain must be at most +12 dB.");
    }
    const bad = parseToneCurveCsv("kind,freq\npeaking,1000");
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.errors[0]).toMatch(/^Line 1 \(header\): missing columns type, frequency_hz, gain_db, q; unknown columns kind, freq/);
  });

  it("JSON errors name the band and the field", () => {
    const r = parseToneCurveJson(JSON.stringify({ bands: [{ type: "peaking", frequencyHz: 1000, gainDb: 3, q: 50 }] }));
    expect(r).toEqual({ ok: false, errors: ["Band 1 Q: Q must be at most 20."] });
    expect(parseToneCurveJson("{nope").ok).toBe(false);
  });
});

describe("zod schemas", () => {
  it("enforce 10 Hz–24 kHz, -24…+12 dB, Q 0.1–20 and a band limit", () => {
    expect(toneBandSchema.safeParse({ type: "peaking", frequencyHz: 24_000, gainDb: -24, q: 0.1 }).success).toBe(true);
    expect(toneBandSchema.safeParse({ type: "peaking", frequencyHz: 24_001, gainDb: 0, q: 1 }).success).toBe(false);
    expect(toneBandSchema.safeParse({ type: "peaking", frequencyHz: 100, gainDb: -24.5, q: 1 }).success).toBe(false);
    expect(toneBandSchema.safeParse({ type: "peaking", frequencyHz: 100, gainDb: 0, q: 20.5 }).success).toBe(false);
    expect(toneBandSchema.safeParse({ type: "bandpass", frequencyHz: 100, gainDb: 0, q: 1 }).success).toBe(false);
    const three = { bands: bands.slice(0, 3) };
    expect(makeToneCurveSchema(2).safeParse(three).success).toBe(false);
    expect(makeToneCurveSchema(3).safeParse(three).success).toBe(true);
  });
});
