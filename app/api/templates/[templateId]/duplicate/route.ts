import { duplicateTemplate } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { duplicateTemplateSchema, templateIdParamsSchema } from "@/lib/validation/templates";

/** A variant: a new template (version 1) with the same configuration. */
export const POST = apiHandler({ params: templateIdParamsSchema, body: duplicateTemplateSchema, status: 201 }, async ({ actor, params, body }) =>
  duplicateTemplate({ actor, templateId: params.templateId, input: body }),
);
