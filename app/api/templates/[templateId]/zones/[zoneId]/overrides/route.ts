import { setZoneOverrides } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { setOverridesSchema, templateZoneParamsSchema } from "@/lib/validation/templates";

/** The fields this zone sets itself, kept when its template is updated. */
export const PUT = apiHandler({ params: templateZoneParamsSchema, body: setOverridesSchema }, async ({ actor, params, body }) =>
  setZoneOverrides({ actor, templateId: params.templateId, zoneId: params.zoneId, version: body.version, overrides: body.overrides }),
);
