import "server-only";
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { hashPassword, verifyPassword } from "better-auth/crypto";
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { accessInvitations, account, homes, householdMembers, member, organization, user } from "@/db/schema";
import { recordAudit } from "@/db/queries/audit";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { sendMail } from "@/lib/mail";
import { type Actor, type Role, can, roleLabels, roles } from "@/lib/permissions";
import { INVITATION_TTL_DAYS, newPasswordSchema, type CreateInvitationInput } from "@/lib/validation/invitations";

// Invitations by e-mail. The link carries a random token; only its SHA-256 is
// stored, so a database reader cannot accept anyone's invitation. A link is
// single-use (accepted_at set under a row lock) and expires.

export type InvitationState = "pending" | "accepted" | "expired" | "revoked";

export interface InvitationDto {
  id: string;
  email: string;
  role: Role;
  home: { id: string; name: string } | null;
  invitedBy: string | null;
  state: InvitationState;
  createdAt: string;
  expiresAt: string;
  acceptedAt: string | null;
}

export function hashInvitationToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

export function newInvitationToken(): string {
  return randomBytes(32).toString("base64url");
}

function stateOf(row: { acceptedAt: Date | null; revokedAt: Date | null; expiresAt: Date }, now = new Date()): InvitationState {
  if (row.acceptedAt) return "accepted";
  if (row.revokedAt) return "revoked";
  if (row.expiresAt <= now) return "expired";
  return "pending";
}

/** Which invitations may the actor see and withdraw? Owners all; designers household ones. */
function visibleRoles(actor: Actor): Role[] {
  if (can(actor, "invite:team")) return [...roles];
  if (can(actor, "invite:household")) return ["homeowner"];
  return [];
}

export async function listInvitations({ actor, limit = 100 }: { actor: Actor; limit?: number }): Promise<InvitationDto[]> {
  const visible = visibleRoles(actor);
  if (visible.length === 0) return [];
  const inviter = sql<string | null>`(select u.name from "user" u where u.id = "access_invitations"."invited_by")`;
  const rows = await db
    .select({
      id: accessInvitations.id,
      email: accessInvitations.email,
      role: accessInvitations.role,
      homeId: accessInvitations.homeId,
      homeName: homes.name,
      invitedBy: inviter,
      createdAt: accessInvitations.createdAt,
      expiresAt: accessInvitations.expiresAt,
      acceptedAt: accessInvitations.acceptedAt,
      revokedAt: accessInvitations.revokedAt,
    })
    .from(accessInvitations)
    .leftJoin(homes, eq(homes.id, accessInvitations.homeId))
    .where(and(eq(accessInvitations.organizationId, actor.organizationId), inArray(accessInvitations.role, visible)))
    .orderBy(desc(accessInvitations.createdAt))
    .limit(limit);
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    role: r.role as Role,
    home: r.homeId ? { id: r.homeId, name: r.homeName ?? "" } : null,
    invitedBy: r.invitedBy,
    state: stateOf(r),
    createdAt: r.createdAt.toISOString(),
    expiresAt: r.expiresAt.toISOString(),
    acceptedAt: r.acceptedAt?.toISOString() ?? null,
  }));
}

function invitationMail(input: {
  to: string;
  link: string;
  inviter: string;
  company: string;
  role: Role;
  homeName: string | null;
  expiresAt: Date;
}) {
  const until = input.expiresAt.toLocaleString("en-GB", { dateStyle: "long", timeStyle: "short", timeZone: "UTC" }) + " UTC";
  const what = input.homeName
    ? `to see how the audio in ${input.homeName} is set up, and to put your favourite stations in your own order`
    : `to join ${input.company} on Zonewright as ${roleLabels[input.role].toLowerCase()}`;
  const subject = input.homeName ? `${input.company} invites you to see ${input.homeName}` : `Join ${input.company} on Zonewright`;
  const text = [
    `Hello,`,
    ``,
    `${input.inviter} of ${input.company} invites you ${what}.`,
    ``,
    `Accept the invitation here (the link works once, until ${until}):`,
    input.link,
    ``,
    `If you did not expect this e-mail, you can ignore it; nothing happens unless the link is opened and accepted.`,
  ].join("\n");
  const escape = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c]!);
  const html = `<p>Hello,</p>
<p>${escape(input.inviter)} of ${escape(input.company)} invites you ${escape(what)}.</p>
<p><a href="${escape(input.link)}">Accept the invitation</a> — the link works once, until ${escape(until)}.</p>
<p style="color:#555">If you did not expect this e-mail, you can ignore it; nothing happens unless the link is opened and accepted.</p>`;
  return { to: input.to, subject, text, html };
}

