import { z } from "zod";

export const homeSortKeys = ["name", "household", "city", "zones", "updated"] as const;

export const homeListQuerySchema = z.object({
  search: z.string().trim().max(100).optional().default(""),
  sort: z.enum(homeSortKeys).optional().default("name"),
  dir: z.enum(["asc", "desc"]).optional().default("asc"),
  page: z.coerce.number().int().min(1).max(10_000).optional().default(1),
  pageSize: z.coerce.number().int().min(5).max(100).optional().default(20),
});
export type HomeListQuery = z.infer<typeof homeListQuerySchema>;

export const servicePlans = ["essential", "standard", "priority"] as const;

const homeFields = {
  name: z.string().trim().min(2, "Give the home a name of at least 2 characters.").max(80),
  householdName: z.string().trim().min(2, "Name the household (at least 2 characters).").max(80),
  city: z.string().trim().max(80),
  servicePlan: z.enum(servicePlans),
  notes: z.string().trim().max(2000),
};

export const homeInputSchema = z.object({
  ...homeFields,
  city: homeFields.city.default(""),
  servicePlan: homeFields.servicePlan.default("standard"),
  notes: homeFields.notes.default(""),
});
export type HomeInput = z.infer<typeof homeInputSchema>;

// No defaults here: a field left out of a PATCH stays as it is.
export const homeUpdateSchema = z
  .object(homeFields)
  .partial()
  .extend({ version: z.number().int().min(1) });

export const homeIdParamsSchema = z.object({ homeId: z.uuid("That is not a valid home id.") });

/** The SWR key and URL of one page of the homes list (same on server and client). */
export function homeListUrl(q: HomeListQuery): string {
  const params = new URLSearchParams({ search: q.search, sort: q.sort, dir: q.dir, page: String(q.page), pageSize: String(q.pageSize) });
  return `/api/homes?${params.toString()}`;
}
