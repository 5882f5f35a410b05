import "server-only";
import { and, asc, count, eq, ilike, inArray, or, sql } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { homeAssignments, homes, householdMembers, member, session, user } from "@/db/schema";
import { escapeLike } from "@/db/queries/like";
import { recordAudit } from "@/db/queries/audit";
import { AppError } from "@/lib/errors";
import { type Actor, type Role, can, roleLabels, staffRoles } from "@/lib/permissions";
import { householdPageSize, type TeamQuery } from "@/lib/validation/team";

// The team page: staff members and their roles, household members per home.
// Only the owner changes roles or removes people, and the company never loses
// its last owner (checked under a lock on the owners' rows).

export interface TeamMemberDto {
  memberId: string;
  userId: string;
  name: string;
  email: string;
  role: Role;
  since: string;
  isYou: boolean;
  assignedHomes: { id: string; name: string }[];
}

export interface HouseholdDto {
  home: { id: string; name: string; householdName: string };
  members: { userId: string; name: string; email: string; since: string }[];
}

export interface TeamDto {
  members: TeamMemberDto[];
  /** One page of the company's homes with their household members (a company may look after thousands). */
  households: HouseholdDto[];
  householdTotal: number;
  householdPage: number;
  householdPageSize: number;
  householdSearch: string;
  ownerCount: number;
}


export async function getTeam({ actor, query = { hsearch: "", hpage: 1 } }: { actor: Actor; query?: TeamQuery }): Promise<TeamDto> {
  if (!can(actor, "team:read")) throw new AppError("auth:forbidden");
  const rows = await db
    .select({ memberId: member.id, userId: user.id, name: user.name, email: user.email, role: member.role, since: member.createdAt })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, actor.organizationId), inArray(member.role, staffRoles)))
    .orderBy(asc(user.name));
  const userIds = rows.map((r) => r.userId);
  const homeFilters = [eq(homes.organizationId, actor.organizationId)];
  if (query.hsearch) {
    const pattern = `%${escapeLike(query.hsearch)}%`;
    homeFilters.push(or(ilike(homes.name, pattern), ilike(homes.householdName, pattern), ilike(homes.city, pattern))!);
  }
  const homeWhere = and(...homeFilters);
  const [[{ total: householdTotal }], homeRows] = await Promise.all([
    db.select({ total: count() }).from(homes).where(homeWhere),
    db
      .select({ id: homes.id, name: homes.name, householdName: homes.householdName })
      .from(homes)
      .where(homeWhere)
      .orderBy(asc(homes.name), asc(homes.id))
      .limit(householdPageSize)
      .offset((query.hpage - 1) * householdPageSize),
  ]);
  const pageHomeIds = homeRows.map((h) => h.id);
  const [assignments, householdRows] = await Promise.all([
    userIds.length
      ? db
          .select({ userId: homeAssignments.userId, homeId: homes.id, homeName: homes.name })
          .from(homeAssignments)
          .innerJoin(homes, eq(homes.id, homeAssignments.homeId))
          .where(and(inArray(homeAssignments.userId, userIds), eq(homes.organizationId, actor.organizationId)))
          .orderBy(asc(homes.name))
      : Promise.resolve([]),
    pageHomeIds.length
      ? db
          .select({ homeId: householdMembers.homeId, userId: user.id, name: user.name, email: user.email, since: householdMembers.createdAt })
          .from(householdMembers)
          .innerJoin(user, eq(user.id, householdMembers.userId))
          .where(inArray(householdMembers.homeId, pageHomeIds))
          .orderBy(asc(user.name))
      : Promise.resolve([]),
  ]);
  const order = (r: Role) => staffRoles.indexOf(r);
  return {
    members: rows
      .map((r) => ({
        memberId: r.memberId,
        userId: r.userId,
        name: r.name,
        email: r.email,
        role: r.role as Role,
        since: r.since.toISOString(),
        isYou: r.userId === actor.userId,
        assignedHomes: assignments.filter((a) => a.userId === r.userId).map((a) => ({ id: a.homeId, name: a.homeName })),
      }))
      .sort((a, b) => order(a.role) - order(b.role) || a.name.localeCompare(b.name)),
    households: homeRows.map((h) => ({
      home: h,
      members: householdRows
        .filter((m) => m.homeId === h.id)
        .map((m) => ({ userId: m.userId, name: m.name, email: m.email, since: m.since.toISOString() })),
    })),
    householdTotal,
    householdPage: query.hpage,
    householdPageSize,
    householdSearch: query.hsearch,
    ownerCount: rows.filter((r) => r.role === "owner").length,
  };
}

async function lockMember(tx: Transaction, actor: Actor, memberId: string) {
  const [row] = await tx
    .select({ id: member.id, userId: member.userId, role: member.role, name: user.name, email: user.email })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.id, memberId), eq(member.organizationId, actor.organizationId)))
    .for("update", { of: member });
  if (!row || !staffRoles.includes(row.role as Role)) throw new AppError("team:member-not-found");
  return row;
}

