import { getBoardJson } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { homeIdParamsSchema } from "@/lib/validation/homes";

// The whole zone board of one home in one answer (see db/queries/board.ts).
export const GET = apiHandler({ params: homeIdParamsSchema }, async ({ actor, params }) => {
  const body = await getBoardJson({ actor, homeId: params.homeId });
  return new Response(body, { headers: { "content-type": "application/json", "cache-control": "no-store" } });
});
