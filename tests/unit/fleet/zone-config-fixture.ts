import { zoneConfigSchema, type ZoneConfig } from "@/lib/validation/zone-config";

// A realistic zone config for a two-channel amplifier zone, built through the real
// schema so the fixture cannot drift from what the app pushes.
export function zoneConfig(overrides: Partial<ZoneConfig> = {}, presetCount = 3): ZoneConfig {
  return zoneConfigSchema.parse({
    schema: 1,
    name: "Family room",
    volumeCeiling: 70,
    turnOnVolume: 25,
    guestControls: { volume: true, source: true, wake: true, locked: false },
    deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
    zoneCurve: {
      id: null,
      name: "Bright room tame",
      bands: [{ type: "highshelf", frequencyHz: 6000, gainDb: -2.5, q: 0.7 }],
    },
    sources: [
      { key: "tv", label: "TV", kind: "optical", enabled: true, loudnessOffsetDb: -3, subsonic: false, toneCurve: null },
      { key: "turntable", label: "Turntable", kind: "analog", enabled: true, loudnessOffsetDb: 2.5, subsonic: true, toneCurve: null },
    ],
    presets: Array.from({ length: presetCount }, (_, i) => ({
      key: `p${i + 1}`,
      name: `Preset ${i + 1}`,
      streamUrl: `https://streams.example.net/live/preset-${i + 1}.mp3`,
      genre: "jazz",
      loudnessOffsetDb: 0,
      toneCurve: null,
    })),
    outputLayout: { crossover: null, outputs: [] },
    ...overrides,
  });
}
