import type { SourceKind } from "@/lib/devices/model-profiles";
import type { ConfigBand, DeviceSettings, OutputLayout, ZoneConfig } from "@/lib/validation/zone-config";

// Pure: turns a zone's rows into the ZoneConfig a revision stores and a device
// receives. Tone curves are resolved to their band values at this moment.

export interface CurveForConfig {
  id: string;
  name: string;
  bands: ConfigBand[];
}

export interface ZoneRowsForConfig {
  zone: {
    name: string;
    volumeCeiling: number;
    turnOnVolume: number;
    guestVolume: boolean;
    guestSource: boolean;
    guestWake: boolean;
    guestLocked: boolean;
    toneCurveId: string | null;
    deviceSettings: DeviceSettings;
    outputLayout: OutputLayout;
  };
  sources: {
    id: string;
    position: number;
    label: string;
    kind: SourceKind;
    enabled: boolean;
    loudnessOffsetDb: number;
    subsonic: boolean;
    toneCurveId: string | null;
  }[];
  presets: {
    id: string;
    position: number;
    name: string;
    streamUrl: string;
    genre: string | null;
    loudnessOffsetDb: number;
    toneCurveId: string | null;
  }[];
  curves: Map<string, CurveForConfig>;
}

function curveRef(curves: Map<string, CurveForConfig>, id: string | null) {
  if (!id) return null;
  const curve = curves.get(id);
  if (!curve) return null;
  return { id: curve.id, name: curve.name, bands: curve.bands.map((b) => ({ ...b })) };
}

export function buildZoneConfig({ zone, sources, presets, curves }: ZoneRowsForConfig): ZoneConfig {
  return {
    schema: 1,
    name: zone.name,
    volumeCeiling: zone.volumeCeiling,
    turnOnVolume: zone.turnOnVolume,
    guestControls: {
      volume: zone.guestVolume,
      source: zone.guestSource,
      wake: zone.guestWake,
      locked: zone.guestLocked,
    },
    deviceSettings: { ...zone.deviceSettings },
    zoneCurve: curveRef(curves, zone.toneCurveId),
    sources: [...sources]
      .sort((a, b) => a.position - b.position)
      .map((s) => ({
        key: s.id,
        label: s.label,
        kind: s.kind,
        enabled: s.enabled,
        loudnessOffsetDb: s.loudnessOffsetDb,
        subsonic: s.subsonic,
        toneCurve: curveRef(curves, s.toneCurveId),
      })),
    presets: [...presets]
      .sort((a, b) => a.position - b.position)
      .map((p) => ({
        key: p.id,
        name: p.name,
        streamUrl: p.streamUrl,
        genre: p.genre,
        loudnessOffsetDb: p.loudnessOffsetDb,
        toneCurve: curveRef(curves, p.toneCurveId),
      })),
    outputLayout: structuredClone(zone.outputLayout),
  };
}
