// The output layout editor in jsdom: delays from distance and latency at
// 343 m/s (dry air, 20 °C — the figure PRODUCT.md gives; about 2.92 ms per
// metre), the latest arrival gets no delay; the device's subwoofer outputs
// limit what can be added; bad values are marked and block saving.
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { SWRConfig } from "swr";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import type { LayoutDto } from "@/db/queries/layout";
import { OutputLayoutEditor } from "@/components/layout/output-layout-editor";
import { fetcher } from "@/lib/fetcher";

vi.mock("next/link", () => ({
  default: ({ href, children, ...rest }: { href: string; children: React.ReactNode }) => (
    <a href={href} {...rest}>
      {children}
    </a>
  ),
}));

const zoneId = "0f0e0d0c-1111-4222-8333-944455556666";

function dto(overrides: Partial<LayoutDto> = {}): LayoutDto {
  return {
    zone: { id: zoneId, name: "Family room", version: 7, homeId: "h1", homeName: "Lindqvist residence", locked: false },
    layout: {
      crossover: { type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 },
      outputs: [
        { id: "main-left", role: "main_left", label: "Left", distance: { value: 3.2, unit: "m" }, latencyMs: 0, trimDb: 0, polarityInverted: false },
        { id: "main-right", role: "main_right", label: "Right", distance: { value: 340, unit: "cm" }, latencyMs: 0, trimDb: 0, polarityInverted: false },
        { id: "sub-1", role: "subwoofer", label: "Subwoofer", distance: { value: 2.1, unit: "m" }, latencyMs: 8, trimDb: -2, polarityInverted: false },
      ],
    },
    profile: { id: "amp-2x60", name: "Streaming amplifier, 2 × 60 W", subwooferOutputs: 1, hasLineOut: false },
    zoneCurve: null,
    may: { edit: true },
    ...overrides,
  };
}

function setup(d = dto()) {
  render(
    <SWRConfig value={{ fetcher, fallback: { [`/api/zones/${zoneId}/layout`]: d }, revalidateOnMount: false, revalidateOnFocus: false, provider: () => new Map() }}>
      <OutputLayoutEditor zoneId={zoneId} />
    </SWRConfig>,
  );
  return userEvent.setup();
}

beforeEach(() => {
  vi.stubGlobal("fetch", vi.fn());
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

const delays = () => within(screen.getByTestId("alignment-table")).getAllByTestId("delay").map((d) => d.textContent);

describe("output layout editor", () => {
  it("computes the delays: the subwoofer (2.1 m + 8 ms) arrives last and gets none", () => {
    setup();
    // Left: 3.2 / 343 s = 9.329 ms; right: 3.4 m (entered as 340 cm) = 9.913 ms; sub: 2.1 / 343 s + 8 ms = 14.122 ms.
    expect(delays()).toEqual(["4.79 ms", "4.21 ms", "0.00 ms"]);
    expect(screen.getByTestId("layout-chart")).toBeTruthy();
    expect(screen.getByTestId("installation-caution").textContent).toMatch(/local codes and licensed practice/);
    expect(screen.getByTestId("layout-caution").textContent).toMatch(/NIOSH/);
    expect(screen.getAllByText("Common practice, no single source").length).toBeGreaterThan(0);
  });

  it("recomputes as a distance changes, in inches too (1 in = 25.4 mm)", async () => {
    const user = setup();
    await user.selectOptions(screen.getByLabelText("Output 3 distance unit"), "in");
    const distance = screen.getByLabelText("Output 3 distance");
    await user.clear(distance);
    await user.type(distance, "200"); // 5.08 m → 14.810 ms + 8 ms = 22.810 ms
    expect(delays()).toEqual(["13.48 ms", "12.90 ms", "0.00 ms"]);
  });

  it("offers no second subwoofer on a device with one subwoofer output, and no line out without one", () => {
    setup();
    expect(screen.getByRole("button", { name: "Add subwoofer" })).toHaveProperty("disabled", true);
    expect(screen.getByRole("button", { name: "Add line out" })).toHaveProperty("disabled", true);
  });

  it("marks a crossover outside 40–250 Hz and a trim above +12 dB, and will not save", async () => {
    const user = setup();
    const xo = screen.getByLabelText("Frequency (Hz)");
    await user.clear(xo);
    await user.type(xo, "300");
    expect(screen.getByText("The crossover is at most 250 Hz.")).toBeTruthy();
    const trim = screen.getByLabelText("Output 1 trim (dB)");
    await user.clear(trim);
    await user.type(trim, "14");
    expect(screen.getByText("A trim is at most +12 dB.")).toBeTruthy();
    expect(screen.getByRole("button", { name: "Save layout" })).toHaveProperty("disabled", true);
  });
});
