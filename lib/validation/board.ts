import { z } from "zod";
import { sourceKinds } from "@/lib/devices/model-profiles";
import { deviceSettingsSchema } from "@/lib/validation/zone-config";

// The zone board's schemas, shared by its dialogs (client) and its route
// handlers (server): what a form accepts is exactly what the server accepts.
// Every write names the zone version it was based on (compare-and-set).

export const LOUDNESS_OFFSET = { minDb: -24, maxDb: 12, stepDb: 0.5 } as const;

export const loudnessOffsetSchema = z
  .number({ error: "Enter the offset in dB, e.g. -2.5." })
  .min(LOUDNESS_OFFSET.minDb, `The offset must be at least ${LOUDNESS_OFFSET.minDb} dB.`)
  .max(LOUDNESS_OFFSET.maxDb, `The offset must be at most +${LOUDNESS_OFFSET.maxDb} dB.`)
  .refine((v) => Number.isInteger(v / LOUDNESS_OFFSET.stepDb), `Use steps of ${LOUDNESS_OFFSET.stepDb} dB (e.g. -2.5 or +1).`);

const toneCurveIdSchema = z.uuid("Choose a tone curve from the library.").nullable();

export const versionSchema = z
  .number({ error: "The zone version this edit is based on is missing." })
  .int()
  .min(1, "The zone version this edit is based on is missing.");

// ── sources ────────────────────────────────────────────────────────────────
export const sourceFormSchema = z.object({
  label: z.string().trim().min(1, "Give the source a label.").max(40, "Keep the label to 40 characters."),
  kind: z.enum(sourceKinds, { error: "Choose what kind of input this is." }),
  enabled: z.boolean(),
  loudnessOffsetDb: loudnessOffsetSchema,
  toneCurveId: toneCurveIdSchema,
  subsonic: z.boolean(),
});
export type SourceForm = z.infer<typeof sourceFormSchema>;

export const sourceCreateSchema = sourceFormSchema.extend({ version: versionSchema });
export const sourceUpdateSchema = sourceFormSchema.partial().extend({ version: versionSchema });

// ── stream presets ─────────────────────────────────────────────────────────
export const streamUrlSchema = z
  .string()
  .trim()
  .max(2000, "That stream URL is too long.")
  .pipe(z.url({ protocol: /^https?$/, error: "Enter a stream URL that starts with http:// or https://." }));

export const presetFormSchema = z.object({
  name: z.string().trim().min(1, "Give the preset a name.").max(60, "Keep the name to 60 characters."),
  streamUrl: streamUrlSchema,
  genre: z.string().trim().max(40, "Keep the genre to 40 characters.").nullable(),
  loudnessOffsetDb: loudnessOffsetSchema,
  toneCurveId: toneCurveIdSchema,
});
export type PresetForm = z.infer<typeof presetFormSchema>;

export const presetCreateSchema = presetFormSchema.extend({
  version: versionSchema,
  /** Set when the preset was chosen from the station directory. */
  directoryId: z.string().trim().min(1).max(100).nullable().optional(),
});
export const presetUpdateSchema = presetFormSchema.partial().extend({ version: versionSchema });

export const reorderSchema = z.object({
  version: versionSchema,
  ids: z.array(z.uuid()).min(1).max(200),
});

export const transferPresetSchema = z.object({
  /** Version of the zone the preset comes from. */
  version: versionSchema,
  targetZoneId: z.uuid("Choose the zone to move or copy to."),
  targetVersion: versionSchema,
  mode: z.enum(["move", "copy"]),
});

export const attachCurveSchema = z.object({
  version: versionSchema,
  /** A source or preset card, or the zone itself (its zone curve). */
  target: z.discriminatedUnion("type", [
    z.object({ type: z.enum(["source", "preset"]), id: z.uuid() }),
    z.object({ type: z.literal("zone") }),
  ]),
  toneCurveId: toneCurveIdSchema,
});

