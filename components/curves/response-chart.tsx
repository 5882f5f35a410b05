"use client";
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { formatDb, formatHz, formatHzTick } from "./units";

// A frequency-response plot: log-frequency x axis (20 Hz–20 kHz), dB y axis,
// one line per series. Used by the tone-curve editor (each band + combined)
// and the output layout (branches, sums, tone curve).

export interface ResponseSeries {
  key: string;
  label: string;
  /** dB at each frequency of `frequencies`. */
  values: ArrayLike<number>;
  color: string;
  dashed?: boolean;
  /** Thicker line for the series that matters most. */
  emphasis?: boolean;
}

const TICKS = [20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000];

/** A y range in whole 6 dB steps around the data, at least −12…+12 dB, clipped to `floor`. */
export function yDomainFor(series: readonly ResponseSeries[], floor = -48): [number, number] {
  let lo = -12;
  let hi = 12;
  for (const s of series) {
    for (let i = 0; i < s.values.length; i++) {
      const v = s.values[i]!;
      if (!Number.isFinite(v)) continue;
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  }
  return [Math.max(floor, Math.floor(lo / 6) * 6), Math.ceil(hi / 6) * 6];
}

export function ResponseChart({
  frequencies,
  series,
  label,
  height = 280,
  width,
  yDomain,
  testId = "response-chart",
}: {
  frequencies: ArrayLike<number>;
  series: ResponseSeries[];
  /** Accessible name of the plot, e.g. "Response of Deck speakers". */
  label: string;
  height?: number;
  /** Fixed width (tests); otherwise the chart fills its container. */
  width?: number;
  yDomain?: [number, number];
  testId?: string;
}) {
  const domain = yDomain ?? yDomainFor(series);
  const data = Array.from({ length: frequencies.length }, (_, i) => {
    const point: Record<string, number | null> = { f: frequencies[i]! };
    for (const s of series) {
      const v = s.values[i]!;
      // Below the floor (e.g. a notch's −∞ dB) draws at the floor rather than breaking the line.
      point[s.key] = Number.isFinite(v) ? Math.max(domain[0], Math.min(domain[1], v)) : domain[0];
    }
    return point;
  });
  const chart = (
    <LineChart data={data} width={width} height={width ? height : undefined} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
      <CartesianGrid stroke="#e2e8f0" />
      <XAxis
        dataKey="f"
        type="number"
        scale="log"
        domain={[20, 20000]}
        ticks={TICKS}
        tickFormatter={formatHzTick}
        allowDataOverflow
        unit=" Hz"
        fontSize={12}
      />
      <YAxis domain={domain} unit=" dB" fontSize={12} width={56} allowDataOverflow tickCount={Math.min(11, (domain[1] - domain[0]) / 6 + 1)} />
      <ReferenceLine y={0} stroke="#94a3b8" />
      <Tooltip
        formatter={(value, name) => [typeof value === "number" ? formatDb(value) : String(value), name]}
        labelFormatter={(f) => (typeof f === "number" ? formatHz(Math.round(f)) : String(f))}
      />
      <Legend wrapperStyle={{ fontSize: 12 }} />
      {series.map((s) => (
        <Line
          key={s.key}
          dataKey={s.key}
          name={s.label}
          stroke={s.color}
          strokeWidth={s.emphasis ? 2.5 : 1.25}
          strokeDasharray={s.dashed ? "4 3" : undefined}
          dot={false}
          isAnimationActive={false}
          type="monotone"
        />
      ))}
    </LineChart>
  );
  return (
    <figure role="img" aria-label={label} data-testid={testId} className="w-full">
      {width ? chart : <ResponsiveContainer width="100%" height={height}>{chart}</ResponsiveContainer>}
    </figure>
  );
}
