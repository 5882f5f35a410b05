/**
 * Tone curves: a list of biquad bands (Web Audio / Audio EQ Cookbook formulas
 * via ./biquad), their combined magnitude on a log-frequency grid, the largest
 * boost (→ headroom), and our own simple JSON and CSV exchange formats.
 */

import { biquadComplexResponse, eqBandToBiquad, type BiquadCoefficients } from "./biquad";
import { makeToneCurveSchema, TONE_LIMITS, type ToneBand, type ToneCurve } from "../validation/tone-curve";

export type { ToneBand, ToneCurve } from "../validation/tone-curve";

/** Frequencies from `startHz` to `endHz` (both included) spaced `pointsPerOctave` per octave. */
export function logFrequencyGrid(startHz = 20, endHz = 20_000, pointsPerOctave = 24): Float64Array {
  if (!(startHz > 0) || !(endHz > startHz) || !(pointsPerOctave > 0)) {
    throw new RangeError("need 0 < startHz < endHz and pointsPerOctave > 0");
  }
  const octaves = Math.log2(endHz / startHz);
  const count = Math.floor(octaves * pointsPerOctave + 1e-9) + 1;
  const grid = new Float64Array(count);
  for (let i = 0; i < count; i++) grid[i] = startHz * Math.pow(2, i / pointsPerOctave);
  // Land exactly on the end frequency even when it is not a whole step away.
  if (grid[count - 1]! < endHz * (1 - 1e-12)) {
    const extended = new Float64Array(count + 1);
    extended.set(grid);
    extended[count] = endHz;
    return extended;
  }
  grid[count - 1] = endHz;
  return grid;
}

function activeSections(bands: readonly ToneBand[], sampleRate: number): BiquadCoefficients[] {
  return bands.filter((b) => b.enabled !== false).map((b) => eqBandToBiquad(b, sampleRate));
}

/** Combined magnitude in dB at each grid frequency (disabled bands skipped). */
export function curveResponse(
  bands: readonly ToneBand[],
  sampleRate = 48_000,
  grid: ArrayLike<number> = logFrequencyGrid(),
): Float64Array {
  const sections = activeSections(bands, sampleRate);
  const out = new Float64Array(grid.length);
  for (let i = 0; i < grid.length; i++) {
    let magSquared = 1;
    for (const s of sections) {
      const { re, im } = biquadComplexResponse(s, grid[i]!, sampleRate);
      magSquared *= re * re + im * im;
    }
    out[i] = 10 * Math.log10(magSquared);
  }
  return out;
}

/**
 * Largest boost of the combined curve over the audible band (20 Hz–20 kHz,
 * 96 points per octave plus each band's own frequency), never below 0 dB.
 */
export function largestBoostDb(bands: readonly ToneBand[], sampleRate = 48_000): number {
  const active = bands.filter((b) => b.enabled !== false);
  if (active.length === 0) return 0;
  const fine = logFrequencyGrid(20, Math.min(20_000, sampleRate / 2 - 1), 96);
  const extra = active.map((b) => b.frequencyHz).filter((f) => f >= 20 && f <= 20_000 && f < sampleRate / 2);
  const grid = Float64Array.from([...fine, ...extra]);
  let max = 0;
  for (const db of curveResponse(active, sampleRate, grid)) if (db > max) max = db;
  return max;
}

export type ParseResult<T> = { ok: true; value: T } | { ok: false; errors: string[] };

function validateCurve(candidate: unknown, maxBands: number, where: (path: readonly PropertyKey[]) => string): ParseResult<ToneCurve> {
  const parsed = makeToneCurveSchema(maxBands).safeParse(candidate);
  if (parsed.success) return { ok: true, value: parsed.data };
  return { ok: false, errors: parsed.error.issues.map((issue) => `${where(issue.path)}${issue.message}`) };
}

const FIELD_LABEL: Record<string, string> = { type: "type", frequencyHz: "frequency", gainDb: "gain", q: "Q", enabled: "enabled" };

/** Our JSON format: { "bands": [{ "type", "frequencyHz", "gainDb", "q", "enabled"? }] }. */
export function toneCurveToJson(curve: ToneCurve): string {
  return JSON.stringify({ bands: curve.bands }, null, 2);
}

export function parseToneCurveJson(text: string, maxBands: number = TONE_LIMITS.defaultMaxBands): ParseResult<ToneCurve> {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (error) {
    return { ok: false, errors: [`Not valid JSON: ${error instanceof Error ? error.message : String(error)}`] };
  }
  return validateCurve(data, maxBands, (path) => {
    if (path[0] === "bands" && typeof path[1] === "number") {
      const field = typeof path[2] === "string" ? ` ${FIELD_LABEL[path[2]] ?? path[2]}` : "";
      return `Band ${path[1] + 1}${field}: `;
    }
    return path.length > 0 ? `${path.join(".")}: ` : "";
  });
}

