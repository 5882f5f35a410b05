/**
 * Time alignment at the listening position: each output's sound arrives after
 * distance / c plus the output's own processing latency; every output is
 * delayed so all arrive with the latest one, which gets 0 ms.
 *
 * Speed of sound: 343 m/s by default (dry air, 20 °C); with a temperature,
 * c = 331.3 + 0.606 · T (T in °C), the usual linear approximation.
 */

export type DistanceUnit = "m" | "cm" | "in";

export interface AlignmentOutput {
  readonly id: string;
  readonly distance: { readonly value: number; readonly unit: DistanceUnit };
  /** The output's own processing latency (e.g. a DSP subwoofer), ms. */
  readonly latencyMs: number;
  /** Carried through untouched so callers can show it beside the delay. */
  readonly trimDb: number;
}

export interface AlignmentOptions {
  /** Air temperature in °C; when given, overrides speedOfSound. */
  readonly temperatureC?: number;
  /** m/s; default 343. */
  readonly speedOfSound?: number;
}

export interface AlignedOutput {
  readonly id: string;
  readonly distanceM: number;
  /** distance / c + latency, ms. */
  readonly arrivalMs: number;
  /** Delay to set on this output, ms (>= 0; 0 for the latest arrival). */
  readonly delayMs: number;
  readonly trimDb: number;
}

export interface AlignmentResult {
  readonly speedOfSound: number;
  readonly outputs: AlignedOutput[];
}

export const DEFAULT_SPEED_OF_SOUND = 343;
export const MAX_DISTANCE_M = 30;
export const MAX_LATENCY_MS = 100;
export const MIN_TEMPERATURE_C = -20;
export const MAX_TEMPERATURE_C = 50;

/** Exact by definition: 1 in = 25.4 mm. */
const METRES_PER_UNIT: Record<DistanceUnit, number> = { m: 1, cm: 0.01, in: 0.0254 };

export function toMetres(value: number, unit: DistanceUnit): number {
  return value * METRES_PER_UNIT[unit];
}

/** c = 331.3 + 0.606 T (m/s, T in °C). */
export function speedOfSoundAt(temperatureC: number): number {
  return 331.3 + 0.606 * temperatureC;
}

export class AlignmentInputError extends RangeError {
  readonly outputId: string | undefined;
  readonly field: string;
  constructor(field: string, message: string, outputId?: string) {
    super(message);
    this.name = "AlignmentInputError";
    this.field = field;
    this.outputId = outputId;
  }
}

export function computeAlignment(outputs: readonly AlignmentOutput[], opts: AlignmentOptions = {}): AlignmentResult {
  let c = opts.speedOfSound ?? DEFAULT_SPEED_OF_SOUND;
  if (opts.temperatureC !== undefined) {
    const t = opts.temperatureC;
    if (!Number.isFinite(t) || t < MIN_TEMPERATURE_C || t > MAX_TEMPERATURE_C) {
      throw new AlignmentInputError("temperatureC", `Temperature must be ${MIN_TEMPERATURE_C}…${MAX_TEMPERATURE_C} °C, got ${t}.`);
    }
    c = speedOfSoundAt(t);
  }
  if (!Number.isFinite(c) || c <= 0) throw new AlignmentInputError("speedOfSound", `Speed of sound must be positive, got ${c}.`);

  const ids = new Set<string>();
  const measured = outputs.map((o) => {
    if (ids.has(o.id)) throw new AlignmentInputError("id", `Output ${o.id} appears twice.`, o.id);
    ids.add(o.id);
    const unit = o.distance.unit;
    if (!(unit in METRES_PER_UNIT)) throw new AlignmentInputError("distance.unit", `Output ${o.id}: unknown unit ${String(unit)}.`, o.id);
    const distanceM = toMetres(o.distance.value, unit);
    if (!Number.isFinite(distanceM) || distanceM < 0) {
      throw new AlignmentInputError("distance", `Output ${o.id}: distance must be zero or more.`, o.id);
    }
    if (distanceM > MAX_DISTANCE_M) {
      throw new AlignmentInputError("distance", `Output ${o.id}: ${distanceM.toFixed(2)} m is over the ${MAX_DISTANCE_M} m limit.`, o.id);
    }
    if (!Number.isFinite(o.latencyMs) || o.latencyMs < 0 || o.latencyMs > MAX_LATENCY_MS) {
      throw new AlignmentInputError("latencyMs", `Output ${o.id}: latency must be 0…${MAX_LATENCY_MS} ms.`, o.id);
    }
    return { o, distanceM, arrivalMs: (distanceM / c) * 1000 + o.latencyMs };
  });

  const latest = measured.reduce((max, m) => Math.max(max, m.arrivalMs), 0);
  return {
    speedOfSound: c,
    outputs: measured.map(({ o, distanceM, arrivalMs }) => ({
      id: o.id,
      distanceM,
      arrivalMs,
      delayMs: latest - arrivalMs,
      trimDb: o.trimDb,
    })),
  };
}
