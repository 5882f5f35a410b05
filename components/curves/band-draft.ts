import { TONE_BAND_TYPES, toneBandSchema, type ToneBand } from "@/lib/validation/tone-curve";

// The editor keeps what a person typed (strings) and parses it on every
// keystroke with the same zod schema the server uses, so errors show beside
// the field before anything is sent.

export type BandType = (typeof TONE_BAND_TYPES)[number];

export interface DraftBand {
  /** Stable React key; not stored. */
  key: string;
  type: BandType;
  frequencyHz: string;
  gainDb: string;
  q: string;
  enabled: boolean;
}

export type BandField = "type" | "frequencyHz" | "gainDb" | "q";

export interface ParsedBand {
  band: (ToneBand & { enabled: boolean }) | null;
  errors: Partial<Record<BandField, string>>;
}

export const bandTypeLabels: Record<BandType, string> = {
  peaking: "Peaking",
  lowshelf: "Low shelf",
  highshelf: "High shelf",
  highpass: "High-pass",
  lowpass: "Low-pass",
  notch: "Notch",
};

/** Gain does nothing for these types (the Web Audio formulas ignore it). */
export function gainApplies(type: BandType) {
  return type === "peaking" || type === "lowshelf" || type === "highshelf";
}

/** Q does nothing for shelves (the Web Audio shelves have a fixed slope). */
export function qApplies(type: BandType) {
  return type !== "lowshelf" && type !== "highshelf";
}

let counter = 0;
export function newKey() {
  counter += 1;
  return `band-${Date.now().toString(36)}-${counter}`;
}

export function toDraft(b: { type: BandType; frequencyHz: number; gainDb: number; q: number; enabled?: boolean }): DraftBand {
  return { key: newKey(), type: b.type, frequencyHz: String(b.frequencyHz), gainDb: String(b.gainDb), q: String(b.q), enabled: b.enabled !== false };
}

function number(text: string): number {
  const t = text.trim().replace(/\u2212/g, "-").replace(",", ".");
  return t === "" ? NaN : Number(t);
}

export function parseDraft(d: DraftBand): ParsedBand {
  const candidate = { type: d.type, frequencyHz: number(d.frequencyHz), gainDb: number(d.gainDb), q: number(d.q), enabled: d.enabled };
  const parsed = toneBandSchema.safeParse(candidate);
  if (parsed.success) return { band: { ...parsed.data, enabled: d.enabled }, errors: {} };
  const errors: ParsedBand["errors"] = {};
  for (const issue of parsed.error.issues) {
    const field = issue.path[0];
    if (field === "type" || field === "frequencyHz" || field === "gainDb" || field === "q") errors[field] ??= issue.message;
  }
  return { band: null, errors };
}

/** A sensible next band: a gentle peaking band at 1 kHz. */
export function defaultBand(): DraftBand {
  return toDraft({ type: "peaking", frequencyHz: 1000, gainDb: 0, q: 1 });
}
