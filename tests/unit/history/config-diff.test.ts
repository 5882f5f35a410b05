import { describe, expect, it } from "vitest";
import { diffZoneConfigs, formatBand, movedKeys, summarizeDiff, toAuditChanges } from "@/lib/zones/config-diff";
import { contentHash } from "@/lib/zones/content-hash";
import { zoneConfigSchema, type ZoneConfig } from "@/lib/validation/zone-config";

// Expected values below follow from the definitions in lib/zones/config-diff.ts
// (our own format; no outside source applies). Hash checks follow the canonical
// JSON rule of lib/zones/content-hash.ts.

const dialogue = {
  id: "curve-dialogue",
  name: "TV dialogue lift",
  bands: [
    { type: "peaking" as const, frequencyHz: 2000, gainDb: 3, q: 0.9, enabled: true },
    { type: "lowshelf" as const, frequencyHz: 150, gainDb: -2, q: 0.707, enabled: true },
  ],
};

function base(): ZoneConfig {
  return zoneConfigSchema.parse({
    schema: 1,
    name: "Family room",
    volumeCeiling: 75,
    turnOnVolume: 25,
    guestControls: { volume: true, source: true, wake: true, locked: false },
    deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: true, cecVolume: true, trigger12v: false },
    zoneCurve: null,
    sources: [
      { key: "s-tv", label: "TV", kind: "hdmi_arc", enabled: true, loudnessOffsetDb: -4, subsonic: false, toneCurve: dialogue },
      { key: "s-tt", label: "Turntable", kind: "analog", enabled: true, loudnessOffsetDb: 3, subsonic: true, toneCurve: null },
      { key: "s-st", label: "Streaming", kind: "network_stream", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null },
      { key: "s-ph", label: "Phone", kind: "bluetooth", enabled: true, loudnessOffsetDb: -1.5, subsonic: false, toneCurve: null },
    ],
    presets: [
      { key: "p-1", name: "Harbor Lantern Jazz", streamUrl: "https://stream.example.net/a", genre: "Jazz", loudnessOffsetDb: 0, toneCurve: null },
      { key: "p-2", name: "Quiet Pines Classical", streamUrl: "https://stream.example.net/b", genre: "Classical", loudnessOffsetDb: 1.5, toneCurve: null },
      { key: "p-3", name: "Copper Kettle Folk", streamUrl: "https://stream.example.net/c", genre: "Folk", loudnessOffsetDb: 0, toneCurve: null },
    ],
    outputLayout: {
      crossover: { type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 },
      outputs: [
        { id: "main-left", role: "main_left", label: "Left", distance: { value: 3.2, unit: "m" }, latencyMs: 0, trimDb: 0, polarityInverted: false },
        { id: "sub-1", role: "subwoofer", label: "Subwoofer", distance: { value: 2.1, unit: "m" }, latencyMs: 8, trimDb: -2, polarityInverted: false },
      ],
    },
  });
}

