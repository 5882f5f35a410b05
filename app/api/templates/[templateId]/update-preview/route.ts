import { previewTemplateUpdate } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { templateIdParamsSchema } from "@/lib/validation/templates";

/** Per zone made from the template: the field-by-field change an update would make, and what it keeps. */
export const GET = apiHandler({ params: templateIdParamsSchema }, async ({ actor, params }) =>
  previewTemplateUpdate({ actor, templateId: params.templateId }),
);
