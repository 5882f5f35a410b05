import { sourceKindLabels } from "@/lib/devices/model-profiles";
import { formatDb, formatValue } from "@/lib/zones/config-diff";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { canonicalJson } from "@/lib/zones/content-hash";
import { isOverridden } from "@/lib/zones/override-paths";

// Pure: brings a zone up to a newer version of its zone template, keeping the
// fields the zone sets itself (zones.overrides) and saying which they are.
//
// Field paths (what `zones.overrides` holds; a path also covers everything under it):
//   volumeCeiling, turnOnVolume
//   guestControls.volume | .source | .wake       (the lock is never a template's business)
//   deviceSettings.<key>
//   zoneCurve
//   outputLayout.crossover, outputLayout.outputs
//   sources.order, sources[<slot>], sources[<slot>].label|enabled|loudnessOffsetDb|subsonic|toneCurve
//   presets.order, presets[<streamUrl>], presets[<streamUrl>].name|genre|loudnessOffsetDb|toneCurve
// Sources are matched by slot: their kind, and "#2", "#3"… for a second input of the same
// kind (so renaming "TV" does not break the match). Stations are matched by stream URL.
// Without the template's earlier versions we cannot tell "removed from the template" from
// "added in this zone", so a source or station only the zone has is kept and listed.

type Source = ZoneConfig["sources"][number];
type Preset = ZoneConfig["presets"][number];

export interface TemplateFieldChange {
  path: string;
  label: string;
  before: unknown;
  after: unknown;
}

export type KeptReason = "override" | "locked" | "local-only";

export interface TemplateKeptField {
  path: string;
  label: string;
  reason: KeptReason;
  zoneValue: unknown;
  templateValue: unknown;
}

export interface TemplateMergeResult {
  config: ZoneConfig;
  changes: TemplateFieldChange[];
  kept: TemplateKeptField[];
}

const sourceFields = ["label", "enabled", "loudnessOffsetDb", "subsonic", "toneCurve"] as const;
const presetFields = ["name", "genre", "loudnessOffsetDb", "toneCurve"] as const;
const guestFields = ["volume", "source", "wake"] as const;

const fieldLabels: Record<string, string> = {
  label: "name",
  enabled: "shown to the household",
  loudnessOffsetDb: "loudness offset",
  subsonic: "subsonic filter",
  toneCurve: "tone curve",
  name: "name",
  genre: "genre",
};

const deviceSettingLabels: Record<string, string> = {
  standbyMinutes: "standby after",
  displayBrightness: "display brightness",
  cecPower: "HDMI CEC power",
  cecVolume: "HDMI CEC volume",
  trigger12v: "12 V trigger",
};

export function same(a: unknown, b: unknown): boolean {
  return canonicalJson(a) === canonicalJson(b);
}

export { isOverridden };

/** Slot of each source: its kind, with "#n" for the n-th input of the same kind. */
export function sourceSlots(sources: readonly Pick<Source, "kind">[]): string[] {
  const seen = new Map<string, number>();
  return sources.map((s) => {
    const n = (seen.get(s.kind) ?? 0) + 1;
    seen.set(s.kind, n);
    return n === 1 ? s.kind : `${s.kind}#${n}`;
  });
}

function slotLabel(slot: string): string {
  const [kind, n] = slot.split("#");
  const name = sourceKindLabels[kind as keyof typeof sourceKindLabels] ?? kind;
  return n ? `${name} ${n}` : name;
}

function curveSummary(curve: Source["toneCurve"]): unknown {
  return curve ? curve.name : null;
}

/** What a person sees for a value in a preview (curves by name, not their bands). */
function display(field: string, value: unknown): unknown {
  if (field === "toneCurve" || field === "zoneCurve") return curveSummary(value as Source["toneCurve"]);
  return value;
}

