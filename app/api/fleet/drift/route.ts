import { z } from "zod";
import { listHomeDrift } from "@/db/queries/devices";
import { getHomeForActor } from "@/db/queries/homes";
import { apiHandler } from "@/lib/api/handler";

// Drift of every zone of one home in one request (for the board and its badges).
const querySchema = z.object({ homeId: z.uuid("That is not a valid home id.") });

export const GET = apiHandler({ query: querySchema }, async ({ actor, query }) => {
  const home = await getHomeForActor({ actor, homeId: query.homeId });
  return { homeId: home.id, zones: await listHomeDrift({ actor, homeId: home.id }) };
});
