import type { z } from "zod";

export type FieldErrors = Record<string, string[]>;

/** zod issues → { "field.path": ["message"] }, the shape the server answers with too. */
export function zodFieldErrors(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join(".") : "_";
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

/** A number field's text as the schema expects it: empty or junk becomes NaN, which the schema names. */
export function toNumber(text: string): number {
  const trimmed = text.trim().replace(/^\+/, "").replace("−", "-").replace(",", ".");
  return trimmed === "" ? Number.NaN : Number(trimmed);
}