export interface MergeInput {
  template: ZoneConfig;
  zone: ZoneConfig;
  overrides: readonly string[];
  /** Guest controls locked by support stay as they are. */
  guestLocked: boolean;
}

export function mergeTemplateIntoZone({ template, zone, overrides, guestLocked }: MergeInput): TemplateMergeResult {
  const changes: TemplateFieldChange[] = [];
  const kept: TemplateKeptField[] = [];

  /** Take the template's value unless the zone keeps its own; record either way. */
  function pick<T>(path: string, label: string, zoneValue: T, templateValue: T, field = ""): T {
    if (same(zoneValue, templateValue)) return zoneValue;
    if (isOverridden(path, overrides)) {
      kept.push({ path, label, reason: "override", zoneValue: display(field, zoneValue), templateValue: display(field, templateValue) });
      return zoneValue;
    }
    changes.push({ path, label, before: display(field, zoneValue), after: display(field, templateValue) });
    return templateValue;
  }

  const volumeCeiling = pick("volumeCeiling", "Volume ceiling (%)", zone.volumeCeiling, template.volumeCeiling);
  const turnOnVolume = pick("turnOnVolume", "Turn-on volume (%)", zone.turnOnVolume, template.turnOnVolume);

  const guestControls = { ...zone.guestControls };
  for (const f of guestFields) {
    const path = `guestControls.${f}`;
    const label = `Guest controls: ${{ volume: "change the volume", source: "switch the source", wake: "wake the zone" }[f]}`;
    if (guestLocked && zone.guestControls[f] !== template.guestControls[f]) {
      kept.push({ path, label, reason: "locked", zoneValue: zone.guestControls[f], templateValue: template.guestControls[f] });
      continue;
    }
    guestControls[f] = pick(path, label, zone.guestControls[f], template.guestControls[f]);
  }

  const deviceSettings = { ...zone.deviceSettings };
  for (const key of Object.keys(template.deviceSettings) as (keyof ZoneConfig["deviceSettings"])[]) {
    (deviceSettings as Record<string, unknown>)[key] = pick(
      `deviceSettings.${key}`,
      `Device setting: ${deviceSettingLabels[key] ?? key}`,
      zone.deviceSettings[key],
      template.deviceSettings[key],
    );
  }

  const zoneCurve = pick("zoneCurve", "Zone tone curve", zone.zoneCurve, template.zoneCurve, "zoneCurve");
  const outputLayout = {
    crossover: pick("outputLayout.crossover", "Crossover", zone.outputLayout.crossover, template.outputLayout.crossover),
    outputs: pick("outputLayout.outputs", "Outputs (distances, delays, trims)", zone.outputLayout.outputs, template.outputLayout.outputs),
  };

  // Sources, matched by slot.
  const zoneSlots = sourceSlots(zone.sources);
  const templateSlots = sourceSlots(template.sources);
  const zoneBySlot = new Map(zone.sources.map((s, i) => [zoneSlots[i], s]));
  const merged = new Map<string, Source>();
  for (const [i, t] of template.sources.entries()) {
    const slot = templateSlots[i];
    const z = zoneBySlot.get(slot);
    const base = `sources[${slot}]`;
    if (!z) {
      const label = `Source “${t.label}” (${slotLabel(slot)})`;
      if (isOverridden(base, overrides)) {
        kept.push({ path: base, label, reason: "override", zoneValue: null, templateValue: t.label });
        continue;
      }
      changes.push({ path: base, label: `${label} added`, before: null, after: t.label });
      merged.set(slot, { ...structuredClone(t), key: `new:${slot}` });
      continue;
    }
    const next: Source = { ...z };
    for (const f of sourceFields) {
      const label = `Source “${z.label}” (${slotLabel(slot)}): ${fieldLabels[f]}`;
      (next as Record<string, unknown>)[f] = pick(`${base}.${f}`, label, z[f], t[f], f);
    }
    merged.set(slot, next);
  }
  const localSources: { slot: string; source: Source }[] = [];
  for (const [i, z] of zone.sources.entries()) {
    const slot = zoneSlots[i];
    if (templateSlots.includes(slot)) continue;
    localSources.push({ slot, source: z });
    kept.push({ path: `sources[${slot}]`, label: `Source “${z.label}” (${slotLabel(slot)})`, reason: "local-only", zoneValue: z.label, templateValue: null });
  }
  const templateOrder = templateSlots.filter((s) => merged.has(s));
  const zoneOrder = zoneSlots.filter((s) => merged.has(s));
  const keepZoneSourceOrder = isOverridden("sources.order", overrides);
  const sourceOrder = keepZoneSourceOrder
    ? [...zoneOrder, ...templateOrder.filter((s) => !zoneOrder.includes(s))]
    : templateOrder;
  const sources: Source[] = [...sourceOrder.map((s) => merged.get(s)!), ...localSources.map((l) => l.source)];
  const beforeNames = zone.sources.map((s) => s.label);
  const afterNames = sources.map((s) => s.label);
  const sharedBefore = zoneOrder.map((s) => zoneBySlot.get(s)!.label);
  const sharedTemplate = templateSlots.filter((s) => zoneBySlot.has(s)).map((s) => zoneBySlot.get(s)!.label);
  if (!same(sharedBefore, sharedTemplate)) {
    if (keepZoneSourceOrder) {
      kept.push({ path: "sources.order", label: "Order of sources", reason: "override", zoneValue: beforeNames, templateValue: template.sources.map((s) => s.label) });
    } else {
      changes.push({ path: "sources.order", label: "Order of sources", before: beforeNames, after: afterNames });
    }
  }

  // Stations, matched by stream URL.
  const zonePresetByUrl = new Map(zone.presets.map((p) => [p.streamUrl, p]));
  const templateUrls = template.presets.map((p) => p.streamUrl);
  const mergedPresets = new Map<string, Preset>();
  for (const [i, t] of template.presets.entries()) {
    const z = zonePresetByUrl.get(t.streamUrl);
    const base = `presets[${t.streamUrl}]`;
    if (!z) {
      const label = `Station “${t.name}”`;
      if (isOverridden(base, overrides)) {
        kept.push({ path: base, label, reason: "override", zoneValue: null, templateValue: t.name });
        continue;
      }
      changes.push({ path: base, label: `${label} added`, before: null, after: t.name });
      mergedPresets.set(t.streamUrl, { ...structuredClone(t), key: `new:preset-${i}` });
      continue;
    }
    const next: Preset = { ...z };
    for (const f of presetFields) {
      const label = `Station “${z.name}”: ${fieldLabels[f]}`;
      (next as Record<string, unknown>)[f] = pick(`${base}.${f}`, label, z[f], t[f], f);
    }
    mergedPresets.set(t.streamUrl, next);
  }
  const localPresets = zone.presets.filter((p) => !templateUrls.includes(p.streamUrl));
  for (const p of localPresets) {
    kept.push({ path: `presets[${p.streamUrl}]`, label: `Station “${p.name}”`, reason: "local-only", zoneValue: p.name, templateValue: null });
  }
  const keepZonePresetOrder = isOverridden("presets.order", overrides);
  const zonePresetOrder = zone.presets.map((p) => p.streamUrl).filter((u) => mergedPresets.has(u));
  const templatePresetOrder = templateUrls.filter((u) => mergedPresets.has(u));
  const presetOrder = keepZonePresetOrder
    ? [...zonePresetOrder, ...templatePresetOrder.filter((u) => !zonePresetOrder.includes(u))]
    : templatePresetOrder;
  const presets: Preset[] = keepZonePresetOrder
    ? // The household's own order: their stations stay where they put them, local ones included.
      [...zone.presets.map((p) => mergedPresets.get(p.streamUrl) ?? p), ...presetOrder.filter((u) => !zonePresetByUrl.has(u)).map((u) => mergedPresets.get(u)!)]
    : [...presetOrder.map((u) => mergedPresets.get(u)!), ...localPresets];
  const sharedZoneOrder = zone.presets.filter((p) => templateUrls.includes(p.streamUrl)).map((p) => p.streamUrl);
  const sharedTemplateOrder = templateUrls.filter((u) => zonePresetByUrl.has(u));
  if (!same(sharedZoneOrder, sharedTemplateOrder)) {
    if (keepZonePresetOrder) {
      kept.push({ path: "presets.order", label: "Order of favourite stations", reason: "override", zoneValue: zone.presets.map((p) => p.name), templateValue: template.presets.map((p) => p.name) });
    } else {
      changes.push({ path: "presets.order", label: "Order of favourite stations", before: zone.presets.map((p) => p.name), after: presets.map((p) => p.name) });
    }
  }

  return {
    config: {
      schema: 1,
      name: zone.name,
      volumeCeiling,
      turnOnVolume,
      guestControls,
      deviceSettings,
      zoneCurve,
      sources,
      presets,
      outputLayout,
    },
    changes,
    kept,
  };
}

