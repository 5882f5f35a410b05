import { applyTemplateUpdate } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { bulkUpdateSchema, templateIdParamsSchema } from "@/lib/validation/templates";

/** Bring the chosen zones to the template's current version; one revision per changed zone, ready to push. */
export const POST = apiHandler({ params: templateIdParamsSchema, body: bulkUpdateSchema }, async ({ actor, params, body }) =>
  applyTemplateUpdate({ actor, templateId: params.templateId, input: body }),
);
