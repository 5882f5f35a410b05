import type { BoardDto, PresetCardDto, SourceCardDto, ZoneColumnDto } from "@/lib/board/types";
import type { GuestControlFlags, PresetForm, SourceForm, ZoneSettings } from "@/lib/validation/board";

// What the board shows while a write is on its way: pure transforms of the
// last confirmed board. A refused write simply drops its transform (rollback).

function withZone(board: BoardDto, zoneId: string, change: (zone: ZoneColumnDto) => ZoneColumnDto): BoardDto {
  return { ...board, zones: board.zones.map((z) => (z.id === zoneId ? change(z) : z)) };
}

function byIds<T extends { id: string }>(items: T[], ids: string[]): T[] {
  const map = new Map(items.map((i) => [i.id, i]));
  const ordered = ids.map((id) => map.get(id)).filter((i): i is T => i !== undefined);
  return ordered.length === items.length ? ordered : items;
}

/** Replace the zones the server answered with, keep the rest. */
export function mergeZones(board: BoardDto, zones: ZoneColumnDto[]): BoardDto {
  const fresh = new Map(zones.map((z) => [z.id, z]));
  return { ...board, zones: board.zones.map((z) => fresh.get(z.id) ?? z) };
}

export const optimistic = {
  reorderSources: (zoneId: string, ids: string[]) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, sources: byIds(z.sources, ids) })),

  reorderPresets: (zoneId: string, ids: string[]) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, presets: byIds(z.presets, ids) })),

  transferPreset: (fromId: string, presetId: string, toId: string, mode: "move" | "copy") => (board: BoardDto) => {
    const preset = board.zones.find((z) => z.id === fromId)?.presets.find((p) => p.id === presetId);
    if (!preset) return board;
    const copy: PresetCardDto = { ...preset, id: `pending-${presetId}`, truePeakDbtp: null };
    let next = withZone(board, toId, (z) => ({ ...z, presets: [...z.presets, copy] }));
    if (mode === "move") next = withZone(next, fromId, (z) => ({ ...z, presets: z.presets.filter((p) => p.id !== presetId) }));
    return next;
  },

  attachCurve: (zoneId: string, target: { type: "source" | "preset"; id: string } | { type: "zone" }, toneCurveId: string | null) => (board: BoardDto) =>
    withZone(board, zoneId, (z) =>
      target.type === "zone"
        ? { ...z, toneCurveId }
        : target.type === "source"
        ? { ...z, sources: z.sources.map((s) => (s.id === target.id ? { ...s, toneCurveId } : s)) }
        : { ...z, presets: z.presets.map((p) => (p.id === target.id ? { ...p, toneCurveId } : p)) },
    ),

  updateSource: (zoneId: string, sourceId: string, input: Partial<SourceForm>) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, sources: z.sources.map((s) => (s.id === sourceId ? { ...s, ...input } : s)) })),

  addSource: (zoneId: string, input: SourceForm) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => {
      const card: SourceCardDto = { id: `pending-source-${z.sources.length}`, truePeakDbtp: null, ...input };
      return { ...z, sources: [...z.sources, card] };
    }),

  removeSource: (zoneId: string, sourceId: string) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, sources: z.sources.filter((s) => s.id !== sourceId) })),

  updatePreset: (zoneId: string, presetId: string, input: Partial<PresetForm>) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, presets: z.presets.map((p) => (p.id === presetId ? { ...p, ...input } : p)) })),

  addPreset: (zoneId: string, input: PresetForm & { directoryId?: string | null }) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => {
      const card: PresetCardDto = { id: `pending-preset-${z.presets.length}`, truePeakDbtp: null, ...input, directoryId: input.directoryId ?? null };
      return { ...z, presets: [...z.presets, card] };
    }),

  removePreset: (zoneId: string, presetId: string) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, presets: z.presets.filter((p) => p.id !== presetId) })),

  updateZone: (zoneId: string, settings: Partial<ZoneSettings>) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({
      ...z,
      name: settings.name ?? z.name,
      volumeCeiling: settings.volumeCeiling ?? z.volumeCeiling,
      turnOnVolume: settings.turnOnVolume ?? z.turnOnVolume,
      deviceSettings: settings.deviceSettings ?? z.deviceSettings,
      guest: settings.guestControls ? { ...z.guest, ...settings.guestControls } : z.guest,
    })),

  lock: (zoneId: string, byName: string, reason: string, flags?: GuestControlFlags) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({
      ...z,
      guest: { ...z.guest, ...(flags ?? {}), locked: true, lockedByName: byName, lockReason: reason, lockedAt: new Date().toISOString() },
    })),

  unlock: (zoneId: string) => (board: BoardDto) =>
    withZone(board, zoneId, (z) => ({ ...z, guest: { ...z.guest, locked: false, lockedByName: null, lockReason: null, lockedAt: null } })),
};
