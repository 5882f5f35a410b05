import { transferPreset } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { presetParamsSchema, transferPresetSchema } from "@/lib/validation/board";

// Move or copy a stream preset to another zone of the same home (both zones'
// versions are checked; a move changes both in one transaction).
export const POST = apiHandler({ params: presetParamsSchema, body: transferPresetSchema }, async ({ actor, params, body }) =>
  transferPreset({ actor, zoneId: params.zoneId, presetId: params.presetId, ...body }),
);
