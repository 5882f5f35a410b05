import { createTemplateFromZone, listTemplates } from "@/db/queries/templates";
import { apiHandler } from "@/lib/api/handler";
import { createTemplateSchema } from "@/lib/validation/templates";

export const GET = apiHandler({}, async ({ actor }) => ({ items: await listTemplates({ actor }) }));

/** Save a zone as a new template. */
export const POST = apiHandler({ body: createTemplateSchema, status: 201 }, async ({ actor, body }) =>
  createTemplateFromZone({ actor, input: body }),
);