describe("diffZoneConfigs", () => {
  it("finds nothing between a configuration and its deep copy", () => {
    const d = diffZoneConfigs(base(), structuredClone(base()));
    expect(d.identical).toBe(true);
    expect(d.changes).toEqual([]);
    expect(summarizeDiff(d)).toBe("No changes");
  });

  it("reports a changed offset and ceiling field by field, with units", () => {
    const after = base();
    after.volumeCeiling = 70;
    after.sources[0].loudnessOffsetDb = -2.5;
    const d = diffZoneConfigs(base(), after);
    expect(d.changes.map((c) => c.text)).toEqual([
      "Zone: volume ceiling 75 % → 70 %",
      "Source “TV”: loudness offset \u22124 dB → \u22122.5 dB",
    ]);
    expect(d.changes[1]).toMatchObject({ op: "changed", section: "sources", path: "sources[s-tv].loudnessOffsetDb", before: -4, after: -2.5 });
    expect(d.sections).toEqual(["zone", "sources"]);
    expect(summarizeDiff(d)).toBe("2 changes: zone, sources");
  });

  it("matches sources by key, so a rename is one change and not a remove plus an add", () => {
    const after = base();
    after.sources[0].label = "Television";
    const d = diffZoneConfigs(base(), after);
    expect(d.changes).toHaveLength(1);
    expect(d.changes[0].text).toBe("Source “Television”: name “TV” → “Television”");
  });

  it("reports a reorder once, naming the fewest items that moved", () => {
    const after = base();
    const [first, ...rest] = after.presets;
    after.presets = [...rest, first]; // Jazz moved from first to last
    const d = diffZoneConfigs(base(), after);
    expect(d.changes).toHaveLength(1);
    expect(d.changes[0]).toMatchObject({ op: "reordered", path: "presets.order", before: ["p-1", "p-2", "p-3"], after: ["p-2", "p-3", "p-1"] });
    expect(d.changes[0].text).toBe(
      "Stream presets reordered: moved “Harbor Lantern Jazz” (Harbor Lantern Jazz, Quiet Pines Classical, Copper Kettle Folk → Quiet Pines Classical, Copper Kettle Folk, Harbor Lantern Jazz)",
    );
  });

  it("an added or removed item does not count as a reorder of the others", () => {
    const after = base();
    after.sources.splice(1, 1); // Turntable removed
    after.sources.push({ key: "s-usb", label: "Laptop", kind: "usb", enabled: true, loudnessOffsetDb: 1, subsonic: false, toneCurve: null });
    const d = diffZoneConfigs(base(), after);
    expect(d.changes.map((c) => c.op)).toEqual(["removed", "added"]);
    expect(d.changes[0].text).toBe("Source “Turntable” removed (analog, +3 dB, subsonic filter)");
    expect(d.changes[1].text).toBe("Source “Laptop” added at position 4 (usb, +1 dB)");
  });

  it("makes tone-curve band changes readable", () => {
    const after = base();
    after.sources[0].toneCurve = {
      ...dialogue,
      bands: [{ ...dialogue.bands[0], gainDb: 4.5 }, dialogue.bands[1], { type: "highshelf", frequencyHz: 8000, gainDb: -1, q: 0.707, enabled: true }],
    };
    const d = diffZoneConfigs(base(), after);
    expect(d.changes.map((c) => c.text)).toEqual([
      "Source “TV”, tone curve “TV dialogue lift” band 1 (peaking): gain +3 dB → +4.5 dB",
      "Source “TV”, tone curve “TV dialogue lift” band 3 added (high shelf 8 kHz \u22121 dB Q 0.71)",
    ]);
  });

  it("a swapped or detached curve names both sides", () => {
    const after = base();
    after.zoneCurve = { id: "curve-bright", name: "Bright hard-surfaced room", bands: [{ type: "highshelf", frequencyHz: 6000, gainDb: -3, q: 0.707, enabled: true }] };
    after.sources[0].toneCurve = null;
    const d = diffZoneConfigs(base(), after);
    expect(d.changes.map((c) => c.text)).toEqual([
      "Zone: tone curve none → “Bright hard-surfaced room” (high shelf 6 kHz \u22123 dB Q 0.71)",
      "Source “TV”: tone curve “TV dialogue lift” (peaking 2 kHz +3 dB Q 0.9; low shelf 150 Hz \u22122 dB Q 0.71) → none",
    ]);
  });

  it("a renamed library curve with the same bands is one rename", () => {
    const after = base();
    after.sources[0].toneCurve = { ...dialogue, name: "Speech lift" };
    const d = diffZoneConfigs(base(), after);
    expect(d.changes.map((c) => c.text)).toEqual(["Source “TV”: tone curve renamed “TV dialogue lift” → “Speech lift”"]);
  });

  it("covers guest controls, device settings and the output layout", () => {
    const after = base();
    after.guestControls = { ...after.guestControls, wake: false, locked: true };
    after.deviceSettings.standbyMinutes = 45;
    after.deviceSettings.cecPower = false;
    after.outputLayout.crossover = { type: "butterworth", slopeDbPerOctave: 12, frequencyHz: 100 };
    after.outputLayout.outputs[1] = { ...after.outputLayout.outputs[1], distance: { value: 250, unit: "cm" }, trimDb: 1 };
    const texts = diffZoneConfigs(base(), after).changes.map((c) => c.text);
    expect(texts).toEqual([
      "Guest controls: guests may wake the zone allowed → not allowed",
      "Guest controls: lock unlocked → locked",
      "Device settings: standby after 20 min → 45 min",
      "Device settings: HDMI CEC power on → off",
      "Output layout: crossover type Linkwitz-Riley → Butterworth",
      "Output layout: crossover slope 24 dB/octave → 12 dB/octave",
      "Output layout: crossover frequency 80 Hz → 100 Hz",
      "Output “Subwoofer”: distance 2.1 m → 250 cm",
      "Output “Subwoofer”: trim \u22122 dB → +1 dB",
    ]);
  });

  it("can ignore paths and match by another key (for drift and template updates)", () => {
    const after = base();
    after.guestControls.locked = true;
    after.sources = after.sources.map((s) => ({ ...s, key: `other-${s.key}` }));
    after.sources[1].loudnessOffsetDb = 2;
    const d = diffZoneConfigs(base(), after, { ignore: ["guestControls.locked"], sourceKey: (s) => `${s.kind}:${s.label}` });
    expect(d.changes.map((c) => c.text)).toEqual(["Source “Turntable”: loudness offset +3 dB → +2 dB"]);
  });

  it("treats numbers within epsilon as equal (a device may round)", () => {
    const after = base();
    after.sources[3].loudnessOffsetDb = -1.50001;
    expect(diffZoneConfigs(base(), after).identical).toBe(false);
    expect(diffZoneConfigs(base(), after, { epsilon: 0.001 }).identical).toBe(true);
  });

  it("turns a diff into audit field changes with plain values", () => {
    const after = base();
    after.turnOnVolume = 20;
    after.presets.pop();
    const audit = toAuditChanges(diffZoneConfigs(base(), after));
    expect(audit).toEqual([
      { field: "Zone · Turn-on volume", before: 25, after: 20 },
      { field: "Preset “Copper Kettle Folk” (removed)", before: "Folk, 0 dB", after: null },
    ]);
  });
});

