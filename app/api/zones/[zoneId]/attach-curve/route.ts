import { attachCurve } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { attachCurveSchema, zoneParamsSchema } from "@/lib/validation/board";

// Attach a library tone curve to a source or preset card (null detaches).
export const PUT = apiHandler({ params: zoneParamsSchema, body: attachCurveSchema }, async ({ actor, params, body }) =>
  attachCurve({ actor, zoneId: params.zoneId, ...body }),
);
