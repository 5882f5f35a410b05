import { index, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { organization, user } from "./auth";
import { homes } from "./homes";

/**
 * Invitation by e-mail: a team member (any staff role, by the owner) or a
 * household member of one home (by an integrator). The link carries a random
 * token; only its hash is stored. Single use, expires.
 */
export const accessInvitations = pgTable(
  "access_invitations",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    email: text().notNull(),
    role: text().notNull(),
    homeId: uuid().references(() => homes.id, { onDelete: "cascade" }),
    tokenHash: text().notNull().unique(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    acceptedAt: timestamp({ withTimezone: true }),
    acceptedBy: text().references(() => user.id, { onDelete: "set null" }),
    revokedAt: timestamp({ withTimezone: true }),
    invitedBy: text().references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("access_invitations_org_idx").on(t.organizationId, t.createdAt)],
);

export type AccessInvitation = typeof accessInvitations.$inferSelect;
