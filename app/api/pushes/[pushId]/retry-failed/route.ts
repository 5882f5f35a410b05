import { apiHandler } from "@/lib/api/handler";
import { retryFailed } from "@/lib/fleet/push-service";
import { pushIdParamsSchema } from "@/lib/validation/pushes";

// Sends the failed targets of a push again (audited).
export const POST = apiHandler({ params: pushIdParamsSchema }, async ({ actor, params }) => retryFailed({ actor, pushId: params.pushId }));
