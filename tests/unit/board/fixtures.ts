import type { BoardCurveDto, BoardDto, ZoneColumnDto } from "@/lib/board/types";

// Invented board data for the dialog and rule tests (shapes as GET /api/homes/:id/board answers).

export const curves: BoardCurveDto[] = [
  {
    id: "7f1c9a52-0b51-4a9e-9a53-2f7a1a0c0001",
    name: "Gentle lift",
    description: "A 4 dB low shelf.",
    bands: [{ type: "lowshelf", frequencyHz: 120, gainDb: 4, q: 0.707, enabled: true }],
  },
  {
    id: "7f1c9a52-0b51-4a9e-9a53-2f7a1a0c0002",
    name: "Treble trim",
    description: "A cut only.",
    bands: [
      { type: "highshelf", frequencyHz: 6000, gainDb: -3, q: 0.707, enabled: true },
      { type: "peaking", frequencyHz: 2500, gainDb: -2, q: 1.4, enabled: true },
    ],
  },
];

export function zone(overrides: Partial<ZoneColumnDto> = {}): ZoneColumnDto {
  return {
    id: "5d2e8a10-1111-4a00-8000-000000000001",
    name: "Sunroom",
    position: 0,
    version: 3,
    volumeCeiling: 70,
    turnOnVolume: 25,
    toneCurveId: null,
    guest: { volume: true, source: true, wake: false, locked: false, lockedAt: null, lockedByName: null, lockReason: null },
    deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
    device: {
      id: "5d2e8a10-2222-4a00-8000-000000000001",
      serial: "TST-0001",
      firmwareVersion: "1.0.0",
      online: true,
      lastReportAt: null,
      profile: { id: "amp-2x60", name: "Streaming amplifier, 2 × 60 W", presetSlots: 3, eqBands: 3, inputs: ["analog", "optical", "network_stream", "bluetooth"] },
    },
    presetSlots: 3,
    eqBands: 3,
    sources: [
      { id: "5d2e8a10-3333-4a00-8000-000000000001", label: "Turntable", kind: "analog", enabled: true, loudnessOffsetDb: 2, subsonic: true, toneCurveId: null, truePeakDbtp: null },
    ],
    presets: [
      { id: "5d2e8a10-4444-4a00-8000-000000000001", name: "Morning Fog Radio", streamUrl: "https://stream.example.net/fog", genre: "ambient", directoryId: null, loudnessOffsetDb: 0, toneCurveId: null, truePeakDbtp: null },
    ],
    ...overrides,
  };
}

export function board(overrides: Partial<BoardDto> = {}, zones: ZoneColumnDto[] = [zone()]): BoardDto {
  return {
    home: { id: "5d2e8a10-0000-4a00-8000-000000000001", name: "Test house", householdName: "Test household", city: "Nowhere", servicePlan: "standard" },
    actor: { name: "Ines Integrator", role: "integrator" },
    may: { editZone: true, editGuest: true, lock: true, unlock: true, reorderPresets: true },
    curves,
    zones,
    ...overrides,
  };
}
