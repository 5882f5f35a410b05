import { z } from "zod";
import { homeInputSchema } from "@/lib/validation/homes";
import {
  configCurveSchema,
  configPresetSchema,
  configSourceSchema,
  deviceSettingsSchema,
  guestControlsSchema,
  outputLayoutSchema,
  zoneConfigSchema,
} from "@/lib/validation/zone-config";

export const templateIdParamsSchema = z.object({ templateId: z.uuid("That is not a valid template id.") });
export const templateZoneParamsSchema = templateIdParamsSchema.extend({ zoneId: z.uuid("That is not a valid zone id.") });

const name = z.string().trim().min(2, "Give the template a name of at least 2 characters.").max(80, "Keep the name under 80 characters.");
const description = z.string().trim().max(500, "Keep the description under 500 characters.");

/** A template's configuration, stricter than a stored ZoneConfig: what an editor may save. */
export const templateConfigSchema = zoneConfigSchema
  .extend({
    name: z.string().trim().max(80),
    guestControls: guestControlsSchema,
    deviceSettings: deviceSettingsSchema,
    zoneCurve: configCurveSchema.nullable(),
    sources: z
      .array(
        configSourceSchema.extend({
          key: z.string().min(1).max(80),
          label: z.string().trim().min(1, "Name every source.").max(40, "Keep source names under 40 characters."),
        }),
      )
      .max(12, "A zone has at most 12 sources."),
    presets: z
      .array(
        configPresetSchema.extend({
          key: z.string().min(1).max(80),
          name: z.string().trim().min(1, "Name every station.").max(80),
          streamUrl: z.url({ protocol: /^https?$/, message: "A station needs an http(s) stream address." }).max(500),
          genre: z.string().trim().max(40).nullable(),
        }),
      )
      .max(40, "A zone has at most 40 stations."),
    outputLayout: outputLayoutSchema,
  })
  .superRefine((c, ctx) => {
    if (c.turnOnVolume > c.volumeCeiling) {
      ctx.addIssue({ code: "custom", path: ["turnOnVolume"], message: "The turn-on volume must not be above the volume ceiling." });
    }
    const urls = new Set<string>();
    c.presets.forEach((p, i) => {
      if (urls.has(p.streamUrl)) ctx.addIssue({ code: "custom", path: ["presets", i, "streamUrl"], message: "That station is already in the list." });
      urls.add(p.streamUrl);
    });
    const outputIds = new Set<string>();
    c.outputLayout.outputs.forEach((o, i) => {
      if (outputIds.has(o.id)) ctx.addIssue({ code: "custom", path: ["outputLayout", "outputs", i, "id"], message: "Each output needs its own id." });
      outputIds.add(o.id);
    });
    const keys = new Set<string>();
    c.sources.forEach((s, i) => {
      if (keys.has(s.key)) ctx.addIssue({ code: "custom", path: ["sources", i, "key"], message: "Duplicate source key." });
      keys.add(s.key);
    });
  });

export const createTemplateSchema = z.object({
  zoneId: z.uuid("Choose the zone to save as a template."),
  name,
  description: description.default(""),
});
export type CreateTemplateInput = z.infer<typeof createTemplateSchema>;

export const updateTemplateSchema = z
  .object({
    version: z.number().int().min(1),
    name: name.optional(),
    description: description.optional(),
    config: templateConfigSchema.optional(),
  })
  .refine((v) => v.name !== undefined || v.description !== undefined || v.config !== undefined, {
    message: "Nothing to change.",
    path: ["_"],
  });
export type UpdateTemplateInput = z.infer<typeof updateTemplateSchema>;

export const duplicateTemplateSchema = z.object({ name, description: description.optional() });

export const applyTemplateSchema = z
  .object({
    zoneName: z.string().trim().min(2, "Name the zone (at least 2 characters).").max(60, "Keep the zone name under 60 characters."),
    deviceId: z.uuid("Choose the device that drives this zone."),
    homeId: z.uuid("Choose a home.").optional(),
    newHome: homeInputSchema.optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.homeId === undefined) === (v.newHome === undefined)) {
      ctx.addIssue({ code: "custom", path: ["homeId"], message: "Choose an existing home or describe a new one." });
    }
  });
export type ApplyTemplateInput = z.infer<typeof applyTemplateSchema>;

export const templateTargetsQuerySchema = z.object({ homeId: z.uuid().optional() });

export const bulkUpdateSchema = z.object({
  /** The template version the preview was made from; a newer one means preview again. */
  templateVersion: z.number().int().min(1),
  zones: z
    .array(z.object({ zoneId: z.uuid(), version: z.number().int().min(1) }))
    .min(1, "Choose at least one zone.")
    .max(500, "Update at most 500 zones at a time."),
});
export type BulkUpdateInput = z.infer<typeof bulkUpdateSchema>;

/** An override path: a known top-level field, optionally narrowed. */
export const overridePathSchema = z
  .string()
  .max(600)
  .regex(
    /^(volumeCeiling|turnOnVolume|guestControls(\.(volume|source|wake))?|deviceSettings(\.[a-zA-Z0-9]+)?|zoneCurve|outputLayout(\.(crossover|outputs))?|sources(\.order|\[[^\]]+\](\.[a-zA-Z]+)?)?|presets(\.order|\[[^\]]+\](\.[a-zA-Z]+)?)?)$/,
    "That is not a field of a zone.",
  );

export const setOverridesSchema = z.object({
  version: z.number().int().min(1),
  overrides: z.array(overridePathSchema).max(200),
});

export const zoneChoicesQuerySchema = z.object({ homeId: z.uuid("Choose a home.") });
