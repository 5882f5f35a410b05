import "server-only";
import { asc, eq } from "drizzle-orm";
import { db } from "@/db/client";
import { homeAssignments, householdMembers, member, organization, user } from "@/db/schema";
import { type Actor, type Role, roles } from "@/lib/permissions";

/** Resolve a user to their role in their (active) company. */
export async function loadActor(input: { userId: string; activeOrganizationId: string | null }): Promise<Actor | null> {
  const memberships = await db
    .select({
      organizationId: member.organizationId,
      organizationName: organization.name,
      role: member.role,
      name: user.name,
      email: user.email,
    })
    .from(member)
    .innerJoin(organization, eq(organization.id, member.organizationId))
    .innerJoin(user, eq(user.id, member.userId))
    .where(eq(member.userId, input.userId))
    .orderBy(asc(member.createdAt));
  const chosen =
    memberships.find((m) => m.organizationId === input.activeOrganizationId) ?? memberships[0];
  if (!chosen || !(roles as readonly string[]).includes(chosen.role)) return null;
  const role = chosen.role as Role;

  const [household, assigned] = await Promise.all([
    role === "homeowner"
      ? db.select({ homeId: householdMembers.homeId }).from(householdMembers).where(eq(householdMembers.userId, input.userId))
      : Promise.resolve([]),
    role === "installer"
      ? db.select({ homeId: homeAssignments.homeId }).from(homeAssignments).where(eq(homeAssignments.userId, input.userId))
      : Promise.resolve([]),
  ]);

  return {
    userId: input.userId,
    name: chosen.name,
    email: chosen.email,
    role,
    organizationId: chosen.organizationId,
    organizationName: chosen.organizationName,
    householdHomeIds: household.map((h) => h.homeId),
    assignedHomeIds: assigned.map((h) => h.homeId),
  };
}
