import { reorderPresets } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { reorderSchema, zoneParamsSchema } from "@/lib/validation/board";

export const PUT = apiHandler({ params: zoneParamsSchema, body: reorderSchema }, async ({ actor, params, body }) =>
  reorderPresets({ actor, zoneId: params.zoneId, version: body.version, ids: body.ids }),
);
