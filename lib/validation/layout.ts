import { z } from "zod";
import { versionSchema } from "@/lib/validation/board";
import { outputRoles, type OutputLayout } from "@/lib/validation/zone-config";

// A zone's output layout as the layout editor and its route handler accept
// it: the stored shape (zones.output_layout, lib/validation/zone-config.ts
// outputLayoutSchema) with messages a person can act on, plus the rules that
// depend on the zone's device (its model profile's subwoofer outputs and line
// out), shared by the editor and the server.

export const CROSSOVER_LIMITS = { minHz: 40, maxHz: 250 } as const;
/** lib/audio/alignment.ts refuses more; a room is rarely over 30 m. */
export const MAX_DISTANCE_M = 30;
export const MAX_LATENCY_MS = 100;
export const TRIM_LIMITS = { minDb: -24, maxDb: 12 } as const;
export const MAX_SUBWOOFERS = 2;

export const roleLabels: Record<(typeof outputRoles)[number], string> = {
  main_left: "Main left",
  main_right: "Main right",
  subwoofer: "Subwoofer",
  line_out: "Line out (full range)",
};

const metresPer = { m: 1, cm: 0.01, in: 0.0254 } as const;

export const layoutOutputSchema = z
  .object({
  id: z.string().trim().min(1, "Every output needs an id.").max(40),
  role: z.enum(outputRoles, { error: "Choose what the output drives." }),
  label: z.string().trim().min(1, "Name the output, e.g. “Left”.").max(60, "Keep the name to 60 characters."),
  distance: z.object({
    value: z.number({ error: "Enter the distance to the listening position." }).min(0, "A distance is zero or more."),
    unit: z.enum(["m", "cm", "in"], { error: "Choose m, cm or in." }),
  }),
  latencyMs: z
    .number({ error: "Enter the output's own latency in ms (0 if none)." })
    .min(0, "Latency is zero or more.")
    .max(MAX_LATENCY_MS, `Latency is at most ${MAX_LATENCY_MS} ms.`),
  trimDb: z
    .number({ error: "Enter the trim in dB." })
    .min(TRIM_LIMITS.minDb, `A trim is at least ${TRIM_LIMITS.minDb} dB.`)
    .max(TRIM_LIMITS.maxDb, `A trim is at most +${TRIM_LIMITS.maxDb} dB.`),
  polarityInverted: z.boolean().default(false),
  })
  .superRefine((o, ctx) => {
    const metres = o.distance.value * metresPer[o.distance.unit];
    if (metres > MAX_DISTANCE_M) {
      ctx.addIssue({ code: "custom", path: ["distance", "value"], message: `That is ${metres.toFixed(1)} m; the limit is ${MAX_DISTANCE_M} m.` });
    }
  });

export const layoutSchema = z
  .object({
    crossover: z
      .object({
        type: z.enum(["butterworth", "linkwitz_riley"], { error: "Choose Butterworth or Linkwitz-Riley." }),
        slopeDbPerOctave: z.union([z.literal(12), z.literal(24), z.literal(48)], { error: "Choose 12, 24 or 48 dB per octave." }),
        frequencyHz: z
          .number({ error: "Enter the crossover frequency in Hz." })
          .min(CROSSOVER_LIMITS.minHz, `The crossover is at least ${CROSSOVER_LIMITS.minHz} Hz.`)
          .max(CROSSOVER_LIMITS.maxHz, `The crossover is at most ${CROSSOVER_LIMITS.maxHz} Hz.`),
      })
      .nullable(),
    outputs: z.array(layoutOutputSchema).max(6, "A zone has at most 6 outputs."),
  })
  .superRefine((layout, ctx) => {
    const ids = new Set<string>();
    const count = { main_left: 0, main_right: 0, subwoofer: 0, line_out: 0 };
    layout.outputs.forEach((o, i) => {
      if (ids.has(o.id)) ctx.addIssue({ code: "custom", path: ["outputs", i, "id"], message: "Each output needs its own id." });
      ids.add(o.id);
      count[o.role]++;
      if (o.role === "main_left" && count.main_left > 1) ctx.addIssue({ code: "custom", path: ["outputs", i, "role"], message: "There is already a main left output." });
      if (o.role === "main_right" && count.main_right > 1) ctx.addIssue({ code: "custom", path: ["outputs", i, "role"], message: "There is already a main right output." });
      if (o.role === "line_out" && count.line_out > 1) ctx.addIssue({ code: "custom", path: ["outputs", i, "role"], message: "A zone has one line out." });
      if (o.role === "subwoofer" && count.subwoofer > MAX_SUBWOOFERS) {
        ctx.addIssue({ code: "custom", path: ["outputs", i, "role"], message: `A zone has at most ${MAX_SUBWOOFERS} subwoofers.` });
      }
    });
  });
export type LayoutInput = z.infer<typeof layoutSchema>;

export const layoutSaveSchema = z.object({ version: versionSchema, layout: layoutSchema });

export interface LayoutProfile {
  name: string;
  subwooferOutputs: number;
  hasLineOut: boolean;
}

/** Rules that depend on the device: field path → message. Empty when the layout fits. */
export function layoutDeviceProblems(layout: OutputLayout, profile: LayoutProfile | null): Record<string, string[]> {
  const problems: Record<string, string[]> = {};
  if (!profile) return problems;
  let subs = 0;
  layout.outputs.forEach((o, i) => {
    if (o.role === "subwoofer") {
      subs++;
      if (subs > profile.subwooferOutputs) {
        (problems[`outputs.${i}.role`] ??= []).push(
          profile.subwooferOutputs === 0
            ? `The device (${profile.name}) has no subwoofer output.`
            : `The device (${profile.name}) has ${profile.subwooferOutputs} subwoofer output${profile.subwooferOutputs === 1 ? "" : "s"}.`,
        );
      }
    }
    if (o.role === "line_out" && !profile.hasLineOut) {
      (problems[`outputs.${i}.role`] ??= []).push(`The device (${profile.name}) has no line out.`);
    }
  });
  return problems;
}

/** "linkwitz_riley" (stored) → "linkwitz-riley" (lib/audio/crossover.ts). */
export function crossoverSpecOf(layout: OutputLayout) {
  if (!layout.crossover) return null;
  return {
    alignment: layout.crossover.type === "linkwitz_riley" ? ("linkwitz-riley" as const) : ("butterworth" as const),
    slopeDbPerOctave: layout.crossover.slopeDbPerOctave,
    frequencyHz: layout.crossover.frequencyHz,
  };
}

export function layoutUrl(zoneId: string) {
  return `/api/zones/${zoneId}/layout`;
}
