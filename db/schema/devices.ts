import { relations } from "drizzle-orm";
import { boolean, index, integer, jsonb, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import type { SourceKind } from "@/lib/devices/model-profiles";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { organization } from "./auth";
import { homes } from "./homes";

/** What a kind of device can take: preset slots, EQ bands, inputs, outputs. */
export const modelProfiles = pgTable("model_profiles", {
  id: text().primaryKey(),
  name: text().notNull(),
  presetSlots: integer().notNull(),
  eqBands: integer().notNull(),
  inputs: jsonb().$type<SourceKind[]>().notNull(),
  subwooferOutputs: integer().notNull().default(0),
  hasLineOut: boolean().notNull().default(false),
  latestFirmware: text().notNull(),
  createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

/** A networked amplifier or streamer, known to the fleet API by fleetDeviceId. */
export const devices = pgTable(
  "devices",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    homeId: uuid().references(() => homes.id, { onDelete: "set null" }),
    modelProfileId: text()
      .notNull()
      .references(() => modelProfiles.id),
    fleetDeviceId: text().notNull().unique(),
    serial: text().notNull(),
    firmwareVersion: text().notNull(),
    online: boolean().notNull().default(true),
    lastReportAt: timestamp({ withTimezone: true }),
    reportedVersion: integer().notNull().default(0),
    desiredVersion: integer().notNull().default(0),
    reportedConfig: jsonb().$type<ZoneConfig | null>(),
    reportedStatus: text(),
    reportedError: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("devices_org_idx").on(t.organizationId), index("devices_home_idx").on(t.homeId)],
);

export const devicesRelations = relations(devices, ({ one }) => ({
  modelProfile: one(modelProfiles, { fields: [devices.modelProfileId], references: [modelProfiles.id] }),
  home: one(homes, { fields: [devices.homeId], references: [homes.id] }),
}));

export type Device = typeof devices.$inferSelect;
export type ModelProfileRow = typeof modelProfiles.$inferSelect;