/**
 * Invite someone by e-mail. The row and its audit event are written and the
 * e-mail sent in one transaction: if the mail server refuses, nothing is kept.
 * A new invitation to the same address (and home) withdraws the earlier one.
 */
export async function createInvitation({ actor, input }: { actor: Actor; input: CreateInvitationInput }): Promise<InvitationDto> {
  let homeRow: { id: string; name: string; organizationId: string } | null = null;
  if (input.role === "homeowner") {
    const [h] = await db
      .select({ id: homes.id, name: homes.name, organizationId: homes.organizationId })
      .from(homes)
      .where(and(eq(homes.id, input.homeId!), eq(homes.organizationId, actor.organizationId)));
    // Another company's home is "not found", whatever the role.
    if (!h) throw new AppError("home:not-found");
    if (!can(actor, "invite:household", h)) throw new AppError("auth:forbidden");
    homeRow = h;
  } else if (!can(actor, "invite:team")) {
    throw new AppError("auth:forbidden", { message: "Only the owner invites team members." });
  }

  const email = input.email.trim().toLowerCase();
  const [existing] = await db
    .select({ role: member.role })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, actor.organizationId), eq(sql`lower(${user.email})`, email)));
  if (existing && (input.role !== "homeowner" || existing.role !== "homeowner")) {
    throw new AppError("invitation:already-member", {
      message: `${email} already belongs to ${actor.organizationName} as ${roleLabels[existing.role as Role]?.toLowerCase() ?? existing.role}.`,
      fieldErrors: { email: ["Already a member of your company."] },
    });
  }
  if (existing && homeRow) {
    const [already] = await db
      .select({ userId: householdMembers.userId })
      .from(householdMembers)
      .innerJoin(user, eq(user.id, householdMembers.userId))
      .where(and(eq(householdMembers.homeId, homeRow.id), eq(sql`lower(${user.email})`, email)));
    if (already) {
      throw new AppError("invitation:already-member", {
        message: `${email} already belongs to the household of ${homeRow.name}.`,
        fieldErrors: { email: ["Already in this household."] },
      });
    }
  }

  const token = newInvitationToken();
  const expiresAt = new Date(Date.now() + INVITATION_TTL_DAYS * 24 * 3600 * 1000);
  const link = `${env().APP_URL.replace(/\/$/, "")}/invitations/${token}`;

  return db.transaction(async (tx) => {
    const now = new Date();
    await tx
      .update(accessInvitations)
      .set({ revokedAt: now })
      .where(
        and(
          eq(accessInvitations.organizationId, actor.organizationId),
          eq(accessInvitations.email, email),
          homeRow ? eq(accessInvitations.homeId, homeRow.id) : isNull(accessInvitations.homeId),
          isNull(accessInvitations.acceptedAt),
          isNull(accessInvitations.revokedAt),
        ),
      );
    const [row] = await tx
      .insert(accessInvitations)
      .values({
        organizationId: actor.organizationId,
        email,
        role: input.role,
        homeId: homeRow?.id ?? null,
        tokenHash: hashInvitationToken(token),
        expiresAt,
        invitedBy: actor.userId,
      })
      .returning();
    await recordAudit(tx, actor, {
      kind: homeRow ? "invitation.household.sent" : "invitation.team.sent",
      summary: homeRow
        ? `Invited ${email} to the household of ${homeRow.name}`
        : `Invited ${email} to the team as ${roleLabels[input.role].toLowerCase()}`,
      homeId: homeRow?.id ?? null,
      changes: [
        { field: "email", before: null, after: email },
        { field: "role", before: null, after: input.role },
        { field: "expiresAt", before: null, after: expiresAt.toISOString() },
      ],
    });
    try {
      await sendMail(
        invitationMail({ to: email, link, inviter: actor.name, company: actor.organizationName, role: input.role, homeName: homeRow?.name ?? null, expiresAt }),
      );
    } catch (error) {
      console.error("[invitations] mail failed", error);
      throw new AppError("mail:unavailable");
    }
    return {
      id: row.id,
      email,
      role: input.role,
      home: homeRow ? { id: homeRow.id, name: homeRow.name } : null,
      invitedBy: actor.name,
      state: "pending" as const,
      createdAt: row.createdAt.toISOString(),
      expiresAt: row.expiresAt.toISOString(),
      acceptedAt: null,
    };
  });
}

