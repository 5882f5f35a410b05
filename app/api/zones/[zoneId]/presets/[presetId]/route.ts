import { deletePreset, updatePreset } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { presetParamsSchema, presetUpdateSchema, versionQuerySchema } from "@/lib/validation/board";

export const PATCH = apiHandler({ params: presetParamsSchema, body: presetUpdateSchema }, async ({ actor, params, body }) => {
  const { version, ...input } = body;
  return updatePreset({ actor, zoneId: params.zoneId, presetId: params.presetId, version, input });
});

// DELETE …?version=N: the zone version the removal is based on.
export const DELETE = apiHandler({ params: presetParamsSchema, query: versionQuerySchema }, async ({ actor, params, query }) =>
  deletePreset({ actor, zoneId: params.zoneId, presetId: params.presetId, version: query.version }),
);
