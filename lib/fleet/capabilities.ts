import { sourceKindLabels, type ModelProfile } from "@/lib/devices/model-profiles";
import type { ZoneConfig } from "@/lib/validation/zone-config";

// Pure: can a device of this model profile take this zone configuration? Each
// refusal names what was asked, what the model allows and a sentence a person
// can act on. The push preview refuses a zone on any of these before anything is
// sent; the worker checks again before each send (a device may have been swapped).

export type CapabilityProfile = Pick<ModelProfile, "name" | "presetSlots" | "eqBands" | "inputs" | "subwooferOutputs" | "hasLineOut">;

export type CapabilityProblemCode = "preset-slots" | "eq-bands" | "input" | "subwoofer-outputs" | "line-out";

export interface CapabilityProblem {
  code: CapabilityProblemCode;
  /** What the problem is about: "Stream presets", "Tone curve “Patio lift”", "Source “TV”". */
  subject: string;
  /** What the configuration asks for. */
  requested: number | string;
  /** What the model allows. */
  allowed: number | string;
  message: string;
}

type Curve = NonNullable<ZoneConfig["zoneCurve"]>;

/** Every curve of the configuration with where it is used (zone, a source, a preset). */
function curvesOf(config: ZoneConfig): { where: string; curve: Curve }[] {
  return [
    ...(config.zoneCurve ? [{ where: "the zone", curve: config.zoneCurve }] : []),
    ...config.sources.flatMap((s) => (s.toneCurve ? [{ where: `source “${s.label}”`, curve: s.toneCurve }] : [])),
    ...config.presets.flatMap((p) => (p.toneCurve ? [{ where: `preset “${p.name}”`, curve: p.toneCurve }] : [])),
  ];
}

export function checkCapabilities(config: ZoneConfig, profile: CapabilityProfile): CapabilityProblem[] {
  const problems: CapabilityProblem[] = [];

  if (config.presets.length > profile.presetSlots) {
    problems.push({
      code: "preset-slots",
      subject: "Stream presets",
      requested: config.presets.length,
      allowed: profile.presetSlots,
      message: `${config.presets.length} stream presets, but the ${profile.name} has ${profile.presetSlots} preset slots. Remove ${
        config.presets.length - profile.presetSlots
      } preset${config.presets.length - profile.presetSlots === 1 ? "" : "s"} before pushing.`,
    });
  }

  // One refusal per curve (a curve used in several places is named once, with every use).
  const byCurve = new Map<string, { curve: Curve; uses: string[] }>();
  for (const { where, curve } of curvesOf(config)) {
    if (curve.bands.length <= profile.eqBands) continue;
    const key = `${curve.id ?? ""}|${curve.name}|${curve.bands.length}`;
    const entry = byCurve.get(key) ?? { curve, uses: [] };
    entry.uses.push(where);
    byCurve.set(key, entry);
  }
  for (const { curve, uses } of byCurve.values()) {
    problems.push({
      code: "eq-bands",
      subject: `Tone curve “${curve.name}”`,
      requested: curve.bands.length,
      allowed: profile.eqBands,
      message: `Tone curve “${curve.name}” (used by ${uses.join(", ")}) has ${curve.bands.length} EQ bands, but the ${profile.name} allows ${profile.eqBands} per curve.`,
    });
  }

  for (const source of config.sources) {
    if (profile.inputs.includes(source.kind)) continue;
    problems.push({
      code: "input",
      subject: `Source “${source.label}”`,
      requested: source.kind,
      allowed: profile.inputs.join(", "),
      message: `Source “${source.label}” needs a ${sourceKindLabels[source.kind] ?? source.kind} input, which the ${profile.name} does not have (it has ${profile.inputs
        .map((k) => sourceKindLabels[k] ?? k)
        .join(", ")}).`,
    });
  }

  const subwoofers = config.outputLayout.outputs.filter((o) => o.role === "subwoofer").length;
  if (subwoofers > profile.subwooferOutputs) {
    problems.push({
      code: "subwoofer-outputs",
      subject: "Output layout",
      requested: subwoofers,
      allowed: profile.subwooferOutputs,
      message: `The output layout has ${subwoofers} subwoofer output${subwoofers === 1 ? "" : "s"}, but the ${profile.name} has ${profile.subwooferOutputs}.`,
    });
  }

  if (!profile.hasLineOut && config.outputLayout.outputs.some((o) => o.role === "line_out")) {
    problems.push({
      code: "line-out",
      subject: "Output layout",
      requested: "line out",
      allowed: "no line out",
      message: `The output layout uses a line out, which the ${profile.name} does not have.`,
    });
  }

  return problems;
}
