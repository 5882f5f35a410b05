import { describe, expect, it } from "vitest";
import { findModelProfile } from "@/lib/devices/model-profiles";
import { checkCapabilities } from "@/lib/zones/config-fits-device";
import { zoneConfig } from "./zone-config-fixture";

// Limits come from the model profiles (lib/devices/model-profiles.ts), which
// the fleet fake enforces the same way (mocks/fleet/store.ts unsupportedReasons).
const twoChannel = findModelProfile("amp-2x60")!; // 12 preset slots, 6 EQ bands, no coaxial/hdmi/usb input, 1 sub out, no line out
const outdoor = findModelProfile("amp-outdoor-2x50")!; // 6 preset slots, 5 EQ bands, inputs analog/network/bluetooth, no sub out

const band = { type: "peaking" as const, frequencyHz: 1000, gainDb: 1, q: 1, enabled: true };

describe("checkCapabilities", () => {
  it("accepts a configuration within every limit (model profile amp-2x60)", () => {
    expect(checkCapabilities(zoneConfig({}, 12), twoChannel)).toEqual([]);
  });

  it("refuses more presets than preset slots, naming both numbers (amp-outdoor-2x50: 6 slots)", () => {
    const problems = checkCapabilities(zoneConfig({ sources: [] }, 7), outdoor);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ code: "preset-slots", requested: 7, allowed: 6 });
    expect(problems[0].message).toBe("7 stream presets, but the Outdoor-rated amplifier, 2 × 50 W has 6 preset slots. Remove 1 preset first.");
  });

  it("allows exactly as many presets as slots (boundary, amp-outdoor-2x50: 6)", () => {
    expect(checkCapabilities(zoneConfig({ sources: [] }, 6), outdoor)).toEqual([]);
  });

  it("refuses a card curve with more bands than the model has, once per curve with every use (amp-2x60: 6)", () => {
    const curve = { id: "c1", name: "Seven bands", bands: Array.from({ length: 7 }, () => band) };
    const config = zoneConfig({
      zoneCurve: null,
      sources: [
        { key: "tv", label: "TV", kind: "optical", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: curve },
        { key: "net", label: "Streaming", kind: "network_stream", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: curve },
      ],
    });
    const problems = checkCapabilities(config, twoChannel);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ code: "eq-bands", requested: 7, allowed: 6, subject: "Tone curve “Seven bands”" });
    expect(problems[0].message).toBe(
      "Tone curve “Seven bands” (used by source “TV”, source “Streaming”) has 7 EQ bands, but the Streaming amplifier, 2 × 60 W has 6.",
    );
  });

  it("counts the zone curve beside each card's curve: both run at once on the device's bands (amp-2x60: 6)", () => {
    const zoneCurve = { id: "z", name: "Room", bands: Array.from({ length: 3 }, () => band) };
    const card = (n: number) => ({ id: `c${n}`, name: `${n} bands`, bands: Array.from({ length: n }, () => band) });
    const source = (curve: ReturnType<typeof card>) => ({ key: "tv", label: "TV", kind: "optical" as const, enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: curve });
    // 3 + 3 = 6 fits exactly (boundary); 3 + 4 = 7 does not.
    expect(checkCapabilities(zoneConfig({ zoneCurve, sources: [source(card(3))] }), twoChannel)).toEqual([]);
    const problems = checkCapabilities(zoneConfig({ zoneCurve, sources: [source(card(4))] }), twoChannel);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ code: "eq-bands", requested: 7, allowed: 6 });
    expect(problems[0].message).toBe(
      "Tone curve “4 bands” (used by source “TV”) has 4 EQ bands; with the zone curve “Room” (3) that makes 7, but the Streaming amplifier, 2 × 60 W has 6.",
    );
  });

  it("allows a zone curve with exactly the model's band count (boundary, amp-2x60: 6) and refuses one more", () => {
    const six = { id: null, name: "Six", bands: Array.from({ length: 6 }, () => band) };
    expect(checkCapabilities(zoneConfig({ zoneCurve: six }), twoChannel)).toEqual([]);
    const seven = { id: null, name: "Seven", bands: Array.from({ length: 7 }, () => band) };
    expect(checkCapabilities(zoneConfig({ zoneCurve: seven }), twoChannel).map((p) => p.subject)).toEqual(["Zone curve “Seven”"]);
  });

  it("refuses a source kind the model has no input for (amp-outdoor-2x50 has no optical)", () => {
    const problems = checkCapabilities(zoneConfig({}, 1), outdoor);
    expect(problems.map((p) => p.code)).toEqual(["input"]);
    expect(problems[0]).toMatchObject({ subject: "Source “TV”", requested: "optical" });
    expect(problems[0].message).toMatch(/needs a Optical input, which the Outdoor-rated amplifier, 2 × 50 W does not have/);
  });

  it("refuses subwoofer outputs and a line out the model does not have (amp-outdoor-2x50: none of either)", () => {
    const output = (id: string, role: "subwoofer" | "line_out") => ({
      id,
      role,
      label: id,
      distance: { value: 2, unit: "m" as const },
      latencyMs: 0,
      trimDb: 0,
      polarityInverted: false,
    });
    const config = zoneConfig({ sources: [], outputLayout: { crossover: null, outputs: [output("sub", "subwoofer"), output("line", "line_out")] } }, 1);
    expect(checkCapabilities(config, outdoor).map((p) => p.code)).toEqual(["subwoofer-outputs", "line-out"]);
  });

  it("lists every problem at once, so one preview says all that must change", () => {
    const curve = { id: null, name: "Big", bands: Array.from({ length: 9 }, () => band) };
    const problems = checkCapabilities(zoneConfig({ zoneCurve: curve }, 8), outdoor);
    expect(problems.map((p) => p.code)).toEqual(["preset-slots", "eq-bands", "input"]);
  });
});
