import { getHomeForActor, toHomeDto, updateHome } from "@/db/queries/homes";
import { apiHandler } from "@/lib/api/handler";
import { homeIdParamsSchema, homeUpdateSchema } from "@/lib/validation/homes";

export const GET = apiHandler({ params: homeIdParamsSchema }, async ({ actor, params }) =>
  toHomeDto(await getHomeForActor({ actor, homeId: params.homeId })),
);

export const PATCH = apiHandler({ params: homeIdParamsSchema, body: homeUpdateSchema }, async ({ actor, params, body }) =>
  updateHome({ actor, homeId: params.homeId, input: body }),
);
