import { listPushes } from "@/db/queries/pushes";
import { apiHandler } from "@/lib/api/handler";
import { startPush } from "@/lib/fleet/push-service";
import { pushListQuerySchema, startPushBodySchema } from "@/lib/validation/pushes";

// GET: the push history of the company. POST: start a push (one zone, a home, a
// selection across homes, a template's zones, a rollback); answers 201 with the push id.
export const GET = apiHandler({ query: pushListQuerySchema }, async ({ actor, query }) => listPushes({ actor, query }));

export const POST = apiHandler({ body: startPushBodySchema, status: 201 }, async ({ actor, body }) =>
  startPush({ actor, scope: body.scope, expectedRevisions: body.expectedRevisions, note: body.note }),
);
