import { relations } from "drizzle-orm";
import { bigserial, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { organization, user } from "./auth";
import { devices } from "./devices";
import { homes } from "./homes";
import { zoneRevisions, zones } from "./zones";

export const pushTargetStates = [
  "queued",
  "sending",
  "awaiting_report",
  "applied",
  "failed",
  "superseded",
  "cancelled",
] as const;
export type PushTargetState = (typeof pushTargetStates)[number];

/** One push: a set of zone revisions sent to their devices. */
export const pushes = pgTable(
  "pushes",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    createdBy: text().references(() => user.id, { onDelete: "set null" }),
    scopeKind: text().$type<"zone" | "home" | "selection" | "template" | "rollback" | "household">().notNull(),
    scopeLabel: text().notNull(),
    status: text().$type<"running" | "finished" | "cancelled">().notNull().default("running"),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp({ withTimezone: true }),
  },
  (t) => [index("pushes_org_created_idx").on(t.organizationId, t.createdAt)],
);

/** One zone revision to one device, moving queued → … → applied | failed. */
export const pushTargets = pgTable(
  "push_targets",
  {
    id: uuid().primaryKey().defaultRandom(),
    pushId: uuid()
      .notNull()
      .references(() => pushes.id, { onDelete: "cascade" }),
    zoneId: uuid()
      .notNull()
      .references(() => zones.id, { onDelete: "restrict" }),
    deviceId: uuid()
      .notNull()
      .references(() => devices.id, { onDelete: "restrict" }),
    revisionId: uuid()
      .notNull()
      .references(() => zoneRevisions.id, { onDelete: "restrict" }),
    /** zone revision + device: the fleet never applies the same one twice. */
    idempotencyKey: text().notNull(),
    state: text().$type<PushTargetState>().notNull().default("queued"),
    attempts: integer().notNull().default(0),
    desiredVersion: integer(),
    lastError: text(),
    sentAt: timestamp({ withTimezone: true }),
    appliedAt: timestamp({ withTimezone: true }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("push_targets_push_idx").on(t.pushId, t.state),
    index("push_targets_device_idx").on(t.deviceId, t.state),
    uniqueIndex("push_targets_push_key_idx").on(t.pushId, t.idempotencyKey),
  ],
);

/** Who did what, when, to which home or zone, field by field. */
export const auditEvents = pgTable(
  "audit_events",
  {
    id: bigserial({ mode: "number" }).primaryKey(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    homeId: uuid().references(() => homes.id, { onDelete: "set null" }),
    zoneId: uuid(),
    actorUserId: text().references(() => user.id, { onDelete: "set null" }),
    actorName: text().notNull(),
    actorRole: text().notNull(),
    kind: text().notNull(),
    summary: text().notNull(),
    changes: jsonb().$type<{ field: string; before: unknown; after: unknown }[]>().notNull().default([]),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("audit_events_org_created_idx").on(t.organizationId, t.createdAt),
    index("audit_events_home_created_idx").on(t.homeId, t.createdAt),
    index("audit_events_zone_created_idx").on(t.zoneId, t.createdAt),
    index("audit_events_actor_created_idx").on(t.organizationId, t.actorUserId, t.createdAt),
  ],
);

export const pushesRelations = relations(pushes, ({ many, one }) => ({
  targets: many(pushTargets),
  creator: one(user, { fields: [pushes.createdBy], references: [user.id] }),
}));

export const pushTargetsRelations = relations(pushTargets, ({ one }) => ({
  push: one(pushes, { fields: [pushTargets.pushId], references: [pushes.id] }),
  zone: one(zones, { fields: [pushTargets.zoneId], references: [zones.id] }),
  device: one(devices, { fields: [pushTargets.deviceId], references: [devices.id] }),
  revision: one(zoneRevisions, { fields: [pushTargets.revisionId], references: [zoneRevisions.id] }),
}));

export type Push = typeof pushes.$inferSelect;
export type PushTarget = typeof pushTargets.$inferSelect;
export type AuditEvent = typeof auditEvents.$inferSelect;
export type NewAuditEvent = typeof auditEvents.$inferInsert;

/** Fleet webhook events already handled (duplicates are acknowledged, not re-applied). */
export const fleetEvents = pgTable(
  "fleet_events",
  {
    eventId: text().primaryKey(),
    fleetDeviceId: text().notNull(),
    kind: text().notNull(),
    payload: jsonb().$type<Record<string, unknown>>().notNull(),
    receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("fleet_events_device_idx").on(t.fleetDeviceId, t.receivedAt)],
);

/** A scheduled firmware update for one device, moving through the push states. */
export const firmwareUpdates = pgTable(
  "firmware_updates",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    deviceId: uuid()
      .notNull()
      .references(() => devices.id, { onDelete: "cascade" }),
    targetVersion: text().notNull(),
    windowStart: timestamp({ withTimezone: true }).notNull(),
    windowEnd: timestamp({ withTimezone: true }).notNull(),
    state: text().$type<PushTargetState>().notNull().default("queued"),
    fleetUpdateId: text(),
    attempts: integer().notNull().default(0),
    lastError: text(),
    createdBy: text().references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("firmware_updates_device_idx").on(t.deviceId, t.state)],
);

export type FleetEvent = typeof fleetEvents.$inferSelect;
export type FirmwareUpdate = typeof firmwareUpdates.$inferSelect;
