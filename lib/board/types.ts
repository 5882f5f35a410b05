import type { SourceKind } from "@/lib/devices/model-profiles";
import type { Role } from "@/lib/permissions";
import type { ConfigBand, DeviceSettings } from "@/lib/validation/zone-config";

// The zone board's JSON (GET /api/homes/:homeId/board) and what its writes
// answer. Shared by the data-access module, the route handlers and the client.

export interface BoardCurveDto {
  id: string;
  name: string;
  description: string;
  bands: ConfigBand[];
}

export interface BoardModelProfileDto {
  id: string;
  name: string;
  presetSlots: number;
  eqBands: number;
  inputs: SourceKind[];
}

export interface BoardDeviceDto {
  id: string;
  serial: string;
  firmwareVersion: string;
  online: boolean;
  lastReportAt: string | null;
  profile: BoardModelProfileDto;
}

export interface GuestControlsDto {
  volume: boolean;
  source: boolean;
  wake: boolean;
  locked: boolean;
  lockedAt: string | null;
  lockedByName: string | null;
  lockReason: string | null;
}

export interface SourceCardDto {
  id: string;
  label: string;
  kind: SourceKind;
  enabled: boolean;
  loudnessOffsetDb: number;
  subsonic: boolean;
  toneCurveId: string | null;
  /** True peak of the latest level-match clip, if one was measured. */
  truePeakDbtp: number | null;
}

export interface PresetCardDto {
  id: string;
  name: string;
  streamUrl: string;
  genre: string | null;
  directoryId: string | null;
  loudnessOffsetDb: number;
  toneCurveId: string | null;
  truePeakDbtp: number | null;
}

export interface ZoneColumnDto {
  id: string;
  name: string;
  position: number;
  /** Compare-and-set counter: every write sends the version it was based on. */
  version: number;
  volumeCeiling: number;
  turnOnVolume: number;
  toneCurveId: string | null;
  guest: GuestControlsDto;
  deviceSettings: DeviceSettings;
  device: BoardDeviceDto | null;
  /** Preset slots when no device is bound: the largest model profile's. */
  presetSlots: number;
  eqBands: number | null;
  sources: SourceCardDto[];
  presets: PresetCardDto[];
}

/** What the signed-in person may do on this board (the server checks again). */
export interface BoardPermissions {
  editZone: boolean;
  editGuest: boolean;
  lock: boolean;
  unlock: boolean;
  reorderPresets: boolean;
}

export interface BoardDto {
  home: { id: string; name: string; householdName: string; city: string; servicePlan: string };
  actor: { name: string; role: Role };
  may: BoardPermissions;
  curves: BoardCurveDto[];
  zones: ZoneColumnDto[];
}

/** Every board write answers with the fresh columns of the zones it changed. */
export interface BoardWriteResult {
  zones: ZoneColumnDto[];
  revisions: { zoneId: string; number: number; created: boolean }[];
}
