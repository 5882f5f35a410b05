import { describe, expect, it } from "vitest";
import { zoneConfigSchema, type ZoneConfig } from "@/lib/validation/zone-config";
import {
  addOverrides,
  isOverridden,
  mergeTemplateIntoZone,
  overridePathsForEdit,
  sourceSlots,
  templateConfigFromZone,
} from "@/lib/zones/template-merge";

// The rules checked here are our own design (lib/zones/template-merge.ts, header
// comment): no outside source applies — common practice, no source.

function config(patch: Partial<ZoneConfig> = {}): ZoneConfig {
  return zoneConfigSchema.parse({
    schema: 1,
    name: "Patio",
    volumeCeiling: 60,
    turnOnVolume: 20,
    guestControls: { volume: true, source: true, wake: false, locked: false },
    deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
    zoneCurve: { id: "c1", name: "Outdoor lift", bands: [{ type: "lowshelf", frequencyHz: 120, gainDb: 4, q: 0.707 }] },
    sources: [
      { key: "s-stream", label: "Streaming", kind: "network_stream", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null },
      { key: "s-phone", label: "Guest phone", kind: "bluetooth", enabled: true, loudnessOffsetDb: -2, subsonic: false, toneCurve: null },
    ],
    presets: [
      { key: "p1", name: "Velvet Hour Soul", streamUrl: "https://s.example/velvet", genre: "Soul", loudnessOffsetDb: 0, toneCurve: null },
      { key: "p2", name: "Tidepool Ambient", streamUrl: "https://s.example/tidepool", genre: "Ambient", loudnessOffsetDb: 2, toneCurve: null },
    ],
    outputLayout: { crossover: null, outputs: [] },
    ...patch,
  });
}

describe("source slots", () => {
  it("match by kind, numbering repeats", () => {
    expect(sourceSlots([{ kind: "analog" }, { kind: "usb" }, { kind: "analog" }])).toEqual(["analog", "usb", "analog#2"]);
  });
});

describe("override paths", () => {
  it("a path covers the fields beneath it", () => {
    expect(isOverridden("sources[bluetooth].label", ["sources"])).toBe(true);
    expect(isOverridden("sources[bluetooth].label", ["sources[bluetooth]"])).toBe(true);
    expect(isOverridden("guestControls.volume", ["guestControls"])).toBe(true);
    expect(isOverridden("volumeCeiling", ["volume"])).toBe(false);
    expect(isOverridden("presets[https://a].name", ["presets.order"])).toBe(false);
  });

  it("adding does not repeat covered paths", () => {
    expect(addOverrides(["sources"], ["sources[usb].label", "volumeCeiling", "volumeCeiling"])).toEqual(["sources", "volumeCeiling"]);
  });
});

