import { getTeam } from "@/db/queries/team";
import { apiHandler } from "@/lib/api/handler";

export const GET = apiHandler({}, async ({ actor }) => getTeam({ actor }));
