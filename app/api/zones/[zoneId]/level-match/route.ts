import { applyLevelMatch, getLevelMatch } from "@/db/queries/level-match";
import { apiHandler } from "@/lib/api/handler";
import { zoneParamsSchema } from "@/lib/validation/board";
import { levelMatchApplySchema } from "@/lib/validation/level-match";

// GET: every source and stream preset of the zone with its offset, the
// largest boost of its tone-curve chain and its latest measured clip; the
// suggestions are computed from these (lib/zones/level-match-rows.ts).
export const GET = apiHandler({ params: zoneParamsSchema }, async ({ actor, params }) => getLevelMatch({ actor, zoneId: params.zoneId }));

// POST { version, items: [{ kind, id, loudnessOffsetDb }] }: apply one or all
// suggestions as one zone change (zone:edit; 409 zone:stale on a stale version).
export const POST = apiHandler({ params: zoneParamsSchema, body: levelMatchApplySchema }, async ({ actor, params, body }) =>
  applyLevelMatch({ actor, zoneId: params.zoneId, input: body }),
);
