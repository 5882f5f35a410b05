import { deleteSource, updateSource } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { sourceParamsSchema, sourceUpdateSchema, versionQuerySchema } from "@/lib/validation/board";

export const PATCH = apiHandler({ params: sourceParamsSchema, body: sourceUpdateSchema }, async ({ actor, params, body }) => {
  const { version, ...input } = body;
  return updateSource({ actor, zoneId: params.zoneId, sourceId: params.sourceId, version, input });
});

// DELETE …?version=N: the zone version the removal is based on.
export const DELETE = apiHandler({ params: sourceParamsSchema, query: versionQuerySchema }, async ({ actor, params, query }) =>
  deleteSource({ actor, zoneId: params.zoneId, sourceId: params.sourceId, version: query.version }),
);
