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
