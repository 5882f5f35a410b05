import { listZoneChoices } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { zoneChoicesQuerySchema } from "@/lib/validation/templates";

/** The zones of one home, for "save a zone as a template". */
export const GET = apiHandler({ query: zoneChoicesQuerySchema }, async ({ actor, query }) => listZoneChoices({ actor, homeId: query.homeId }));
