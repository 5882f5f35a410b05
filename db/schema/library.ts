import { relations } from "drizzle-orm";
import { bigint, boolean, doublePrecision, index, integer, jsonb, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import type { ZoneConfig, bandTypes } from "@/lib/validation/zone-config";

type BandType = (typeof bandTypes)[number];
import { organization, user } from "./auth";

/**
 * One row per company: bumped by database triggers (drizzle/0002) whenever a
 * tone curve or band of its library changes (the board shows the library).
 */
export const libraryVersions = pgTable("library_versions", {
  organizationId: text()
    .primaryKey()
    .references(() => organization.id, { onDelete: "cascade" }),
  curves: bigint({ mode: "number" }).notNull().default(0),
});

/** A named parametric EQ from the company's library. */
export const toneCurves = pgTable(
  "tone_curves",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: text().notNull(),
    description: text().notNull().default(""),
    version: integer().notNull().default(1),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("tone_curves_org_idx").on(t.organizationId, t.name)],
);

/** One biquad band of a tone curve, in order. */
export const toneCurveBands = pgTable(
  "tone_curve_bands",
  {
    id: uuid().primaryKey().defaultRandom(),
    curveId: uuid()
      .notNull()
      .references(() => toneCurves.id, { onDelete: "cascade" }),
    position: integer().notNull(),
    type: text().$type<BandType>().notNull(),
    frequencyHz: doublePrecision().notNull(),
    gainDb: doublePrecision().notNull().default(0),
    q: doublePrecision().notNull().default(0.707),
    enabled: boolean().notNull().default(true),
  },
  (t) => [index("tone_curve_bands_curve_idx").on(t.curveId, t.position)],
);

/** A reusable zone configuration (no device) that new zones are made from. */
export const zoneTemplates = pgTable(
  "zone_templates",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: text().notNull(),
    description: text().notNull().default(""),
    config: jsonb().$type<ZoneConfig>().notNull(),
    version: integer().notNull().default(1),
    createdBy: text().references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("zone_templates_org_idx").on(t.organizationId, t.name)],
);

export const toneCurvesRelations = relations(toneCurves, ({ many }) => ({
  bands: many(toneCurveBands),
}));

export const toneCurveBandsRelations = relations(toneCurveBands, ({ one }) => ({
  curve: one(toneCurves, { fields: [toneCurveBands.curveId], references: [toneCurves.id] }),
}));

export type ToneCurve = typeof toneCurves.$inferSelect;
export type ToneCurveBand = typeof toneCurveBands.$inferSelect;
export type ZoneTemplate = typeof zoneTemplates.$inferSelect;
