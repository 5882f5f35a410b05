import { applyTemplateToHome } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { applyTemplateSchema, templateIdParamsSchema } from "@/lib/validation/templates";

/** Make a new zone from the template in a home (existing or new), bound to a free device. */
export const POST = apiHandler({ params: templateIdParamsSchema, body: applyTemplateSchema, status: 201 }, async ({ actor, params, body }) =>
  applyTemplateToHome({ actor, templateId: params.templateId, input: body }),
);
