import { sourceKindLabels, type ModelProfile } from "@/lib/devices/model-profiles";
import type { ZoneConfig } from "@/lib/validation/zone-config";

// Pure: can a device of this model profile take this zone configuration? One
// set of rules for every place that asks — the push preview and the worker
// before each send (a device may have been swapped), using or updating a
// template, restoring a revision or a backup — and the same rules the board
// applies to a drop (lib/board/rules.ts, db/queries/board.ts). Each problem
// names what was asked, what the model allows and a sentence a person can act on.
//
// EQ bands: the zone curve runs in series with the curve of whichever source or
// preset is playing, so each card's curve must fit beside the zone curve.

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

/** The curves of the sources and presets, each once, with every card that uses it. */
function cardCurves(config: ZoneConfig): { curve: Curve; uses: string[] }[] {
  const byCurve = new Map<string, { curve: Curve; uses: string[] }>();
  const add = (where: string, curve: Curve | null) => {
    if (!curve) return;
    const key = `${curve.id ?? ""}|${curve.name}|${curve.bands.length}`;
    const entry = byCurve.get(key) ?? { curve, uses: [] };
    entry.uses.push(where);
    byCurve.set(key, entry);
  };
  for (const s of config.sources) add(`source “${s.label}”`, s.toneCurve);
  for (const p of config.presets) add(`preset “${p.name}”`, p.toneCurve);
  return [...byCurve.values()];
}

function eqBandProblems(config: ZoneConfig, profile: CapabilityProfile): CapabilityProblem[] {
  const problems: CapabilityProblem[] = [];
  const zone = config.zoneCurve;
  const zoneBands = zone?.bands.length ?? 0;
  if (zone && zoneBands > profile.eqBands) {
    problems.push({
      code: "eq-bands",
      subject: `Zone curve “${zone.name}”`,
      requested: zoneBands,
      allowed: profile.eqBands,
      message: `The zone curve “${zone.name}” has ${zoneBands} EQ bands, but the ${profile.name} has ${profile.eqBands}.`,
    });
    return problems;
  }
  for (const { curve, uses } of cardCurves(config)) {
    const need = curve.bands.length + zoneBands;
    if (need <= profile.eqBands) continue;
    const beside = zone ? `; with the zone curve “${zone.name}” (${zoneBands}) that makes ${need}` : "";
    problems.push({
      code: "eq-bands",
      subject: `Tone curve “${curve.name}”`,
      requested: need,
      allowed: profile.eqBands,
      message: `Tone curve “${curve.name}” (used by ${uses.join(", ")}) has ${curve.bands.length} EQ bands${beside}, but the ${profile.name} has ${profile.eqBands}.`,
    });
  }
  return problems;
}

export function checkCapabilities(config: ZoneConfig, profile: CapabilityProfile): CapabilityProblem[] {
  const problems: CapabilityProblem[] = [];

  if (config.presets.length > profile.presetSlots) {
    const extra = config.presets.length - profile.presetSlots;
    problems.push({
      code: "preset-slots",
      subject: "Stream presets",
      requested: config.presets.length,
      allowed: profile.presetSlots,
      message: `${config.presets.length} stream presets, but the ${profile.name} has ${profile.presetSlots} preset slots. Remove ${extra} preset${extra === 1 ? "" : "s"} first.`,
    });
  }

  problems.push(...eqBandProblems(config, profile));

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

/** The same problems as sentences, for places that list them (template use, restores). */
export function deviceFitProblems(config: ZoneConfig, profile: CapabilityProfile): string[] {
  return checkCapabilities(config, profile).map((p) => p.message);
}
