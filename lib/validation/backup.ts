import { z } from "zod";
import { AppError, type FieldErrors } from "@/lib/errors";
import { servicePlans } from "@/lib/validation/homes";
import { configBandSchema, configCurveSchema, configPresetSchema, configSourceSchema, zoneConfigSchema } from "@/lib/validation/zone-config";
import { contentHash } from "@/lib/zones/content-hash";

// The home backup file: the whole desired configuration of one home as a
// versioned JSON document, its zod schema, the content hash that proves it was
// not changed after it was made, and the migrations from older schema versions.
//
// Schema versions:
//   1 (current)  { format, schemaVersion: 1, createdAt, createdBy?, contentHash,
//                  home, zones[{ id, position, device, template, overrides, revision, config }],
//                  curves[], templates[] }
//   0 (earliest) { format, schemaVersion: 0, exportedAt, home,
//                  zones[{ id, position, device, config }], curves[] } where each config has no
//                  `schema` field, `volume: { ceiling, turnOn }` instead of volumeCeiling /
//                  turnOnVolume, and `offsetDb` instead of loudnessOffsetDb on sources and presets;
//                  no templates and no content hash. Migrated to 1 on upload.

export const BACKUP_FORMAT = "zonewright-home-backup";
export const BACKUP_SCHEMA_VERSION = 1;
export const BACKUP_OLDEST_READABLE_VERSION = 0;
/** Uploads larger than this are refused before they are read. */
export const BACKUP_MAX_BYTES = 5 * 1024 * 1024;

const text = (max: number) => z.string().max(max, `Keep this under ${max} characters.`);

/** A zone configuration as a backup may carry it: the stored shape, with sizes bounded. */
export const backupZoneConfigSchema = zoneConfigSchema.extend({
  name: z.string().trim().min(1, "Every zone needs a name.").max(80, "Keep zone names under 80 characters."),
  sources: z
    .array(configSourceSchema.extend({ key: z.string().min(1).max(80), label: text(80), toneCurve: configCurveSchema.nullable() }))
    .max(32, "A zone has at most 32 sources."),
  presets: z
    .array(configPresetSchema.extend({ key: z.string().min(1).max(80), name: text(120), streamUrl: z.string().min(1).max(2000), genre: text(80).nullable() }))
    .max(100, "A zone has at most 100 stream presets."),
});

const hashSchema = z.string().regex(/^sha256:[0-9a-f]{64}$/, "A content hash looks like sha256: followed by 64 hex digits.");

export const backupZoneSchema = z.object({
  id: z.uuid("Each zone needs its id."),
  position: z.number().int().min(0).max(10_000),
  device: z.object({ fleetDeviceId: text(120), serial: text(120), modelProfileId: text(120) }).nullable(),
  template: z.object({ id: z.uuid(), version: z.number().int().min(1) }).nullable(),
  overrides: z.array(text(200)).max(500).default([]),
  revision: z.object({ number: z.number().int().min(1), contentHash: hashSchema }).nullable(),
  config: backupZoneConfigSchema,
});

export const backupCurveSchema = z.object({
  id: z.uuid(),
  name: z.string().trim().min(1).max(120),
  description: text(2000).default(""),
  bands: z.array(configBandSchema).max(32),
});

export const backupTemplateSchema = z.object({
  id: z.uuid(),
  name: z.string().trim().min(1).max(120),
  description: text(2000).default(""),
  version: z.number().int().min(1),
  config: backupZoneConfigSchema,
});

export const backupHomeSchema = z.object({
  id: z.uuid(),
  name: z.string().trim().min(2).max(80),
  householdName: z.string().trim().min(2).max(80),
  city: text(80).default(""),
  servicePlan: z.enum(servicePlans),
  notes: text(2000).default(""),
});

export const backupFileSchema = z
  .object({
    format: z.literal(BACKUP_FORMAT),
    schemaVersion: z.literal(BACKUP_SCHEMA_VERSION),
    createdAt: z.iso.datetime({ offset: true }),
    createdBy: z.object({ name: text(200), role: text(40) }).optional(),
    contentHash: hashSchema,
    home: backupHomeSchema,
    zones: z.array(backupZoneSchema).max(200, "A backup holds at most 200 zones."),
    curves: z.array(backupCurveSchema).max(2000),
    templates: z.array(backupTemplateSchema).max(500),
  })
  .superRefine((file, ctx) => {
    const seen = new Set<string>();
    file.zones.forEach((zone, i) => {
      if (seen.has(zone.id)) ctx.addIssue({ code: "custom", path: ["zones", i, "id"], message: "Two zones in the file have this id." });
      seen.add(zone.id);
      for (const list of ["sources", "presets"] as const) {
        const keys = zone.config[list].map((x) => x.key);
        keys.forEach((k, j) => {
          if (keys.indexOf(k) !== j) ctx.addIssue({ code: "custom", path: ["zones", i, "config", list, j, "key"], message: `Two ${list} of this zone share this key.` });
        });
      }
    });
  });

export type BackupFile = z.infer<typeof backupFileSchema>;
export type BackupZone = z.infer<typeof backupZoneSchema>;
export type BackupCurve = z.infer<typeof backupCurveSchema>;
export type BackupTemplate = z.infer<typeof backupTemplateSchema>;

/** What the content hash covers: everything but the envelope (format, time, author, the hash itself). */
export function backupContentHash(file: Pick<BackupFile, "schemaVersion" | "home" | "zones" | "curves" | "templates">): string {
  return contentHash({ schemaVersion: file.schemaVersion, home: file.home, zones: file.zones, curves: file.curves, templates: file.templates });
}

