import { listActivity } from "@/db/queries/history";
import { apiHandler } from "@/lib/api/handler";
import { activityQuerySchema } from "@/lib/validation/history";

// The company's audit trail, newest first, filtered by person, home, zone, kind
// and days, one page at a time.
export const GET = apiHandler({ query: activityQuerySchema }, async ({ actor, query }) => listActivity({ actor, query }));
