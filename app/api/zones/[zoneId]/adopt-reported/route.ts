import { apiHandler } from "@/lib/api/handler";
import { adoptReported } from "@/lib/fleet/push-service";
import { adoptReportedBodySchema, zoneIdParamsSchema } from "@/lib/validation/pushes";

// The device's reported configuration becomes the zone's desired one (a new
// revision through changeZone; needs zone:edit and the zone version it was based on).
export const POST = apiHandler({ params: zoneIdParamsSchema, body: adoptReportedBodySchema }, async ({ actor, params, body }) =>
  adoptReported({ actor, zoneId: params.zoneId, expectedVersion: body.expectedVersion }),
);