/**
 * A zone's configuration made into a template's: no device-bound keys, sources keyed by
 * slot, stations by position, and the lock left off (a lock is a support decision about
 * one home, not part of a design).
 */
export function templateConfigFromZone(zone: ZoneConfig, name: string): ZoneConfig {
  const slots = sourceSlots(zone.sources);
  return {
    ...structuredClone(zone),
    name,
    guestControls: { ...zone.guestControls, locked: false },
    sources: zone.sources.map((s, i) => ({ ...structuredClone(s), key: slots[i] })),
    presets: zone.presets.map((p, i) => ({ ...structuredClone(p), key: `preset-${i + 1}` })),
  };
}

/**
 * The override paths a direct edit of a templated zone implies: every field that now
 * differs from what the zone had. Zone editors add these to `zones.overrides` so a later
 * template update keeps the edit.
 */
export function overridePathsForEdit(before: ZoneConfig, after: ZoneConfig): string[] {
  const probe = mergeTemplateIntoZone({ template: after, zone: before, overrides: [], guestLocked: false });
  // What only `before` has was removed by the edit: keep it removed on later updates.
  const removed = probe.kept.filter((k) => k.reason === "local-only").map((k) => k.path);
  return [...new Set([...probe.changes.map((c) => c.path), ...removed])];
}

