import { getRevision } from "@/db/queries/history";
import { apiHandler } from "@/lib/api/handler";
import { revisionParamsSchema } from "@/lib/validation/history";

// One revision with its whole configuration.
export const GET = apiHandler({ params: revisionParamsSchema }, async ({ actor, params }) =>
  getRevision({ actor, zoneId: params.zoneId, revisionId: params.revisionId }),
);
