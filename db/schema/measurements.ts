import { doublePrecision, index, integer, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { organization, user } from "./auth";
import { sources, streamPresets, zones } from "./zones";

/** A measured level-match clip of one source or stream preset of a zone. */
export const levelMatchClips = pgTable(
  "level_match_clips",
  {
    id: uuid().primaryKey().defaultRandom(),
    organizationId: text()
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    zoneId: uuid()
      .notNull()
      .references(() => zones.id, { onDelete: "cascade" }),
    sourceId: uuid().references(() => sources.id, { onDelete: "cascade" }),
    presetId: uuid().references(() => streamPresets.id, { onDelete: "cascade" }),
    fileName: text().notNull(),
    sampleRate: integer().notNull(),
    channelCount: integer().notNull(),
    durationSeconds: doublePrecision().notNull(),
    integratedLufs: doublePrecision(),
    loudnessRangeLu: doublePrecision(),
    truePeakDbtp: doublePrecision(),
    samplePeakDbfs: doublePrecision(),
    uploadedBy: text().references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("level_match_clips_zone_idx").on(t.zoneId, t.createdAt)],
);

export type LevelMatchClip = typeof levelMatchClips.$inferSelect;
