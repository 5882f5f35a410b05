import { createHome, listHomes } from "@/db/queries/homes";
import { apiHandler } from "@/lib/api/handler";
import { AppError } from "@/lib/errors";
import { can } from "@/lib/permissions";
import { homeInputSchema, homeListQuerySchema } from "@/lib/validation/homes";

export const GET = apiHandler({ query: homeListQuerySchema }, async ({ actor, query }) => {
  if (!can(actor, "home:read") && actor.role !== "homeowner") throw new AppError("auth:forbidden");
  return listHomes({ actor, query });
});

export const POST = apiHandler({ body: homeInputSchema, status: 201 }, async ({ actor, body }) =>
  createHome({ actor, input: body }),
);
