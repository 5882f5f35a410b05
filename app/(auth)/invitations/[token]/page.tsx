import Link from "next/link";
import { AcceptInvitationForm } from "@/components/team/accept-invitation-form";
import { lookupInvitation } from "@/db/queries/invitations";
import { getActor } from "@/lib/session";
import { invitationTokenSchema } from "@/lib/validation/invitations";

export const metadata = { title: "Invitation" };
// The token is a credential: never cache this page.
export const dynamic = "force-dynamic";

const refusals = {
  invalid: { title: "This invitation link is not valid", text: "Check that the whole link was copied from the e-mail, or ask for a new invitation." },
  expired: { title: "This invitation has expired", text: "Invitation links work for a limited time. Ask whoever invited you to send a new one." },
  accepted: { title: "This invitation has already been used", text: "Each link works once. If it was you, sign in with your e-mail and password." },
  revoked: { title: "This invitation was withdrawn", text: "Ask whoever invited you if you should still have access." },
} as const;

export default async function InvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const parsed = invitationTokenSchema.safeParse(token);
  const invitation = parsed.success ? await lookupInvitation({ token: parsed.data }) : null;
  const state = !invitation ? "invalid" : invitation.state === "pending" ? null : invitation.state;
  const actor = invitation && !state ? await getActor() : null;
  const signedInAsInvitee = Boolean(actor && invitation && actor.email.toLowerCase() === invitation.email.toLowerCase());

  return (
    <main className="flex min-h-screen items-center justify-center px-4 py-12">
      <div className="w-full max-w-md">
        <p className="text-center text-2xl font-semibold tracking-tight">
          Zone<span className="text-accent-600">wright</span>
        </p>
        {state ? (
          <section className="mt-6 rounded-lg border border-slate-200 bg-white p-6 shadow-sm" data-testid="invitation-refused">
            <h1 className="text-lg font-semibold">{refusals[state].title}</h1>
            <p className="mt-2 text-sm text-slate-700">{refusals[state].text}</p>
            <Link href="/sign-in" className="mt-4 inline-block text-sm font-medium text-accent-700 underline">Go to sign-in</Link>
          </section>
        ) : invitation ? (
          <>
            <h1 className="mt-4 text-center text-xl font-semibold">
              {invitation.homeName ? `See ${invitation.homeName}` : `Join ${invitation.organizationName}`}
            </h1>
            <p className="mt-1 text-center text-sm text-slate-600">
              {invitation.homeName
                ? `${invitation.organizationName} invites you to see how the audio in ${invitation.homeName} is set up, and to put your favourite stations in order.`
                : `${invitation.organizationName} invites you to join as ${invitation.roleLabel.toLowerCase()}.`}{" "}
              The link works once, until{" "}
              {new Date(invitation.expiresAt).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: "UTC" })} UTC.
            </p>
            {actor && !signedInAsInvitee ? (
              <p className="mt-3 rounded-md bg-caution-50 px-3 py-2 text-sm text-caution-700" role="note">
                You are signed in as {actor.email}. Accepting signs you in as {invitation.email} instead.
              </p>
            ) : null}
            {invitation.accountExists && !signedInAsInvitee ? (
              <p className="mt-3 text-sm text-slate-600">You already have a Zonewright account with this address: confirm it with your password.</p>
            ) : null}
            <AcceptInvitationForm token={parsed.data!} email={invitation.email} accountExists={invitation.accountExists} signedInAsInvitee={signedInAsInvitee} />
          </>
        ) : null}
      </div>
    </main>
  );
}
