import { updateZoneSettings } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { zoneParamsSchema, zoneSettingsPatchSchema } from "@/lib/validation/board";

// Name, volume ceiling, turn-on volume, guest controls and device settings of a zone.
export const PATCH = apiHandler({ params: zoneParamsSchema, body: zoneSettingsPatchSchema }, async ({ actor, params, body }) => {
  const { version, ...patch } = body;
  return updateZoneSettings({ actor, zoneId: params.zoneId, version, patch });
});
