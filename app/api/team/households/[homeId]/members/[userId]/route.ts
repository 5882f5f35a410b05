import { removeHouseholdMember } from "@/db/queries/team";
import { apiHandler } from "@/lib/api/handler";
import { householdMemberParamsSchema } from "@/lib/validation/team";

/** Take a person out of a home's household. */
export const DELETE = apiHandler({ params: householdMemberParamsSchema }, async ({ actor, params }) =>
  removeHouseholdMember({ actor, homeId: params.homeId, userId: params.userId }),
);