export async function revokeInvitation({ actor, invitationId }: { actor: Actor; invitationId: string }) {
  const visible = visibleRoles(actor);
  const [row] = await db
    .select()
    .from(accessInvitations)
    .where(and(eq(accessInvitations.id, invitationId), eq(accessInvitations.organizationId, actor.organizationId)));
  if (!row) throw new AppError("invitation:not-found", { message: "That invitation does not exist." });
  if (!visible.includes(row.role as Role)) throw new AppError("auth:forbidden");
  if (row.homeId && !can(actor, "invite:household", { id: row.homeId, organizationId: row.organizationId })) {
    throw new AppError("auth:forbidden");
  }
  const state = stateOf(row);
  if (state === "accepted") throw new AppError("invitation:used", { message: "That invitation was already accepted; remove the person instead." });
  if (state === "revoked") return { ok: true };
  return db.transaction(async (tx) => {
    await tx.update(accessInvitations).set({ revokedAt: new Date() }).where(eq(accessInvitations.id, row.id));
    await recordAudit(tx, actor, {
      kind: "invitation.revoked",
      summary: `Withdrew the invitation of ${row.email}`,
      homeId: row.homeId,
      changes: [{ field: "state", before: state, after: "revoked" }],
    });
    return { ok: true };
  });
}

export interface InvitationLookupDto {
  email: string;
  role: Role;
  roleLabel: string;
  organizationName: string;
  homeName: string | null;
  state: InvitationState;
  expiresAt: string;
  accountExists: boolean;
}

/** What the invitation page shows: no ids, nothing beyond what the e-mail already said. */
export async function lookupInvitation({ token }: { token: string }): Promise<InvitationLookupDto | null> {
  const [row] = await db
    .select({
      email: accessInvitations.email,
      role: accessInvitations.role,
      organizationName: organization.name,
      homeName: homes.name,
      expiresAt: accessInvitations.expiresAt,
      acceptedAt: accessInvitations.acceptedAt,
      revokedAt: accessInvitations.revokedAt,
    })
    .from(accessInvitations)
    .innerJoin(organization, eq(organization.id, accessInvitations.organizationId))
    .leftJoin(homes, eq(homes.id, accessInvitations.homeId))
    .where(eq(accessInvitations.tokenHash, hashInvitationToken(token)));
  if (!row) return null;
  const [u] = await db.select({ id: user.id }).from(user).where(eq(sql`lower(${user.email})`, row.email.toLowerCase()));
  return {
    email: row.email,
    role: row.role as Role,
    roleLabel: roleLabels[row.role as Role] ?? row.role,
    organizationName: row.organizationName,
    homeName: row.homeName,
    state: stateOf(row),
    expiresAt: row.expiresAt.toISOString(),
    accountExists: Boolean(u),
  };
}

export interface AcceptedInvitation {
  userId: string;
  email: string;
  organizationId: string;
  role: Role;
  homeId: string | null;
  createdAccount: boolean;
}

/**
 * Accept an invitation: create the account (name + new password) or link the
 * existing one (its password, or an open session of that very account), add
 * the company membership and the household link, and spend the token — all
 * in one transaction, under a lock on the invitation row.
 */
