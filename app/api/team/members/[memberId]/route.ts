import { changeMemberRole, removeMember } from "@/db/queries/team";
import { apiHandler } from "@/lib/api/handler";
import { changeRoleSchema, memberIdParamsSchema } from "@/lib/validation/team";

/** Change a team member's role (owner only; the last owner stays an owner). */
export const PATCH = apiHandler({ params: memberIdParamsSchema, body: changeRoleSchema }, async ({ actor, params, body }) =>
  changeMemberRole({ actor, memberId: params.memberId, role: body.role }),
);

/** Remove someone from the team (owner only; never the last owner). */
export const DELETE = apiHandler({ params: memberIdParamsSchema }, async ({ actor, params }) =>
  removeMember({ actor, memberId: params.memberId }),
);