export const CSV_HEADER = ["type", "frequency_hz", "gain_db", "q"] as const;

/** CSV with header `type,frequency_hz,gain_db,q` (plus `enabled` when any band is off). */
export function toneCurveToCsv(curve: ToneCurve): string {
  const withEnabled = curve.bands.some((b) => b.enabled === false);
  const header = withEnabled ? [...CSV_HEADER, "enabled"] : [...CSV_HEADER];
  const rows = curve.bands.map((b) => {
    const cells = [b.type, String(b.frequencyHz), String(b.gainDb), String(b.q)];
    if (withEnabled) cells.push(b.enabled === false ? "false" : "true");
    return cells.join(",");
  });
  return [header.join(","), ...rows].join("\n") + "\n";
}

/**
 * Parses our CSV. Errors name the line (as a spreadsheet shows it, header =
 * line 1) and the column, e.g. `Line 3, gain_db: "loud" is not a number.`
 */
export function parseToneCurveCsv(text: string, maxBands: number = TONE_LIMITS.defaultMaxBands): ParseResult<ToneCurve> {
  const lines = text.replace(/^\uFEFF/, "").split(/\r?\n/);
  const firstLine = lines.findIndex((l) => l.trim() !== "");
  if (firstLine < 0) return { ok: false, errors: ["The file is empty; expected the header type,frequency_hz,gain_db,q."] };
  const header = lines[firstLine]!.split(",").map((h) => h.trim().toLowerCase());
  const missing = CSV_HEADER.filter((h) => !header.includes(h));
  const unknown = header.filter((h) => !(CSV_HEADER as readonly string[]).includes(h) && h !== "enabled");
  if (missing.length > 0 || unknown.length > 0) {
    const parts = [
      missing.length > 0 ? `missing column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}` : "",
      unknown.length > 0 ? `unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}` : "",
    ].filter(Boolean);
    return { ok: false, errors: [`Line ${firstLine + 1} (header): ${parts.join("; ")}. Expected type,frequency_hz,gain_db,q.`] };
  }
  const col = (name: string) => header.indexOf(name);
  const errors: string[] = [];
  const bands: unknown[] = [];
  const lineOfBand: number[] = [];
  for (let i = firstLine + 1; i < lines.length; i++) {
    const raw = lines[i]!;
    if (raw.trim() === "") continue;
    const lineNo = i + 1;
    const cells = raw.split(",").map((c) => c.trim());
    if (cells.length !== header.length) {
      errors.push(`Line ${lineNo}: expected ${header.length} values, found ${cells.length}.`);
      continue;
    }
    const number = (name: string): number | undefined => {
      const cell = cells[col(name)]!;
      const value = cell === "" ? NaN : Number(cell);
      if (!Number.isFinite(value)) {
        errors.push(`Line ${lineNo}, ${name}: "${cell}" is not a number.`);
        return undefined;
      }
      return value;
    };
    const type = cells[col("type")]!.toLowerCase();
    const frequencyHz = number("frequency_hz");
    const gainDb = number("gain_db");
    const q = number("q");
    let enabled: boolean | undefined;
    if (col("enabled") >= 0) {
      const cell = cells[col("enabled")]!.toLowerCase();
      if (cell === "true" || cell === "1" || cell === "") enabled = cell === "" ? undefined : true;
      else if (cell === "false" || cell === "0") enabled = false;
      else errors.push(`Line ${lineNo}, enabled: "${cells[col("enabled")]}" is not true or false.`);
    }
    if (frequencyHz === undefined || gainDb === undefined || q === undefined) continue;
    bands.push(enabled === undefined ? { type, frequencyHz, gainDb, q } : { type, frequencyHz, gainDb, q, enabled });
    lineOfBand.push(lineNo);
  }
  if (errors.length > 0) return { ok: false, errors };
  const csvColumn: Record<string, string> = { type: "type", frequencyHz: "frequency_hz", gainDb: "gain_db", q: "q", enabled: "enabled" };
  return validateCurve({ bands }, maxBands, (path) => {
    if (path[0] === "bands" && typeof path[1] === "number") {
      const field = typeof path[2] === "string" ? `, ${csvColumn[path[2]] ?? path[2]}` : "";
      return `Line ${lineOfBand[path[1]] ?? "?"}${field}: `;
    }
    return "";
  });
}
