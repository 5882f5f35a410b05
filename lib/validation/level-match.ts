import { z } from "zod";
import { LOUDNESS_OFFSET, loudnessOffsetSchema, versionSchema } from "@/lib/validation/board";

// Level matching of one zone: the clip upload's form fields, the choice of
// target, and the "apply suggestions" write. Offsets follow the board's rule
// (−24…+12 dB in 0.5 dB steps), so the suggestion rounding below matches it.

export const CLIP_LIMITS = {
  /** Whole upload, as lib/audio/decode.ts's default; 64 MiB holds about 6 minutes of 48 kHz stereo 24-bit. */
  maxBytes: 64 * 1024 * 1024,
  /** A level-match clip is a representative passage, not a whole programme. */
  maxSeconds: 300,
} as const;

export const TRIM = { minDb: LOUDNESS_OFFSET.minDb, maxDb: LOUDNESS_OFFSET.maxDb, stepDb: LOUDNESS_OFFSET.stepDb } as const;

/** A loudness target a person may type: quieter than −5 LUFS, louder than −50 LUFS. */
export const TARGET_LUFS = { min: -50, max: -5, default: -23 } as const;

export const clipTargetKinds = ["source", "preset"] as const;
export type ClipTargetKind = (typeof clipTargetKinds)[number];

/** The clip form's text fields: exactly one of sourceId / presetId. */
export const clipFieldsSchema = z
  .object({
    sourceId: z.uuid("That is not a valid source id.").optional(),
    presetId: z.uuid("That is not a valid stream preset id.").optional(),
  })
  .refine((v) => (v.sourceId === undefined) !== (v.presetId === undefined), {
    message: "Say which source or stream preset the clip belongs to (sourceId or presetId, not both).",
    path: ["sourceId"],
  });

export const levelMatchTargetSchema = z.union([
  z.object({ kind: z.literal("reference"), ref: z.object({ kind: z.enum(clipTargetKinds), id: z.uuid() }) }),
  z.object({
    kind: z.literal("lufs"),
    lufs: z
      .number({ error: "Enter the target loudness in LUFS, e.g. -23." })
      .min(TARGET_LUFS.min, `The target is at least ${TARGET_LUFS.min} LUFS.`)
      .max(TARGET_LUFS.max, `The target is at most ${TARGET_LUFS.max} LUFS.`),
  }),
]);
export type LevelMatchTargetChoice = z.infer<typeof levelMatchTargetSchema>;

export const levelMatchApplySchema = z.object({
  version: versionSchema,
  items: z
    .array(
      z.object({
        kind: z.enum(clipTargetKinds),
        id: z.uuid("That is not a valid source or stream preset id."),
        loudnessOffsetDb: loudnessOffsetSchema,
      }),
    )
    .min(1, "Choose at least one suggestion to apply.")
    .max(100, "At most 100 offsets at once.")
    .refine((items) => new Set(items.map((i) => `${i.kind}:${i.id}`)).size === items.length, "Each source or stream preset may appear once."),
});
export type LevelMatchApplyInput = z.infer<typeof levelMatchApplySchema>;

export const clipsListQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(200).optional().default(50),
});

export function levelMatchUrl(zoneId: string) {
  return `/api/zones/${zoneId}/level-match`;
}

export function clipsUrl(zoneId: string) {
  return `/api/zones/${zoneId}/clips`;
}

/** Key of a source or preset in suggestions and tables. */
export function targetKey(kind: ClipTargetKind, id: string) {
  return `${kind}:${id}`;
}