// ── zone settings ──────────────────────────────────────────────────────────
export const guestControlFlagsSchema = z.object({
  volume: z.boolean(),
  source: z.boolean(),
  wake: z.boolean(),
});
export type GuestControlFlags = z.infer<typeof guestControlFlagsSchema>;

const zoneSettingsShape = z.object({
  name: z.string().trim().min(1, "Give the zone a name.").max(60, "Keep the name to 60 characters."),
  volumeCeiling: z
    .number({ error: "Enter the ceiling in percent." })
    .int("Use whole percent.")
    .min(5, "A ceiling below 5 % would make the zone inaudible.")
    .max(100, "The ceiling is at most 100 %."),
  turnOnVolume: z
    .number({ error: "Enter the turn-on volume in percent." })
    .int("Use whole percent.")
    .min(0, "The turn-on volume is at least 0 %.")
    .max(100, "The turn-on volume is at most 100 %."),
  guestControls: guestControlFlagsSchema,
  deviceSettings: deviceSettingsSchema.extend({
    standbyMinutes: z
      .number({ error: "Enter minutes." })
      .int("Use whole minutes.")
      .min(0, "0 means never; otherwise up to 240 minutes.")
      .max(240, "Standby after at most 240 minutes."),
    displayBrightness: z
      .number({ error: "Enter the brightness in percent." })
      .int("Use whole percent.")
      .min(0, "Brightness is 0–100 %.")
      .max(100, "Brightness is 0–100 %."),
  }),
});

function turnOnBelowCeiling(value: { volumeCeiling: number; turnOnVolume: number }, ctx: z.RefinementCtx) {
  if (value.turnOnVolume > value.volumeCeiling) {
    ctx.addIssue({
      code: "custom",
      path: ["turnOnVolume"],
      message: `The turn-on volume cannot be above the ceiling (${value.volumeCeiling} %).`,
    });
  }
}

export const zoneSettingsSchema = zoneSettingsShape.superRefine(turnOnBelowCeiling);
export type ZoneSettings = z.infer<typeof zoneSettingsSchema>;

/** Any subset of the settings; the server merges it with the zone and checks the whole with zoneSettingsSchema. */
export const zoneSettingsPatchSchema = zoneSettingsShape.partial().extend({ version: versionSchema });

// ── guest-control lock ─────────────────────────────────────────────────────
const reasonSchema = z
  .string({ error: "Say why." })
  .trim()
  .min(5, "Say why in a few words (at least 5 characters).")
  .max(300, "Keep the reason to 300 characters.");

export const guestLockSchema = z.object({
  version: versionSchema,
  reason: reasonSchema,
  /** Optionally set the guest controls as part of the lock (a support fix). */
  guestControls: guestControlFlagsSchema.optional(),
});

export const guestUnlockSchema = z.object({
  version: versionSchema,
  reason: reasonSchema,
});

// ── params and queries ─────────────────────────────────────────────────────
export const zoneParamsSchema = z.object({ zoneId: z.uuid("That is not a valid zone id.") });
export const sourceParamsSchema = zoneParamsSchema.extend({ sourceId: z.uuid("That is not a valid source id.") });
export const presetParamsSchema = zoneParamsSchema.extend({ presetId: z.uuid("That is not a valid preset id.") });
export const versionQuerySchema = z.object({
  version: z.coerce.number({ error: "Add ?version= (the zone version this edit is based on)." }).int().min(1),
});

export const stationSearchSchema = z
  .object({
    q: z.string().trim().max(100, "Search with at most 100 characters.").optional().default(""),
    genre: z.string().trim().max(40, "A genre has at most 40 characters.").optional().default(""),
  })
  .refine((v) => v.q.length > 0 || v.genre.length > 0, { message: "Type part of a station name or a genre.", path: ["q"] });
export type StationSearch = z.infer<typeof stationSearchSchema>;

export function boardUrl(homeId: string) {
  return `/api/homes/${homeId}/board`;
}
