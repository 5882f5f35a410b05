import { duplicateCurve } from "@/db/queries/curves";
import { apiHandler } from "@/lib/api/handler";
import { curveDuplicateSchema, curveIdParamsSchema } from "@/lib/validation/curves";

// POST { name? }: a copy with the same bands, unattached ("… (copy)" by default).
export const POST = apiHandler({ params: curveIdParamsSchema, body: curveDuplicateSchema, status: 201 }, async ({ actor, params, body }) =>
  duplicateCurve({ actor, curveId: params.curveId, name: body.name }),
);
