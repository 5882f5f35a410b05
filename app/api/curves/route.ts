import { createCurve, listCurves } from "@/db/queries/curves";
import { apiHandler } from "@/lib/api/handler";
import { curveCreateSchema } from "@/lib/validation/curves";

// The company's tone-curve library: list (library:read), create (curve:edit).
export const GET = apiHandler({}, async ({ actor }) => ({ items: await listCurves({ actor }) }));

export const POST = apiHandler({ body: curveCreateSchema, status: 201 }, async ({ actor, body }) => createCurve({ actor, input: body }));