/** zod's issue path as people write it: zones[3].sources[1].loudnessOffsetDb. */
export function issuePath(path: readonly PropertyKey[]): string {
  let out = "";
  for (const p of path) {
    if (typeof p === "number") out += `[${p}]`;
    else out += out ? `.${String(p)}` : String(p);
  }
  return out || "(file)";
}

// ── migrations ──────────────────────────────────────────────────────────────

type Json = Record<string, unknown>;
const isObject = (v: unknown): v is Json => typeof v === "object" && v !== null && !Array.isArray(v);

function renameOffset(item: unknown): unknown {
  if (!isObject(item) || !("offsetDb" in item)) return item;
  const { offsetDb, ...rest } = item;
  return { ...rest, loudnessOffsetDb: offsetDb };
}

/** Schema 0 → 1 (see the header). Structural only; the result is validated as schema 1. */
export function migrateV0(file: Json): Json {
  const zones = file.zones;
  return {
    format: file.format,
    schemaVersion: 1,
    createdAt: file.exportedAt,
    home: file.home,
    zones: Array.isArray(zones)
      ? zones.map((zone) => {
          if (!isObject(zone)) return zone;
          const config = zone.config;
          let migrated: unknown = config;
          if (isObject(config)) {
            const { volume, ...rest } = config;
            const v = isObject(volume) ? volume : {};
            migrated = {
              schema: 1,
              ...rest,
              volumeCeiling: v.ceiling,
              turnOnVolume: v.turnOn,
              sources: Array.isArray(rest.sources) ? rest.sources.map(renameOffset) : rest.sources,
              presets: Array.isArray(rest.presets) ? rest.presets.map(renameOffset) : rest.presets,
            };
          }
          return { ...zone, template: null, overrides: [], revision: null, config: migrated };
        })
      : zones,
    curves: file.curves,
    templates: [],
  };
}

const migrations: Record<number, (file: Json) => Json> = { 0: migrateV0 };

export interface ParsedBackup {
  backup: BackupFile;
  /** The schema version the file was written in, when it had to be migrated. */
  migratedFrom: number | null;
}

function invalid(message: string, fieldErrors?: FieldErrors): never {
  throw new AppError("backup:invalid", { message, fieldErrors });
}

/**
 * Parse, migrate, validate and verify an uploaded backup. Any problem is an
 * AppError whose message says what is wrong and where; nothing is written.
 */
export function parseBackupText(raw: string): ParsedBackup {
  if (raw.trim() === "") invalid("The file is empty.");
  let json: unknown;
  try {
    json = JSON.parse(raw);
  } catch (error) {
    invalid(`The file is not valid JSON — it may be cut short or not a backup at all (${(error as Error).message}).`);
  }
  if (!isObject(json) || json.format !== BACKUP_FORMAT) {
    invalid(`This is not a Zonewright home backup: its “format” field should be “${BACKUP_FORMAT}”.`);
  }
  const version = json.schemaVersion;
  if (typeof version !== "number" || !Number.isInteger(version)) {
    throw new AppError("backup:unsupported-version", { message: "The file does not say which schema version it uses (“schemaVersion” must be a whole number)." });
  }
  if (version > BACKUP_SCHEMA_VERSION) {
    throw new AppError("backup:unsupported-version", {
      message: `This backup uses schema version ${version}, made by a newer Zonewright; this one reads versions ${BACKUP_OLDEST_READABLE_VERSION} to ${BACKUP_SCHEMA_VERSION}. Nothing was changed.`,
    });
  }
  if (version < BACKUP_OLDEST_READABLE_VERSION) {
    throw new AppError("backup:unsupported-version", {
      message: `Schema version ${version} does not exist; this Zonewright reads versions ${BACKUP_OLDEST_READABLE_VERSION} to ${BACKUP_SCHEMA_VERSION}. Nothing was changed.`,
    });
  }

  let current: Json = json;
  for (let v = version; v < BACKUP_SCHEMA_VERSION; v++) current = migrations[v](current);
  const migratedFrom = version < BACKUP_SCHEMA_VERSION ? version : null;
  if (migratedFrom !== null) {
    // Older files carry no hash; the migrated content gets one so the rest of the path is the same.
    current = { ...current, contentHash: "sha256:" + "0".repeat(64) };
  }

  const parsed = backupFileSchema.safeParse(current);
  if (!parsed.success) {
    const fieldErrors: FieldErrors = {};
    for (const issue of parsed.error.issues) (fieldErrors[issuePath(issue.path)] ??= []).push(issue.message);
    const paths = Object.keys(fieldErrors);
    const first = `${paths[0]}: ${fieldErrors[paths[0]][0]}`;
    const after = migratedFrom !== null ? ` (after migrating it from schema version ${migratedFrom})` : "";
    invalid(
      paths.length === 1
        ? `The backup has a problem${after} at ${first}.`
        : `The backup has ${paths.length} problems${after}; the first is at ${first}.`,
      fieldErrors,
    );
  }
  const backup = parsed.data;
  if (migratedFrom !== null) {
    backup.contentHash = backupContentHash(backup);
  } else if (backupContentHash(backup) !== backup.contentHash) {
    invalid("The file’s content does not match its content hash: it was changed or damaged after it was made. Download a fresh backup.");
  }
  return { backup, migratedFrom };
}
