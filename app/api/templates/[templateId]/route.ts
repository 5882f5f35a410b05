import { deleteTemplate, getTemplate, updateTemplate } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { templateIdParamsSchema, updateTemplateSchema } from "@/lib/validation/templates";

export const GET = apiHandler({ params: templateIdParamsSchema }, async ({ actor, params }) =>
  getTemplate({ actor, templateId: params.templateId }),
);

/** Rename, describe, or edit the configuration (a configuration change makes a new version). */
export const PATCH = apiHandler({ params: templateIdParamsSchema, body: updateTemplateSchema }, async ({ actor, params, body }) =>
  updateTemplate({ actor, templateId: params.templateId, input: body }),
);

/** Only while no zone uses it. */
export const DELETE = apiHandler({ params: templateIdParamsSchema }, async ({ actor, params }) =>
  deleteTemplate({ actor, templateId: params.templateId }),
);
