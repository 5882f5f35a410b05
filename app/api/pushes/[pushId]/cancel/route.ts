import { apiHandler } from "@/lib/api/handler";
import { cancelPending } from "@/lib/fleet/push-service";
import { pushIdParamsSchema } from "@/lib/validation/pushes";

// Cancels the targets not sent yet; those already on their way finish (audited).
export const POST = apiHandler({ params: pushIdParamsSchema }, async ({ actor, params }) => cancelPending({ actor, pushId: params.pushId }));