/** Lock every owner row of the company, so two owners cannot demote each other at once. */
async function otherOwners(tx: Transaction, actor: Actor, exceptMemberId: string): Promise<number> {
  const owners = await tx
    .select({ id: member.id })
    .from(member)
    .where(and(eq(member.organizationId, actor.organizationId), eq(member.role, "owner")))
    .for("update");
  return owners.filter((o) => o.id !== exceptMemberId).length;
}

export async function changeMemberRole({ actor, memberId, role }: { actor: Actor; memberId: string; role: Role }) {
  if (!can(actor, "team:manage")) throw new AppError("auth:forbidden", { message: "Only the owner changes roles." });
  return db.transaction(async (tx) => {
    const target = await lockMember(tx, actor, memberId);
    if (target.role === role) return { memberId, role };
    if (target.role === "owner" && (await otherOwners(tx, actor, memberId)) === 0) {
      throw new AppError("team:last-owner", { message: `${target.name} is the only owner. Make someone else owner first.` });
    }
    await tx.update(member).set({ role }).where(eq(member.id, memberId));
    await recordAudit(tx, actor, {
      kind: "team.role-changed",
      summary: `Changed ${target.name}’s role from ${roleLabels[target.role as Role].toLowerCase()} to ${roleLabels[role].toLowerCase()}`,
      changes: [{ field: `role of ${target.email}`, before: target.role, after: role }],
    });
    return { memberId, role };
  });
}

export async function removeMember({ actor, memberId }: { actor: Actor; memberId: string }) {
  if (!can(actor, "team:manage")) throw new AppError("auth:forbidden", { message: "Only the owner removes people." });
  return db.transaction(async (tx) => {
    const target = await lockMember(tx, actor, memberId);
    if (target.role === "owner" && (await otherOwners(tx, actor, memberId)) === 0) {
      throw new AppError("team:last-owner", { message: `${target.name} is the only owner and cannot be removed.` });
    }
    await tx.delete(member).where(eq(member.id, memberId));
    // Their home assignments in this company go with them.
    await tx
      .delete(homeAssignments)
      .where(
        and(
          eq(homeAssignments.userId, target.userId),
          inArray(homeAssignments.homeId, tx.select({ id: homes.id }).from(homes).where(eq(homes.organizationId, actor.organizationId))),
        ),
      );
    // Sessions opened in this company end now; without a membership they resolve to no one anyway.
    await tx
      .delete(session)
      .where(and(eq(session.userId, target.userId), sql`(${session.activeOrganizationId} is null or ${session.activeOrganizationId} = ${actor.organizationId})`));
    await recordAudit(tx, actor, {
      kind: "team.member-removed",
      summary: `Removed ${target.name} (${roleLabels[target.role as Role].toLowerCase()}) from the team`,
      changes: [{ field: "member", before: { email: target.email, role: target.role }, after: null }],
    });
    return { ok: true };
  });
}

/** Take a person out of one home's household; their company membership ends with their last home. */
export async function removeHouseholdMember({ actor, homeId, userId }: { actor: Actor; homeId: string; userId: string }) {
  const [home] = await db
    .select({ id: homes.id, name: homes.name, organizationId: homes.organizationId })
    .from(homes)
    .where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId)));
  if (!home) throw new AppError("home:not-found");
  if (!can(actor, "invite:household", home)) throw new AppError("auth:forbidden");
  return db.transaction(async (tx) => {
    const [person] = await tx
      .select({ name: user.name, email: user.email })
      .from(householdMembers)
      .innerJoin(user, eq(user.id, householdMembers.userId))
      .where(and(eq(householdMembers.homeId, homeId), eq(householdMembers.userId, userId)));
    if (!person) throw new AppError("team:member-not-found", { message: "That person is not in this household." });
    await tx.delete(householdMembers).where(and(eq(householdMembers.homeId, homeId), eq(householdMembers.userId, userId)));
    const [remaining] = await tx
      .select({ n: sql<number>`count(*)::int` })
      .from(householdMembers)
      .innerJoin(homes, eq(homes.id, householdMembers.homeId))
      .where(and(eq(householdMembers.userId, userId), eq(homes.organizationId, actor.organizationId)));
    let endedMembership = false;
    if (remaining.n === 0) {
      const gone = await tx
        .delete(member)
        .where(and(eq(member.organizationId, actor.organizationId), eq(member.userId, userId), eq(member.role, "homeowner")))
        .returning({ id: member.id });
      endedMembership = gone.length > 0;
    }
    await recordAudit(tx, actor, {
      kind: "household.member-removed",
      summary: `Removed ${person.name} from the household of ${home.name}`,
      homeId,
      changes: [{ field: "household member", before: person.email, after: null }],
    });
    return { ok: true, endedMembership };
  });
}

/** For the invite form: homes the actor may invite a household member to. */
export async function listInvitableHomes({ actor }: { actor: Actor }) {
  if (!can(actor, "invite:household")) return [];
  return db
    .select({ id: homes.id, name: homes.name, householdName: homes.householdName })
    .from(homes)
    .where(eq(homes.organizationId, actor.organizationId))
    .orderBy(asc(homes.name));
}
