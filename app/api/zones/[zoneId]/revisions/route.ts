import { listRevisions } from "@/db/queries/history";
import { apiHandler } from "@/lib/api/handler";
import { revisionListQuerySchema, zoneIdParamsSchema } from "@/lib/validation/history";

// A zone's revisions, newest first, each with what changed since the one before.
export const GET = apiHandler({ params: zoneIdParamsSchema, query: revisionListQuerySchema }, async ({ actor, params, query }) =>
  listRevisions({ actor, zoneId: params.zoneId, query }),
);
