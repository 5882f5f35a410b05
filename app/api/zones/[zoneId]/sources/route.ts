import { createSource } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { sourceCreateSchema, zoneParamsSchema } from "@/lib/validation/board";

export const POST = apiHandler({ params: zoneParamsSchema, body: sourceCreateSchema, status: 201 }, async ({ actor, params, body }) => {
  const { version, ...input } = body;
  return createSource({ actor, zoneId: params.zoneId, version, input });
});
