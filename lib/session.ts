import "server-only";
import { LRUCache } from "lru-cache";
import { headers as nextHeaders } from "next/headers";
import { redirect } from "next/navigation";
import { loadActor } from "@/db/queries/actors";
import { auth, type Session } from "@/lib/auth";
import { AppError } from "@/lib/errors";
import type { Actor } from "@/lib/permissions";

/**
 * better-auth's signed session cookies, exactly as sent, memoised for a few
 * seconds. Verifying them costs about a millisecond of CPU per request, and
 * the answer cannot change in that time: better-auth itself trusts the signed
 * session-data cookie for a minute (cookieCache in lib/auth.ts) without asking
 * the database, so this adds no staleness. Roles are not memoised: the actor
 * is read fresh on every request (db/queries/actors.ts).
 */
const SESSION_MEMO_MS = 5_000;
const sessions = new LRUCache<string, Session>({ max: 10_000, ttl: SESSION_MEMO_MS });

function sessionCookies(h: Headers): string | null {
  const cookie = h.get("cookie");
  if (!cookie) return null;
  const ours = cookie
    .split(";")
    .map((c) => c.trim())
    .filter((c) => /^(__Secure-)?better-auth\.session_(token|data)=/.test(c))
    .sort();
  return ours.length ? ours.join("; ") : null;
}

async function getSession(h: Headers): Promise<Session | null> {
  const key = sessionCookies(h);
  if (!key) return null;
  const memo = sessions.get(key);
  if (memo && new Date(memo.session.expiresAt).getTime() > Date.now()) return memo;
  const session = await auth.api.getSession({ headers: h });
  if (session) sessions.set(key, session);
  return session;
}

/** The signed-in person with their company role, or null. */
export async function getActor(requestHeaders?: Headers): Promise<Actor | null> {
  const h = requestHeaders ?? (await nextHeaders());
  const session = await getSession(h);
  if (!session) return null;
  return loadActor({ userId: session.user.id, activeOrganizationId: session.session.activeOrganizationId ?? null });
}

/** For route handlers and server actions: a refusal, never "all rows". */
export async function requireActor(requestHeaders?: Headers): Promise<Actor> {
  const actor = await getActor(requestHeaders);
  if (!actor) throw new AppError("auth:unauthenticated");
  return actor;
}

/** For pages: send the visitor to sign-in when there is no session. */
export async function requirePageActor(next?: string): Promise<Actor> {
  const actor = await getActor();
  if (!actor) redirect(next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in");
  return actor;
}
