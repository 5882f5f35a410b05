import { getZoneDrift } from "@/db/queries/devices";
import { apiHandler } from "@/lib/api/handler";
import { zoneIdParamsSchema } from "@/lib/validation/pushes";

// Does the zone's device report what we want? State and field-by-field difference.
export const GET = apiHandler({ params: zoneIdParamsSchema }, async ({ actor, params }) => getZoneDrift({ actor, zoneId: params.zoneId }));
