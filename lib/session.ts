import "server-only";
import { headers as nextHeaders } from "next/headers";
import { redirect } from "next/navigation";
import { loadActor } from "@/db/queries/actors";
import { auth } from "@/lib/auth";
import { AppError } from "@/lib/errors";
import type { Actor } from "@/lib/permissions";

/** The signed-in person with their company role, or null. */
export async function getActor(requestHeaders?: Headers): Promise<Actor | null> {
  const h = requestHeaders ?? (await nextHeaders());
  const session = await auth.api.getSession({ headers: h });
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
