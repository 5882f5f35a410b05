import { apiHandler } from "@/lib/api/handler";
import { previewPush } from "@/lib/fleet/push-service";
import { pushPreviewBodySchema } from "@/lib/validation/pushes";

// What a push would do, zone by zone (desired vs last reported, and what the
// device cannot take). Changes nothing; POST because a selection can be long.
export const POST = apiHandler({ body: pushPreviewBodySchema }, async ({ actor, body }) => previewPush({ actor, scope: body.scope }));