export async function acceptInvitation({
  token,
  name,
  password,
  signedInUserId,
}: {
  token: string;
  name?: string;
  password?: string;
  signedInUserId?: string | null;
}): Promise<AcceptedInvitation> {
  return db.transaction(async (tx) => {
    const [inv] = await tx
      .select()
      .from(accessInvitations)
      .where(eq(accessInvitations.tokenHash, hashInvitationToken(token)))
      .for("update");
    if (!inv) throw new AppError("invitation:not-found");
    const state = stateOf(inv);
    if (state === "accepted") throw new AppError("invitation:used");
    if (state === "revoked") throw new AppError("invitation:revoked");
    if (state === "expired") throw new AppError("invitation:expired");
    const role = inv.role as Role;

    if (inv.homeId) {
      // The home must still belong to the inviting company.
      const [h] = await tx
        .select({ id: homes.id })
        .from(homes)
        .where(and(eq(homes.id, inv.homeId), eq(homes.organizationId, inv.organizationId)));
      if (!h) throw new AppError("home:not-found");
    }

    const [existingUser] = await tx
      .select({ id: user.id, name: user.name })
      .from(user)
      .where(eq(sql`lower(${user.email})`, inv.email.toLowerCase()));
    let userId: string;
    let personName: string;
    let createdAccount = false;

    if (existingUser) {
      userId = existingUser.id;
      personName = existingUser.name;
      if (signedInUserId !== existingUser.id) {
        const [cred] = await tx
          .select({ password: account.password })
          .from(account)
          .where(and(eq(account.userId, existingUser.id), eq(account.providerId, "credential")));
        const ok = Boolean(cred?.password && password && (await verifyPassword({ hash: cred.password, password })));
        if (!ok) {
          throw new AppError("invitation:wrong-password", { fieldErrors: { password: ["Enter the password of your existing account."] } });
        }
      }
    } else {
      const fieldErrors: Record<string, string[]> = {};
      if (!name) fieldErrors.name = ["Enter your name (at least 2 characters)."];
      const pw = newPasswordSchema.safeParse(password ?? "");
      if (!pw.success) fieldErrors.password = [pw.error.issues[0].message];
      if (Object.keys(fieldErrors).length) throw new AppError("request:invalid", { fieldErrors });
      userId = randomUUID();
      personName = name!;
      createdAccount = true;
      // Holding the link proves the mailbox, so the address counts as verified.
      await tx.insert(user).values({ id: userId, name: name!, email: inv.email.toLowerCase(), emailVerified: true });
      await tx.insert(account).values({
        id: randomUUID(),
        accountId: userId,
        providerId: "credential",
        userId,
        password: await hashPassword(password!),
      });
    }

    const [membership] = await tx
      .select({ id: member.id, role: member.role })
      .from(member)
      .where(and(eq(member.organizationId, inv.organizationId), eq(member.userId, userId)));
    if (membership && (role !== "homeowner" || membership.role !== "homeowner")) {
      throw new AppError("invitation:already-member", { message: "You already belong to this company. Sign in instead." });
    }
    if (!membership) {
      await tx.insert(member).values({ id: randomUUID(), organizationId: inv.organizationId, userId, role });
    }
    if (inv.homeId) {
      await tx.insert(householdMembers).values({ homeId: inv.homeId, userId }).onConflictDoNothing();
    }

    const spent = await tx
      .update(accessInvitations)
      .set({ acceptedAt: new Date(), acceptedBy: userId })
      .where(and(eq(accessInvitations.id, inv.id), isNull(accessInvitations.acceptedAt)))
      .returning({ id: accessInvitations.id });
    if (spent.length !== 1) throw new AppError("invitation:used");

    await recordAudit(tx, { userId, name: personName, role, organizationId: inv.organizationId }, {
      kind: "invitation.accepted",
      summary: `${personName} accepted the invitation${inv.homeId ? " to their home" : ` as ${roleLabels[role].toLowerCase()}`}${createdAccount ? " (new account)" : ""}`,
      homeId: inv.homeId,
      changes: [{ field: "member", before: null, after: { email: inv.email, role } }],
    });

    return { userId, email: inv.email.toLowerCase(), organizationId: inv.organizationId, role, homeId: inv.homeId, createdAccount };
  });
}
