import { deleteZone } from "@/db/queries/history";
import { apiHandler } from "@/lib/api/handler";
import { zoneDeleteQuerySchema, zoneIdParamsSchema } from "@/lib/validation/history";

// Soft delete (?expectedVersion=N): the zone leaves its home and releases its
// device; its revisions and audit trail stay readable to integrators and the owner.
export const DELETE = apiHandler({ params: zoneIdParamsSchema, query: zoneDeleteQuerySchema }, async ({ actor, params, query }) =>
  deleteZone({ actor, zoneId: params.zoneId, expectedVersion: query.expectedVersion }),
);
