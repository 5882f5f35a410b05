import { getSessionCookie } from "better-auth/cookies";
import { NextResponse, type NextRequest } from "next/server";

// An early, cookie-only redirect to sign-in that remembers where the visitor
// was going. It is a convenience, not the check: every page, route handler and
// action still resolves the session and the role on the server.
export function proxy(request: NextRequest) {
  if (getSessionCookie(request)) return NextResponse.next();
  const url = request.nextUrl.clone();
  const next = `${request.nextUrl.pathname}${request.nextUrl.search}`;
  url.pathname = "/sign-in";
  url.search = next === "/" ? "" : `?next=${encodeURIComponent(next)}`;
  return NextResponse.redirect(url);
}

export const config = {
  // Pages only: API routes answer 401 JSON themselves; sign-in, invitations
  // and static files stay public.
  matcher: ["/((?!api|sign-in|invitations|_next|favicon.ico|fonts).*)"],
};
