import { sourceKindLabels, type ModelProfile } from "@/lib/devices/model-profiles";
import type { ZoneConfig } from "@/lib/validation/zone-config";

// Pure: what in a zone configuration the zone's device cannot take (preset
// slots, inputs, EQ bands per curve, outputs). An empty list means it fits.
// Restores and backups check this before writing, so a revision made for an
// earlier device never lands on one that cannot play it.

export type DeviceProfileLimits = Pick<ModelProfile, "name" | "presetSlots" | "eqBands" | "inputs" | "subwooferOutputs" | "hasLineOut">;

export function deviceFitProblems(config: ZoneConfig, profile: DeviceProfileLimits): string[] {
  const problems: string[] = [];
  if (config.presets.length > profile.presetSlots) {
    problems.push(
      `The device (${profile.name}) has ${profile.presetSlots} preset slots; this configuration has ${config.presets.length} stream presets.`,
    );
  }
  for (const s of config.sources) {
    if (!profile.inputs.includes(s.kind)) {
      problems.push(`Source “${s.label}” uses a ${sourceKindLabels[s.kind] ?? s.kind} input, which the device (${profile.name}) does not have.`);
    }
  }
  const curves = [
    ...(config.zoneCurve ? [config.zoneCurve] : []),
    ...config.sources.flatMap((s) => (s.toneCurve ? [s.toneCurve] : [])),
    ...config.presets.flatMap((p) => (p.toneCurve ? [p.toneCurve] : [])),
  ];
  const seen = new Set<string>();
  for (const c of curves) {
    if (c.bands.length <= profile.eqBands || seen.has(c.name)) continue;
    seen.add(c.name);
    problems.push(`Tone curve “${c.name}” has ${c.bands.length} bands; the device (${profile.name}) takes at most ${profile.eqBands}.`);
  }
  const subs = config.outputLayout.outputs.filter((o) => o.role === "subwoofer").length;
  if (subs > profile.subwooferOutputs) {
    problems.push(`The output layout has ${subs} subwoofer outputs; the device (${profile.name}) has ${profile.subwooferOutputs}.`);
  }
  if (!profile.hasLineOut && config.outputLayout.outputs.some((o) => o.role === "line_out")) {
    problems.push(`The output layout uses a line out, which the device (${profile.name}) does not have.`);
  }
  return problems;
}
