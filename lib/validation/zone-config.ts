import { z } from "zod";
import { sourceKinds } from "@/lib/devices/model-profiles";

// The whole desired configuration of one zone, as stored in a revision and sent
// to a device through the fleet API. Tone curves are resolved to their band
// values so a revision stays meaningful after the library curve changes.

export const bandTypes = ["peaking", "lowshelf", "highshelf", "highpass", "lowpass", "notch"] as const;

export const configBandSchema = z.object({
  type: z.enum(bandTypes),
  frequencyHz: z.number().min(10).max(24000),
  gainDb: z.number().min(-24).max(12),
  q: z.number().min(0.1).max(20),
  enabled: z.boolean().default(true),
});

export const configCurveSchema = z.object({
  id: z.string().nullable(),
  name: z.string(),
  bands: z.array(configBandSchema).max(32),
});

export const guestControlsSchema = z.object({
  volume: z.boolean(),
  source: z.boolean(),
  wake: z.boolean(),
  locked: z.boolean(),
});

export const deviceSettingsSchema = z.object({
  standbyMinutes: z.number().int().min(0).max(240),
  displayBrightness: z.number().int().min(0).max(100),
  cecPower: z.boolean(),
  cecVolume: z.boolean(),
  trigger12v: z.boolean(),
});

export const outputRoles = ["main_left", "main_right", "subwoofer", "line_out"] as const;

export const outputSchema = z.object({
  id: z.string().min(1).max(40),
  role: z.enum(outputRoles),
  label: z.string().min(1).max(60),
  distance: z.object({ value: z.number().min(0).max(3000), unit: z.enum(["m", "cm", "in"]) }),
  latencyMs: z.number().min(0).max(100),
  trimDb: z.number().min(-24).max(12),
  polarityInverted: z.boolean().default(false),
});

export const outputLayoutSchema = z.object({
  crossover: z
    .object({
      type: z.enum(["butterworth", "linkwitz_riley"]),
      slopeDbPerOctave: z.union([z.literal(12), z.literal(24), z.literal(48)]),
      frequencyHz: z.number().min(40).max(250),
    })
    .nullable(),
  outputs: z.array(outputSchema).max(6),
});

export const configSourceSchema = z.object({
  key: z.string(),
  label: z.string(),
  kind: z.enum(sourceKinds),
  enabled: z.boolean(),
  loudnessOffsetDb: z.number().min(-24).max(12),
  subsonic: z.boolean(),
  toneCurve: configCurveSchema.nullable(),
});

export const configPresetSchema = z.object({
  key: z.string(),
  name: z.string(),
  streamUrl: z.string(),
  genre: z.string().nullable(),
  loudnessOffsetDb: z.number().min(-24).max(12),
  toneCurve: configCurveSchema.nullable(),
});

export const zoneConfigSchema = z.object({
  schema: z.literal(1),
  name: z.string(),
  volumeCeiling: z.number().int().min(0).max(100),
  turnOnVolume: z.number().int().min(0).max(100),
  guestControls: guestControlsSchema,
  deviceSettings: deviceSettingsSchema,
  zoneCurve: configCurveSchema.nullable(),
  sources: z.array(configSourceSchema),
  presets: z.array(configPresetSchema),
  outputLayout: outputLayoutSchema,
});

export type ZoneConfig = z.infer<typeof zoneConfigSchema>;
export type ConfigBand = z.infer<typeof configBandSchema>;
export type DeviceSettings = z.infer<typeof deviceSettingsSchema>;
export type OutputLayout = z.infer<typeof outputLayoutSchema>;
export type GuestControls = z.infer<typeof guestControlsSchema>;

export const defaultDeviceSettings: DeviceSettings = {
  standbyMinutes: 20,
  displayBrightness: 60,
  cecPower: false,
  cecVolume: false,
  trigger12v: false,
};

export const defaultOutputLayout: OutputLayout = { crossover: null, outputs: [] };
