import { z } from "zod";
import { roles } from "@/lib/permissions";

/** Invitation links carry 32 random bytes, base64url: 43 characters. */
export const invitationTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/, "That invitation link is not valid.");

export const invitationIdParamsSchema = z.object({ invitationId: z.uuid("That is not a valid invitation id.") });

export const createInvitationSchema = z
  .object({
    email: z
      .string("Enter the e-mail address to send the invitation to.")
      .trim()
      .toLowerCase()
      .pipe(z.email("Enter the e-mail address to send the invitation to.").max(200)),
    role: z.enum(roles, "Choose a role."),
    homeId: z.uuid("Choose the home.").optional(),
  })
  .superRefine((v, ctx) => {
    if (v.role === "homeowner" && !v.homeId) {
      ctx.addIssue({ code: "custom", path: ["homeId"], message: "A household member is invited to one home: choose it." });
    }
    if (v.role !== "homeowner" && v.homeId) {
      ctx.addIssue({ code: "custom", path: ["homeId"], message: "Team members are not invited to a single home." });
    }
  });
export type CreateInvitationInput = z.infer<typeof createInvitationSchema>;

export const acceptInvitationSchema = z.object({
  token: invitationTokenSchema,
  /** Only for a new account. */
  name: z.string().trim().min(2, "Enter your name (at least 2 characters).").max(80).optional(),
  /** A new password for a new account, or the existing account's password. Not needed when already signed in as that account. */
  password: z.string().max(128, "Keep the password under 128 characters.").optional(),
});
export type AcceptInvitationInput = z.infer<typeof acceptInvitationSchema>;

export const newPasswordSchema = z.string().min(10, "Choose a password of at least 10 characters.").max(128);

/** Days an invitation link stays valid. */
export const INVITATION_TTL_DAYS = 7;
