import { z } from "zod";
import { staffRoles } from "@/lib/permissions";

export const memberIdParamsSchema = z.object({ memberId: z.string().min(1).max(100) });

export const householdMemberParamsSchema = z.object({
  homeId: z.uuid("That is not a valid home id."),
  userId: z.string().min(1).max(100),
});

export const changeRoleSchema = z.object({
  role: z.enum(staffRoles as ["owner", "integrator", "installer", "support"], "Choose a team role: owner, integrator, installer or support."),
});
export type ChangeRoleInput = z.infer<typeof changeRoleSchema>;

/** The households part of the team page: a page of homes, optionally searched. */
export const householdPageSize = 24;
export const teamQuerySchema = z.object({
  hsearch: z.string().trim().max(100, "Search with at most 100 characters.").optional().default(""),
  hpage: z.coerce.number({ error: "The page is a number." }).int().min(1).max(10_000).optional().default(1),
});
export type TeamQuery = z.infer<typeof teamQuerySchema>;

/** The API address of the team page for a households search and page (defaults left out). */
export function teamSearch(q: { hsearch?: string; hpage?: number }): string {
  const params = new URLSearchParams();
  if (q.hsearch) params.set("hsearch", q.hsearch);
  if (q.hpage && q.hpage > 1) params.set("hpage", String(q.hpage));
  const s = params.toString();
  return s ? `?${s}` : "";
}
