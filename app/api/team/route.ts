import { getTeam } from "@/db/queries/team";
import { apiHandler } from "@/lib/api/handler";
import { teamQuerySchema } from "@/lib/validation/team";

// Staff with roles, and one page of homes with their household members (?hsearch=&hpage=).
export const GET = apiHandler({ query: teamQuerySchema }, async ({ actor, query }) => getTeam({ actor, query }));