describe("movedKeys", () => {
  // Minimal moves = n − length of a longest increasing subsequence (common practice, no source).
  it.each([
    [["a", "b", "c", "d"], ["a", "b", "c", "d"], []],
    [["a", "b", "c", "d"], ["b", "c", "d", "a"], ["a"]],
    [["a", "b", "c", "d"], ["d", "a", "b", "c"], ["d"]],
    [["a", "b", "c", "d"], ["d", "c", "b", "a"], ["d", "c", "b"]], // any three of the four; the last one stays
  ])("%j → %j moves %j", (before, after, moved) => {
    expect(movedKeys(before, after)).toEqual(moved);
  });
});

describe("formatBand", () => {
  it("leaves out gain where the band type has none", () => {
    expect(formatBand({ type: "highpass", frequencyHz: 20, gainDb: 0, q: 0.707, enabled: true })).toBe("high-pass 20 Hz Q 0.71");
    expect(formatBand({ type: "peaking", frequencyHz: 2500, gainDb: -2, q: 1.4, enabled: false })).toBe("peaking 2.5 kHz \u22122 dB Q 1.4 (off)");
  });
});

describe("content hash", () => {
  it("is the same for the same content regardless of key order", () => {
    const config = base();
    // Rebuild every object with its keys in reverse order, all the way down.
    const reverseKeys = (v: unknown): unknown =>
      Array.isArray(v) ? v.map(reverseKeys) : v && typeof v === "object" ? Object.fromEntries(Object.entries(v).reverse().map(([k, x]) => [k, reverseKeys(x)])) : v;
    const deep = reverseKeys(config);
    expect(Object.keys(deep as object)[0]).not.toBe(Object.keys(config)[0]);
    expect(contentHash(deep)).toBe(contentHash(config));
    const changed = base();
    changed.sources[0].loudnessOffsetDb = -4.5;
    expect(contentHash(changed)).not.toBe(contentHash(config));
  });
});
