import { getCurveForExport } from "@/db/queries/curves";
import { apiHandler } from "@/lib/api/handler";
import { toneCurveToCsv, toneCurveToJson } from "@/lib/audio/tone-curve";
import { curveExportQuerySchema, curveIdParamsSchema } from "@/lib/validation/curves";

/** A file name from the curve's name: letters, digits and dashes only. */
function fileBase(name: string) {
  return name.normalize("NFKD").replace(/[^\w\s-]/g, "").trim().replace(/\s+/g, "-").toLowerCase().slice(0, 60) || "tone-curve";
}

// GET ?format=json|csv: a download in our JSON or CSV format (the same formats the import reads).
export const GET = apiHandler({ params: curveIdParamsSchema, query: curveExportQuerySchema }, async ({ actor, params, query }) => {
  const curve = await getCurveForExport({ actor, curveId: params.curveId });
  const body = query.format === "csv" ? toneCurveToCsv({ bands: curve.bands }) : `${toneCurveToJson({ bands: curve.bands })}\n`;
  return new Response(body, {
    headers: {
      "content-type": query.format === "csv" ? "text/csv; charset=utf-8" : "application/json; charset=utf-8",
      "content-disposition": `attachment; filename="${fileBase(curve.name)}.${query.format}"`,
      "cache-control": "no-store",
    },
  });
});
