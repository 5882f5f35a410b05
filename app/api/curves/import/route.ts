import { createCurve } from "@/db/queries/curves";
import { apiHandler, parseOrThrow } from "@/lib/api/handler";
import { readMultipartFile } from "@/lib/api/read-multipart";
import { parseToneCurveCsv, parseToneCurveJson } from "@/lib/audio/tone-curve";
import { AppError } from "@/lib/errors";
import { can } from "@/lib/permissions";
import { CURVE_IMPORT_MAX_BYTES, curveImportFieldsSchema, MAX_LIBRARY_BANDS } from "@/lib/validation/curves";

// POST multipart { file: .json or .csv, name, description? }: a new library
// curve from our JSON or CSV format. Every error names the line (CSV) or band
// (JSON) and the field; on any error nothing is saved.
export const POST = apiHandler({ status: 201 }, async ({ request, actor }) => {
  if (!can(actor, "curve:edit")) {
    await request.body?.cancel().catch(() => {});
    throw new AppError("auth:forbidden");
  }
  const upload = await readMultipartFile(request, { maxBytes: CURVE_IMPORT_MAX_BYTES, what: "tone-curve file" });
  const fields = parseOrThrow(curveImportFieldsSchema, upload.fields);
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(upload.file.bytes);
  } catch {
    throw new AppError("curve:import-invalid", {
      message: "The file is not text; export a tone curve as JSON or CSV and import that. Nothing was saved.",
      fieldErrors: { file: ["Not a text file."] },
    });
  }
  const lower = upload.file.name.toLowerCase();
  const looksJson = lower.endsWith(".json") || (!lower.endsWith(".csv") && /^\s*[{[]/.test(text.replace(/^\uFEFF/, "")));
  const parsed = looksJson ? parseToneCurveJson(text, MAX_LIBRARY_BANDS) : parseToneCurveCsv(text, MAX_LIBRARY_BANDS);
  if (!parsed.ok) {
    throw new AppError("curve:import-invalid", {
      message: `${upload.file.name} could not be imported: ${parsed.errors.slice(0, 3).join(" ")}${parsed.errors.length > 3 ? ` (and ${parsed.errors.length - 3} more)` : ""} Nothing was saved.`,
      fieldErrors: { file: parsed.errors },
    });
  }
  const bands = parsed.value.bands.map((b) => ({ ...b, enabled: b.enabled !== false }));
  return createCurve({
    actor,
    input: { name: fields.name, description: fields.description, bands },
    auditKind: "curve.imported",
    summary: `Imported tone curve “${fields.name}” from ${upload.file.name} (${bands.length} band${bands.length === 1 ? "" : "s"})`,
  });
});
