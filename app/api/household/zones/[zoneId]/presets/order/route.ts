import { reorderHouseholdPresets } from "@/db/queries/household";
import { apiHandler } from "@/lib/api/handler";
import { householdZoneParamsSchema, presetOrderSchema } from "@/lib/validation/household";

/** The household's favourite stations in a new order: a new revision, then sent to their system. */
export const PUT = apiHandler({ params: householdZoneParamsSchema, body: presetOrderSchema }, async ({ actor, params, body }) =>
  reorderHouseholdPresets({ actor, zoneId: params.zoneId, version: body.version, presetIds: body.presetIds }),
);