/** Add paths to an override list, without duplicates or paths already covered. */
export function addOverrides(current: readonly string[], paths: readonly string[]): string[] {
  const out = [...current];
  for (const p of paths) if (!isOverridden(p, out)) out.push(p);
  return out;
}

const reasonText: Record<KeptReason, string> = {
  override: "set in this zone",
  locked: "guest controls locked by support",
  "local-only": "only in this zone",
};

function keptValue(path: string, v: unknown): string {
  if (Array.isArray(v)) return v.map((x) => formatValue(x)).join(", ");
  if (typeof v === "number" && path.endsWith("loudnessOffsetDb")) return formatDb(v);
  if (typeof v === "boolean" && path.startsWith("guestControls.")) return v ? "allowed" : "not allowed";
  if (path.startsWith("volumeCeiling") || path.startsWith("turnOnVolume")) return `${formatValue(v)} %`;
  return formatValue(v);
}

/** One readable line for a kept field: what stays, why, and what the template has. */
export function keptText(k: TemplateKeptField): string {
  if (k.reason === "local-only") return `${k.label}: kept (${reasonText[k.reason]})`;
  if (k.zoneValue === null) return `${k.label}: not added (${reasonText[k.reason]})`;
  return `${k.label}: keeps ${keptValue(k.path, k.zoneValue)} (${reasonText[k.reason]}; template: ${keptValue(k.path, k.templateValue)})`;
}