describe("merging a template version into a zone", () => {
  it("identical configs change nothing", () => {
    const zone = config();
    const r = mergeTemplateIntoZone({ template: templateConfigFromZone(zone, "T"), zone, overrides: [], guestLocked: false });
    expect(r.changes).toEqual([]);
    expect(r.kept).toEqual([]);
    expect(r.config.name).toBe("Patio");
    // Zone rows keep their own keys, so the writer updates rather than recreates them.
    expect(r.config.sources.map((s) => s.key)).toEqual(["s-stream", "s-phone"]);
  });

  it("takes new template values field by field", () => {
    const zone = config();
    const template = templateConfigFromZone(config({ volumeCeiling: 55 }), "T");
    template.sources[1].loudnessOffsetDb = -3;
    const r = mergeTemplateIntoZone({ template, zone, overrides: [], guestLocked: false });
    expect(r.changes).toEqual([
      { path: "volumeCeiling", label: "Volume ceiling (%)", before: 60, after: 55 },
      { path: "sources[bluetooth].loudnessOffsetDb", label: "Source “Guest phone” (Bluetooth): loudness offset", before: -2, after: -3 },
    ]);
    expect(r.config.volumeCeiling).toBe(55);
    expect(r.config.sources[1]).toMatchObject({ key: "s-phone", loudnessOffsetDb: -3 });
  });

  it("keeps what the zone overrides and says which", () => {
    const zone = config({ volumeCeiling: 50 });
    zone.sources[0].label = "Music";
    const template = templateConfigFromZone(config({ volumeCeiling: 58, turnOnVolume: 18 }), "T");
    const r = mergeTemplateIntoZone({ template, zone, overrides: ["volumeCeiling", "sources[network_stream].label"], guestLocked: false });
    expect(r.config.volumeCeiling).toBe(50);
    expect(r.config.turnOnVolume).toBe(18);
    expect(r.config.sources[0].label).toBe("Music");
    expect(r.kept.map((k) => [k.path, k.reason, k.zoneValue, k.templateValue])).toEqual([
      ["volumeCeiling", "override", 50, 58],
      ["sources[network_stream].label", "override", "Music", "Streaming"],
    ]);
    expect(r.changes.map((c) => c.path)).toEqual(["turnOnVolume"]);
  });

  it("never touches guest controls locked by support, nor the lock itself", () => {
    const zone = config({ guestControls: { volume: false, source: true, wake: false, locked: true } });
    const template = templateConfigFromZone(config({ guestControls: { volume: true, source: true, wake: true, locked: false } }), "T");
    const r = mergeTemplateIntoZone({ template, zone, overrides: [], guestLocked: true });
    expect(r.config.guestControls).toEqual({ volume: false, source: true, wake: false, locked: true });
    expect(r.kept.filter((k) => k.reason === "locked").map((k) => k.path)).toEqual(["guestControls.volume", "guestControls.wake"]);
    expect(r.changes).toEqual([]);
  });

  it("adds a template source and keeps a zone's own source", () => {
    const zone = config();
    zone.sources.push({ key: "s-usb", label: "Laptop", kind: "usb", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null });
    const template = templateConfigFromZone(config(), "T");
    template.sources.splice(1, 0, { key: "analog", label: "Radio", kind: "analog", enabled: true, loudnessOffsetDb: 1, subsonic: false, toneCurve: null });
    const r = mergeTemplateIntoZone({ template, zone, overrides: [], guestLocked: false });
    expect(r.config.sources.map((s) => [s.key, s.label])).toEqual([
      ["s-stream", "Streaming"],
      ["new:analog", "Radio"],
      ["s-phone", "Guest phone"],
      ["s-usb", "Laptop"],
    ]);
    expect(r.changes.map((c) => c.path)).toEqual(["sources[analog]"]);
    expect(r.kept).toEqual([expect.objectContaining({ path: "sources[usb]", reason: "local-only" })]);
  });

  it("does not re-add a source the zone removed on purpose", () => {
    const zone = config();
    zone.sources.pop();
    const r = mergeTemplateIntoZone({ template: templateConfigFromZone(config(), "T"), zone, overrides: ["sources[bluetooth]"], guestLocked: false });
    expect(r.config.sources).toHaveLength(1);
    expect(r.kept[0]).toMatchObject({ path: "sources[bluetooth]", reason: "override" });
  });

  it("keeps the household's station order but still updates a station's offset and adds new stations at the end", () => {
    const zone = config();
    zone.presets.reverse();
    const template = templateConfigFromZone(config(), "T");
    template.presets[0].loudnessOffsetDb = -1;
    template.presets.push({ key: "p3", name: "Copper Kettle Folk", streamUrl: "https://s.example/copper", genre: "Folk", loudnessOffsetDb: 0, toneCurve: null });
    const r = mergeTemplateIntoZone({ template, zone, overrides: ["presets.order"], guestLocked: false });
    expect(r.config.presets.map((p) => p.name)).toEqual(["Tidepool Ambient", "Velvet Hour Soul", "Copper Kettle Folk"]);
    expect(r.config.presets[1].loudnessOffsetDb).toBe(-1);
    expect(r.kept.map((k) => k.path)).toEqual(["presets.order"]);
    expect(r.changes.map((c) => c.path)).toEqual(["presets[https://s.example/velvet].loudnessOffsetDb", "presets[https://s.example/copper]"]);
  });

  it("without an order override the template's station order wins", () => {
    const zone = config();
    zone.presets.reverse();
    const r = mergeTemplateIntoZone({ template: templateConfigFromZone(config(), "T"), zone, overrides: [], guestLocked: false });
    expect(r.config.presets.map((p) => p.name)).toEqual(["Velvet Hour Soul", "Tidepool Ambient"]);
    expect(r.changes).toEqual([
      { path: "presets.order", label: "Order of favourite stations", before: ["Tidepool Ambient", "Velvet Hour Soul"], after: ["Velvet Hour Soul", "Tidepool Ambient"] },
    ]);
  });

  it("shows curves by name in the preview", () => {
    const template = templateConfigFromZone(config({ zoneCurve: null }), "T");
    const r = mergeTemplateIntoZone({ template, zone: config(), overrides: [], guestLocked: false });
    expect(r.changes).toEqual([{ path: "zoneCurve", label: "Zone tone curve", before: "Outdoor lift", after: null }]);
  });
});

describe("making a template from a zone", () => {
  it("keys sources by slot and stations by position, and never carries a lock", () => {
    const t = templateConfigFromZone(config({ guestControls: { volume: true, source: true, wake: true, locked: true } }), "Outdoor pair");
    expect(t.name).toBe("Outdoor pair");
    expect(t.guestControls.locked).toBe(false);
    expect(t.sources.map((s) => s.key)).toEqual(["network_stream", "bluetooth"]);
    expect(t.presets.map((p) => p.key)).toEqual(["preset-1", "preset-2"]);
  });
});

describe("override paths implied by a direct edit", () => {
  it("lists the edited fields, removed stations included", () => {
    const before = config();
    const after = config({ volumeCeiling: 52 });
    after.presets = after.presets.slice(1);
    expect(overridePathsForEdit(before, after)).toEqual(["volumeCeiling", "presets[https://s.example/velvet]"]);
  });
});
