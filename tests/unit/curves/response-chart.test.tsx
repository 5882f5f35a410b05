// The shared response plot (components/curves/response-chart.tsx): a
// log-frequency x axis from 20 Hz to 20 kHz with decade ticks, a dB y axis
// that always shows at least ±12 dB in 6 dB steps, one line per series.
import { render, screen, waitFor } from "@testing-library/react";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { ResponseChart, yDomainFor } from "@/components/curves/response-chart";
import { formatHzTick } from "@/components/curves/units";
import { curveResponse, logFrequencyGrid } from "@/lib/audio/tone-curve";

beforeEach(() => {
  vi.stubGlobal(
    "ResizeObserver",
    class {
      observe() {}
      unobserve() {}
      disconnect() {}
    },
  );
});
afterEach(() => vi.unstubAllGlobals());

describe("response chart", () => {
  it("draws each series as a line on a log-frequency axis with decade ticks", async () => {
    const grid = logFrequencyGrid(20, 20_000, 12);
    const band = curveResponse([{ type: "peaking", frequencyHz: 1000, gainDb: 6, q: 1 }], 48_000, grid);
    render(
      <ResponseChart
        width={600}
        frequencies={Array.from(grid)}
        label="Test plot"
        series={[
          { key: "b0", label: "Band 1", values: band, color: "#888", dashed: true },
          { key: "combined", label: "Combined", values: band, color: "#0e8572", emphasis: true },
        ]}
      />,
    );
    const figure = screen.getByRole("img", { name: "Test plot" });
    // recharts lays out its axes and lines after the first render.
    await waitFor(() => expect(figure.querySelectorAll(".recharts-line")).toHaveLength(2));
    const tickX = Array.from(figure.querySelectorAll(".recharts-xAxis-tick-lines line")).map((l) => Number(l.getAttribute("x1")));
    expect(tickX).toHaveLength(10); // 20, 50, 100, 200, 500 Hz, 1, 2, 5, 10, 20 kHz
    // On a log axis each decade spans the same width: 20 → 200 Hz equals 2 → 20 kHz, and 20 Hz → 20 kHz is three of them.
    const [f20, , , f200, , , f2k, , , f20k] = tickX as [number, number, number, number, number, number, number, number, number, number];
    expect(Math.abs(f200 - f20 - (f20k - f2k))).toBeLessThan(0.5);
    expect(Math.abs(f20k - f20 - 3 * (f200 - f20))).toBeLessThan(0.5);
    expect(formatHzTick(20)).toBe("20");
    expect(formatHzTick(20_000)).toBe("20k");
  });

  it("chooses a dB range in 6 dB steps around the data, never narrower than ±12 dB", () => {
    expect(yDomainFor([{ key: "a", label: "a", color: "#000", values: [0, 3, -2] }])).toEqual([-12, 12]);
    expect(yDomainFor([{ key: "a", label: "a", color: "#000", values: [13, -19] }])).toEqual([-24, 18]);
    // A notch's −∞ is ignored; very deep cuts stop at the floor.
    expect(yDomainFor([{ key: "a", label: "a", color: "#000", values: [-Infinity, -90, 1] }])).toEqual([-48, 12]);
  });
});
