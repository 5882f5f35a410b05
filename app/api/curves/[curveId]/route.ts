import { deleteCurve, getCurve, updateCurve } from "@/db/queries/curves";
import { apiHandler } from "@/lib/api/handler";
import { curveDeleteQuerySchema, curveIdParamsSchema, curveUpdateSchema } from "@/lib/validation/curves";

export const GET = apiHandler({ params: curveIdParamsSchema }, async ({ actor, params }) => getCurve({ actor, curveId: params.curveId }));

// PATCH { version, name?, description?, bands? }: compare-and-set on the curve's
// version (409 curve:stale); zones using the curve get a new revision each.
export const PATCH = apiHandler({ params: curveIdParamsSchema, body: curveUpdateSchema }, async ({ actor, params, body }) =>
  updateCurve({ actor, curveId: params.curveId, input: body }),
);

// DELETE …?version=N: refused (409 curve:in-use) while attached anywhere.
export const DELETE = apiHandler({ params: curveIdParamsSchema, query: curveDeleteQuerySchema }, async ({ actor, params, query }) =>
  deleteCurve({ actor, curveId: params.curveId, version: query.version }),
);
