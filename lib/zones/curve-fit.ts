// Pure: does a tone curve fit the EQ of a zone's device? A device runs the
// zone's curve and the playing source's (or station's) curve in series on the
// same EQ bands, so the bands a zone needs are its zone curve's bands plus
// those of its largest source or station curve. Every band counts, enabled or
// not: a disabled band still holds its slot on the device.
// Used by the tone-curve library (to warn) and by attach (to refuse).

export interface EqProfile {
  name: string;
  eqBands: number;
}

export interface ZoneCurveUse {
  /** Bands of the zone's own curve (0 without one). */
  zoneCurveBands: number;
  /** Bands of each source's and station's curve (0 or absent without one). */
  cardCurveBands: readonly number[];
}

/** Bands the device must hold at once for this zone. */
export function bandsNeeded(use: ZoneCurveUse): number {
  return use.zoneCurveBands + Math.max(0, ...use.cardCurveBands);
}

/** A sentence naming the problem, or null when the zone's curves fit its device. */
export function zoneBandProblem(zoneName: string, profile: EqProfile, use: ZoneCurveUse): string | null {
  const needed = bandsNeeded(use);
  if (needed <= profile.eqBands) return null;
  const detail =
    use.zoneCurveBands > 0 && needed > use.zoneCurveBands
      ? ` (zone curve ${use.zoneCurveBands} + source or station curve ${needed - use.zoneCurveBands})`
      : "";
  return `“${zoneName}” needs ${needed} EQ bands${detail}; its device (${profile.name}) has ${profile.eqBands}.`;
}

/**
 * Would attaching a curve of `curveBands` bands fit? `target` says where it
 * goes: as the zone's curve (it then runs with the largest card curve) or on a
 * source or station (it then runs with the zone's curve). Returns the refusal
 * message, or null when it fits.
 */
export function curveAttachProblem(input: {
  target: "zone" | "source" | "preset";
  curveName: string;
  curveBands: number;
  profile: EqProfile;
  /** The zone's current curves; the card being changed is left out by the caller. */
  use: ZoneCurveUse;
}): string | null {
  const { target, curveName, curveBands, profile, use } = input;
  const after: ZoneCurveUse =
    target === "zone"
      ? { zoneCurveBands: curveBands, cardCurveBands: use.cardCurveBands }
      : { zoneCurveBands: use.zoneCurveBands, cardCurveBands: [...use.cardCurveBands, curveBands] };
  const needed = bandsNeeded(after);
  if (needed <= profile.eqBands) return null;
  const other = target === "zone" ? Math.max(0, ...use.cardCurveBands) : use.zoneCurveBands;
  const with_ = target === "zone" ? "the largest source or station curve" : "the zone curve";
  return `“${curveName}” has ${curveBands} band${curveBands === 1 ? "" : "s"}; with ${with_} (${other}) that is ${needed}, and the device (${profile.name}) has ${profile.eqBands} EQ bands.`;
}
