import { revokeInvitation } from "@/db/queries/invitations";
import { apiHandler } from "@/lib/api/handler";
import { invitationIdParamsSchema } from "@/lib/validation/invitations";

/** Withdraw a pending invitation: its link stops working. */
export const DELETE = apiHandler({ params: invitationIdParamsSchema }, async ({ actor, params }) =>
  revokeInvitation({ actor, invitationId: params.invitationId }),
);
