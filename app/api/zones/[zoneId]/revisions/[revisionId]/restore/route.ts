import { restoreRevision } from "@/db/queries/history";
import { apiHandler } from "@/lib/api/handler";
import { restoreBodySchema, revisionParamsSchema } from "@/lib/validation/history";

// Make an earlier revision the desired configuration again (a new revision, audited).
// Needs zone:edit; the body names the zone version the restore was based on.
export const POST = apiHandler({ params: revisionParamsSchema, body: restoreBodySchema }, async ({ actor, params, body }) =>
  restoreRevision({ actor, zoneId: params.zoneId, revisionId: params.revisionId, expectedVersion: body.expectedVersion, message: body.message }),
);
