import { getPushDetail } from "@/db/queries/pushes";
import { apiHandler } from "@/lib/api/handler";
import { pushDetailQuerySchema, pushIdParamsSchema } from "@/lib/validation/pushes";

// One push with its targets (one page, failed first) and counts by state.
export const GET = apiHandler({ params: pushIdParamsSchema, query: pushDetailQuerySchema }, async ({ actor, params, query }) =>
  getPushDetail({ actor, pushId: params.pushId, query }),
);
