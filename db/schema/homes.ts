import { relations } from "drizzle-orm";
import { bigint, index, integer, pgTable, primaryKey, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { organization, user } from "./auth";

/** A client home looked after by an integrator company. */
export const homes = pgTable(
  "homes",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: text().notNull(),
    householdName: text().notNull(),
    city: text().notNull().default(""),
    servicePlan: text().notNull().default("standard"),
    notes: text().notNull().default(""),
    version: integer().notNull().default(1),
    /**
     * Bumped by database triggers (drizzle/0002) whenever anything the zone board
     * shows of this home changes: zones, sources, presets, devices, clips. The
     * board's cache and ETag rest on it; nothing in the app writes it.
     */
    boardVersion: bigint({ mode: "number" }).notNull().default(0),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("homes_org_name_idx").on(t.organizationId, t.name)],
);

/** People who belong to a household (homeowner role) and may see that home. */
export const householdMembers = pgTable(
  "household_members",
  {
    homeId: uuid()
      .notNull()
      .references(() => homes.id, { onDelete: "cascade" }),
    userId: text()
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.homeId, t.userId] }), index("household_members_user_idx").on(t.userId)],
);

/** Installers assigned to work on a home. */
export const homeAssignments = pgTable(
  "home_assignments",
  {
    homeId: uuid()
      .notNull()
      .references(() => homes.id, { onDelete: "cascade" }),
    userId: text()
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.homeId, t.userId] }), index("home_assignments_user_idx").on(t.userId)],
);

export const homesRelations = relations(homes, ({ one, many }) => ({
  organization: one(organization, { fields: [homes.organizationId], references: [organization.id] }),
  householdMembers: many(householdMembers),
  assignments: many(homeAssignments),
}));

export const householdMembersRelations = relations(householdMembers, ({ one }) => ({
  home: one(homes, { fields: [householdMembers.homeId], references: [homes.id] }),
  user: one(user, { fields: [householdMembers.userId], references: [user.id] }),
}));

export const homeAssignmentsRelations = relations(homeAssignments, ({ one }) => ({
  home: one(homes, { fields: [homeAssignments.homeId], references: [homes.id] }),
  user: one(user, { fields: [homeAssignments.userId], references: [user.id] }),
}));

export type Home = typeof homes.$inferSelect;
export type NewHome = typeof homes.$inferInsert;
