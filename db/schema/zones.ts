import { relations } from "drizzle-orm";
import {
  boolean,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgTable,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import type { SourceKind } from "@/lib/devices/model-profiles";
import type { DeviceSettings, OutputLayout, ZoneConfig } from "@/lib/validation/zone-config";
import { organization, user } from "./auth";
import { devices } from "./devices";
import { homes } from "./homes";
import { toneCurves, zoneTemplates } from "./library";

/** A listening area of a home, driven by one device. */
export const zones = pgTable(
  "zones",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    homeId: uuid()
      .notNull()
      .references(() => homes.id, { onDelete: "cascade" }),
    deviceId: uuid().references(() => devices.id, { onDelete: "set null" }),
    name: text().notNull(),
    position: integer().notNull().default(0),
    volumeCeiling: integer().notNull().default(70),
    turnOnVolume: integer().notNull().default(25),
    guestVolume: boolean().notNull().default(true),
    guestSource: boolean().notNull().default(true),
    guestWake: boolean().notNull().default(true),
    guestLocked: boolean().notNull().default(false),
    lockedBy: text().references(() => user.id, { onDelete: "set null" }),
    lockedAt: timestamp({ withTimezone: true }),
    lockReason: text(),
    toneCurveId: uuid().references(() => toneCurves.id, { onDelete: "restrict" }),
    deviceSettings: jsonb().$type<DeviceSettings>().notNull(),
    outputLayout: jsonb().$type<OutputLayout>().notNull(),
    templateId: uuid().references(() => zoneTemplates.id, { onDelete: "set null" }),
    templateVersion: integer(),
    /** Fields this zone sets itself, kept when its template is updated. */
    overrides: jsonb().$type<string[]>().notNull().default([]),
    currentRevisionId: uuid(),
    /** Compare-and-set counter: every write names the version it was based on. */
    version: integer().notNull().default(1),
    deletedAt: timestamp({ withTimezone: true }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("zones_home_idx").on(t.homeId, t.position),
    index("zones_org_idx").on(t.organizationId),
    index("zones_template_idx").on(t.templateId),
    uniqueIndex("zones_device_idx").on(t.deviceId),
  ],
);

/** An input of a zone as the household sees it. */
export const sources = pgTable(
  "sources",
  {
    id: uuid().primaryKey().defaultRandom(),
    zoneId: uuid()
      .notNull()
      .references(() => zones.id, { onDelete: "cascade" }),
    position: integer().notNull(),
    label: text().notNull(),
    kind: text().$type<SourceKind>().notNull(),
    enabled: boolean().notNull().default(true),
    loudnessOffsetDb: doublePrecision().notNull().default(0),
    subsonic: boolean().notNull().default(false),
    toneCurveId: uuid().references(() => toneCurves.id, { onDelete: "restrict" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("sources_zone_idx").on(t.zoneId, t.position)],
);

/** A favourite internet station of the household, in order. */
export const streamPresets = pgTable(
  "stream_presets",
  {
    id: uuid().primaryKey().defaultRandom(),
    zoneId: uuid()
      .notNull()
      .references(() => zones.id, { onDelete: "cascade" }),
    position: integer().notNull(),
    name: text().notNull(),
    streamUrl: text().notNull(),
    genre: text(),
    directoryId: text(),
    loudnessOffsetDb: doublePrecision().notNull().default(0),
    toneCurveId: uuid().references(() => toneCurves.id, { onDelete: "restrict" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("stream_presets_zone_idx").on(t.zoneId, t.position)],
);

/** Immutable snapshot of a zone's whole desired configuration. */
export const zoneRevisions = pgTable(
  "zone_revisions",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    // No cascade: a deleted zone keeps its history.
    zoneId: uuid()
      .notNull()
      .references(() => zones.id, { onDelete: "restrict" }),
    number: integer().notNull(),
    contentHash: text().notNull(),
    config: jsonb().$type<ZoneConfig>().notNull(),
    authorId: text().references(() => user.id, { onDelete: "set null" }),
    message: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("zone_revisions_zone_number_idx").on(t.zoneId, t.number),
    index("zone_revisions_zone_hash_idx").on(t.zoneId, t.contentHash),
  ],
);

export const zonesRelations = relations(zones, ({ one, many }) => ({
  home: one(homes, { fields: [zones.homeId], references: [homes.id] }),
  device: one(devices, { fields: [zones.deviceId], references: [devices.id] }),
  toneCurve: one(toneCurves, { fields: [zones.toneCurveId], references: [toneCurves.id] }),
  template: one(zoneTemplates, { fields: [zones.templateId], references: [zoneTemplates.id] }),
  sources: many(sources),
  presets: many(streamPresets),
  revisions: many(zoneRevisions),
}));

export const sourcesRelations = relations(sources, ({ one }) => ({
  zone: one(zones, { fields: [sources.zoneId], references: [zones.id] }),
  toneCurve: one(toneCurves, { fields: [sources.toneCurveId], references: [toneCurves.id] }),
}));

export const streamPresetsRelations = relations(streamPresets, ({ one }) => ({
  zone: one(zones, { fields: [streamPresets.zoneId], references: [zones.id] }),
  toneCurve: one(toneCurves, { fields: [streamPresets.toneCurveId], references: [toneCurves.id] }),
}));

export const zoneRevisionsRelations = relations(zoneRevisions, ({ one }) => ({
  zone: one(zones, { fields: [zoneRevisions.zoneId], references: [zones.id] }),
  author: one(user, { fields: [zoneRevisions.authorId], references: [user.id] }),
}));

export type Zone = typeof zones.$inferSelect;
export type NewZone = typeof zones.$inferInsert;
export type Source = typeof sources.$inferSelect;
export type StreamPreset = typeof streamPresets.$inferSelect;
export type ZoneRevision = typeof zoneRevisions.$inferSelect;
