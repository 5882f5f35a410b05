import { NextResponse } from "next/server";
import { acceptInvitation } from "@/db/queries/invitations";
import { errorResponse, parseOrThrow } from "@/lib/api/handler";
import { auth } from "@/lib/auth";
import { AppError } from "@/lib/errors";
import { acceptInvitationSchema } from "@/lib/validation/invitations";

// The one route open without a session: the person accepting may not have an
// account yet. The token is the credential; it is checked, spent and the account
// created or linked in one transaction (db/queries/invitations.ts), then the
// person is signed in with the password they just gave.

function cookiePairs(setCookies: string[]): string {
  return setCookies.map((c) => c.split(";")[0]).join("; ");
}

export async function POST(request: Request): Promise<Response> {
  try {
    let json: unknown;
    try {
      json = await request.json();
    } catch {
      throw new AppError("request:bad-json");
    }
    const body = parseOrThrow(acceptInvitationSchema, json);
    const current = await auth.api.getSession({ headers: request.headers });
    const accepted = await acceptInvitation({
      token: body.token,
      name: body.name,
      password: body.password,
      signedInUserId: current?.user.id ?? null,
    });

    const next = accepted.role === "homeowner" ? "/household" : "/homes";
    const setCookies: string[] = [];
    let cookieHeader = request.headers.get("cookie") ?? "";
    let signedIn = current?.user.id === accepted.userId;
    if (!signedIn && body.password) {
      const signIn = await auth.api.signInEmail({ body: { email: accepted.email, password: body.password }, asResponse: true });
      if (signIn.ok) {
        setCookies.push(...signIn.headers.getSetCookie());
        cookieHeader = cookiePairs(setCookies);
        signedIn = true;
      }
    }
    if (signedIn && !accepted.createdAccount) {
      // Someone already in another company: open this session in the company that invited them.
      const switched = await auth.api.setActiveOrganization({
        body: { organizationId: accepted.organizationId },
        headers: new Headers({ cookie: cookieHeader }),
        asResponse: true,
      });
      if (switched.ok) setCookies.push(...switched.headers.getSetCookie());
    }

    const response = NextResponse.json({ ok: true, role: accepted.role, next: signedIn ? next : `/sign-in?next=${encodeURIComponent(next)}`, signedIn, createdAccount: accepted.createdAccount });
    for (const c of setCookies) response.headers.append("set-cookie", c);
    return response;
  } catch (error) {
    return errorResponse(error);
  }
}
