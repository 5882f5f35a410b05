import { createInvitation, listInvitations } from "@/db/queries/invitations";
import { apiHandler } from "@/lib/api/handler";
import { AppError } from "@/lib/errors";
import { mayEver } from "@/lib/permissions";
import { createInvitationSchema } from "@/lib/validation/invitations";

export const GET = apiHandler({}, async ({ actor }) => {
  if (!mayEver(actor, "invite:team") && !mayEver(actor, "invite:household")) throw new AppError("auth:forbidden");
  return { items: await listInvitations({ actor }) };
});

/** Owners invite team members with a role; owners and integrators invite a household member to a home. */
export const POST = apiHandler({ body: createInvitationSchema, status: 201 }, async ({ actor, body }) =>
  createInvitation({ actor, input: body }),
);
