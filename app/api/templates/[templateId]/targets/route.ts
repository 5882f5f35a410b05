import { listTemplateTargets } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { templateIdParamsSchema, templateTargetsQuerySchema } from "@/lib/validation/templates";

/** Homes the actor may make a zone in, and free devices (with whether each can take the template). */
export const GET = apiHandler({ params: templateIdParamsSchema, query: templateTargetsQuerySchema }, async ({ actor, params, query }) =>
  listTemplateTargets({ actor, templateId: params.templateId, homeId: query.homeId }),
);
