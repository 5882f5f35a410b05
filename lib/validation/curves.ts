import { z } from "zod";
import { modelProfiles } from "@/lib/devices/model-profiles";
import { TONE_LIMITS, toneBandSchema } from "@/lib/validation/tone-curve";

// The tone-curve library's schemas, shared by the editor (client) and the
// route handlers (server). Band rules (frequency 10 Hz–24 kHz, gain −24…+12 dB,
// Q 0.1–20) live in lib/validation/tone-curve.ts. A library curve may have as
// many bands as the largest model profile takes; whether a particular device
// takes it is checked against that device's profile (lib/zones/curve-fit.ts).

export const MAX_LIBRARY_BANDS = Math.max(...modelProfiles.map((p) => p.eqBands));

export const curveIdParamsSchema = z.object({ curveId: z.uuid("That is not a valid tone curve id.") });

export const curveNameSchema = z
  .string({ error: "Give the curve a name." })
  .trim()
  .min(2, "Give the curve a name of at least 2 characters.")
  .max(80, "Keep the name to 80 characters.");

export const curveDescriptionSchema = z.string().trim().max(500, "Keep the description to 500 characters.");

export const curveBandsSchema = z
  .array(toneBandSchema.extend({ enabled: z.boolean({ error: "Enabled must be true or false." }).default(true) }))
  .max(MAX_LIBRARY_BANDS, `A tone curve has at most ${MAX_LIBRARY_BANDS} bands.`);

export const curveCreateSchema = z.object({
  name: curveNameSchema,
  description: curveDescriptionSchema.default(""),
  bands: curveBandsSchema.default([]),
});
export type CurveCreateInput = z.infer<typeof curveCreateSchema>;

export const curveVersionSchema = z
  .number({ error: "The curve version this edit is based on is missing." })
  .int()
  .min(1, "The curve version this edit is based on is missing.");

export const curveUpdateSchema = z
  .object({
    version: curveVersionSchema,
    name: curveNameSchema.optional(),
    description: curveDescriptionSchema.optional(),
    bands: curveBandsSchema.optional(),
  })
  .refine((v) => v.name !== undefined || v.description !== undefined || v.bands !== undefined, {
    message: "Nothing to change: send a name, a description or bands.",
    path: ["_"],
  });
export type CurveUpdateInput = z.infer<typeof curveUpdateSchema>;

export const curveDuplicateSchema = z.object({ name: curveNameSchema.optional() });

export const curveDeleteQuerySchema = z.object({
  version: z.coerce.number({ error: "Add ?version= (the curve version this deletion is based on)." }).int().min(1),
});

export const curveExportQuerySchema = z.object({
  format: z.enum(["json", "csv"], { error: "Choose format=json or format=csv." }).default("json"),
});

/** Import: the file's text fields from the multipart form (the file itself is read separately). */
export const curveImportFieldsSchema = z.object({
  name: curveNameSchema,
  description: curveDescriptionSchema.default(""),
});

/** Largest import file we read: a curve of 32 bands is well under 4 KB; 256 KB leaves room for comments and spacing. */
export const CURVE_IMPORT_MAX_BYTES = 256 * 1024;

export const BAND_LIMITS = TONE_LIMITS;

export function curveUrl(curveId: string) {
  return `/api/curves/${curveId}`;
}

export const curvesUrl = "/api/curves";
