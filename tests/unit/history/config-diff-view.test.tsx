import { render, screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { ConfigDiffView } from "@/components/history/config-diff-view";
import { diffZoneConfigs } from "@/lib/zones/config-diff";
import type { ZoneConfig } from "@/lib/validation/zone-config";

// The readable diff: one labelled table per section, before and after with units.

const base: ZoneConfig = {
  schema: 1,
  name: "Kitchen",
  volumeCeiling: 65,
  turnOnVolume: 20,
  guestControls: { volume: true, source: true, wake: true, locked: false },
  deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
  zoneCurve: null,
  sources: [
    { key: "a", label: "Streaming", kind: "network_stream", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null },
    { key: "b", label: "Kitchen radio", kind: "analog", enabled: true, loudnessOffsetDb: 2, subsonic: false, toneCurve: null },
  ],
  presets: [],
  outputLayout: { crossover: null, outputs: [] },
};

describe("ConfigDiffView", () => {
  it("shows each change in its section with before and after", () => {
    const after = structuredClone(base);
    after.volumeCeiling = 58;
    after.sources[1].loudnessOffsetDb = -1;
    render(<ConfigDiffView diff={diffZoneConfigs(base, after)} beforeLabel="Revision 1" afterLabel="Revision 2" />);
    expect(screen.getByText("2 differences")).toBeTruthy();
    const sources = screen.getByRole("region", { name: "Sources" });
    const row = within(sources).getByTestId("diff-row");
    expect(row.getAttribute("data-path")).toBe("sources[b].loudnessOffsetDb");
    expect(within(row).getByTestId("diff-before").textContent).toBe("+2 dB");
    expect(within(row).getByTestId("diff-after").textContent).toContain("\u22121 dB");
    expect(within(sources).getByRole("columnheader", { name: "Revision 2" })).toBeTruthy();
    expect(within(screen.getByRole("region", { name: "Zone" })).getByTestId("diff-after").textContent).toContain("58 %");
  });

  it("says so when there is nothing to show", () => {
    render(<ConfigDiffView diff={diffZoneConfigs(base, structuredClone(base))} />);
    expect(screen.getByTestId("config-diff").textContent).toMatch(/No differences/);
    expect(screen.queryAllByTestId("diff-row")).toHaveLength(0);
  });
});
