import { createPreset } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { presetCreateSchema, zoneParamsSchema } from "@/lib/validation/board";

export const POST = apiHandler({ params: zoneParamsSchema, body: presetCreateSchema, status: 201 }, async ({ actor, params, body }) => {
  const { version, ...input } = body;
  return createPreset({ actor, zoneId: params.zoneId, version, input });
});
