import { compareRevisions } from "@/db/queries/history";
import { apiHandler } from "@/lib/api/handler";
import { compareQuerySchema, zoneIdParamsSchema } from "@/lib/validation/history";

// Field-by-field difference between two revisions of the zone (?from=&to=, ids or "current").
export const GET = apiHandler({ params: zoneIdParamsSchema, query: compareQuerySchema }, async ({ actor, params, query }) =>
  compareRevisions({ actor, zoneId: params.zoneId, from: query.from, to: query.to }),
);
