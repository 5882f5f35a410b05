// Number formatting with units, shared by the curve, level-match and layout
// screens. Minus signs are real minus signs (U+2212) in text; inputs keep "-".

const MINUS = "\u2212";

function signed(text: string, value: number, showPlus: boolean) {
  if (value > 0 && showPlus) return `+${text}`;
  if (value < 0) return `${MINUS}${text}`;
  return text;
}

/** "+3.5 dB", "−2 dB", "0 dB"; one decimal unless whole. */
export function formatDb(value: number, unit = "dB", { plus = true, decimals = 1 }: { plus?: boolean; decimals?: number } = {}): string {
  if (!Number.isFinite(value)) return value > 0 ? `+∞ ${unit}` : `${MINUS}∞ ${unit}`;
  const rounded = Math.round(value * 10 ** decimals) / 10 ** decimals;
  const abs = Math.abs(rounded);
  const text = Number.isInteger(abs) ? String(abs) : abs.toFixed(decimals);
  return `${signed(text, rounded, plus)}${unit ? ` ${unit}` : ""}`;
}

/** Loudness readings: always one decimal, never a plus (e.g. "−23.0 LUFS"). */
export function formatLevel(value: number | null, unit: "LUFS" | "dBTP" | "dBFS"): string {
  if (value === null || !Number.isFinite(value)) return `– ${unit}`;
  const rounded = Math.round(value * 10) / 10;
  return `${signed(Math.abs(rounded).toFixed(1), rounded, false)} ${unit}`;
}

/** "63 Hz", "1.25 kHz", "16 kHz". */
export function formatHz(hz: number): string {
  if (hz >= 1000) {
    const k = hz / 1000;
    return `${Number.isInteger(k) ? k : Number(k.toFixed(k < 10 ? 2 : 1))} kHz`;
  }
  return `${Number.isInteger(hz) ? hz : Number(hz.toFixed(1))} Hz`;
}

/** Axis ticks: "20", "100", "1k", "10k". */
export function formatHzTick(hz: number): string {
  return hz >= 1000 ? `${hz / 1000}k` : String(hz);
}

export function formatMs(ms: number): string {
  return `${ms.toFixed(2)} ms`;
}
