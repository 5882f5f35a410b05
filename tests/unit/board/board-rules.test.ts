import { describe, expect, it } from "vitest";
import { accepts } from "@/components/board/drag-model";
import { dropRefusal } from "@/components/board/zone-board";
import { chainBoostDb, clipCaution, formatDb, volumeCeilingCaution } from "@/lib/board/cautions";
import { mergeZones, optimistic } from "@/lib/board/optimistic";
import { curveRefusal, transferRefusal, zoneEditRefusal } from "@/lib/board/rules";
import { board, curves, zone } from "./fixtures";

const peaking = (frequencyHz: number, gainDb: number) => ({ type: "peaking" as const, frequencyHz, gainDb, q: 1, enabled: true });

describe("cautions", () => {
  it("cautions about ceilings above 80 % (threshold: common practice, no source)", () => {
    expect(volumeCeilingCaution(80)).toBeNull();
    expect(volumeCeilingCaution(81)).toMatch(/hearing and speakers/);
    // NIOSH REL: 85 dBA over 8 hours (NIOSH Criteria for a Recommended Standard: Occupational Noise Exposure, 1998; recalled from memory).
    expect(volumeCeilingCaution(95)).toMatch(/85 dBA over 8 hours/);
  });

  it("adds offset and chain boost to the peak (lib/audio/headroom.ts arithmetic)", () => {
    // No clip measured: full scale assumed (common practice, no source): 0 + 3 + 0 = +3 dBTP.
    expect(clipCaution({ loudnessOffsetDb: 3, chainBoostDb: 0, truePeakDbtp: null })).toMatchObject({ predictedPeakDbtp: 3, suggestedPreAttenuationDb: 3, measured: false });
    expect(clipCaution({ loudnessOffsetDb: 0, chainBoostDb: 0, truePeakDbtp: null })).toBeNull();
    // Measured −6 dBTP + 3 dB offset = −3 dBTP: no caution.
    expect(clipCaution({ loudnessOffsetDb: 3, chainBoostDb: 0, truePeakDbtp: -6 })).toBeNull();
    // −1 + 2 + 0.5 = +1.5 dBTP; pre-attenuation rounded up to 0.5 dB steps = 1.5 dB.
    const c = clipCaution({ loudnessOffsetDb: 2, chainBoostDb: 0.5, truePeakDbtp: -1 });
    expect(c).toMatchObject({ measured: true, suggestedPreAttenuationDb: 1.5 });
    expect(c!.predictedPeakDbtp).toBeCloseTo(1.5, 10);
    expect(c!.message).toContain("from its measured clip");
  });

  it("takes the largest boost of zone curve and card curve in series", () => {
    // Peaking band: gain at its centre frequency is its dB gain (Audio EQ Cookbook; W3C Web Audio API, BiquadFilterNode "peaking").
    expect(chainBoostDb(null, [peaking(1000, 6)])).toBeCloseTo(6, 1);
    // Far-apart bands do not stack: still about 6 dB.
    expect(chainBoostDb([peaking(100, 6)], [peaking(8000, 6)])).toBeCloseTo(6, 0);
    // Same frequency in series: dB responses add (cascaded filters multiply), about 3 + 3 = 6 dB.
    expect(chainBoostDb([peaking(1000, 3)], [peaking(1000, 3)])).toBeCloseTo(6, 1);
    // Cuts only: no boost.
    expect(chainBoostDb(null, curves[1].bands)).toBe(0);
    expect(chainBoostDb(null, null)).toBe(0);
  });

  it("formats signed dB", () => {
    expect([formatDb(3), formatDb(-2.5), formatDb(0), formatDb(1.26)]).toEqual(["+3", "−2.5", "0", "+1.3"]);
  });
});

describe("drop rules (mirrors of the server's)", () => {
  const sunroom = zone();
  const full = zone({ id: "5d2e8a10-1111-4a00-8000-000000000002", name: "Porch", presetSlots: 1 });
  const locked = zone({
    id: "5d2e8a10-1111-4a00-8000-000000000003",
    name: "Loft",
    guest: { volume: true, source: true, wake: true, locked: true, lockedAt: "2025-12-03T14:02:00.000Z", lockedByName: "Priya Raman", lockReason: "Complaints" },
  });
  const installer = board({ actor: { name: "Ivo Installer", role: "installer" }, may: { editZone: true, editGuest: true, lock: false, unlock: false, reorderPresets: true } }, [sunroom, full, locked]);
  const integrator = board({}, [sunroom, full, locked]);
  const support = board({ actor: { name: "Sam Support", role: "support" }, may: { editZone: false, editGuest: false, lock: true, unlock: true, reorderPresets: false } }, [sunroom, full, locked]);

  it("a locked zone refuses whoever may not unlock it, with who and why", () => {
    expect(zoneEditRefusal(installer, locked)).toMatch(/Priya Raman locked “Loft”.*Complaints/);
    expect(zoneEditRefusal(integrator, locked)).toBeNull();
    expect(zoneEditRefusal(support, sunroom)).toMatch(/Your role \(Support\) may not change zones/);
  });

  it("a full zone refuses another preset", () => {
    expect(transferRefusal(integrator, sunroom, full, "copy")).toMatch(/“Porch” is full: 1 of 1 preset slots used/);
    expect(transferRefusal(integrator, full, sunroom, "move")).toBeNull();
    expect(transferRefusal(installer, locked, sunroom, "move")).toMatch(/Priya Raman/);
    expect(transferRefusal(installer, locked, sunroom, "copy")).toBeNull();
  });

  it("a curve must fit the device's EQ bands next to the zone curve", () => {
    const withZoneCurve = zone({ toneCurveId: curves[1].id, eqBands: 3 });
    const b = board({}, [withZoneCurve]);
    expect(curveRefusal(b, withZoneCurve, curves[0].id)).toBeNull();
    expect(curveRefusal(b, zone({ toneCurveId: curves[1].id, eqBands: 2 }), curves[0].id)).toMatch(/2 EQ bands; its zone curve uses 2 and this curve needs 1/);
  });

  it("only sensible targets take a drag; refusals come with a reason", () => {
    const source = { kind: "source" as const, id: sunroom.sources[0].id, zoneId: sunroom.id };
    const preset = { kind: "preset" as const, id: sunroom.presets[0].id, zoneId: sunroom.id };
    expect(accepts(source, { kind: "source", id: "x", zoneId: sunroom.id })).toBe(true);
    expect(accepts(source, { kind: "source", id: "x", zoneId: full.id })).toBe(false);
    expect(accepts(source, { kind: "preset", id: "x", zoneId: sunroom.id })).toBe(false);
    expect(accepts(preset, { kind: "preset-list", zoneId: sunroom.id })).toBe(false);
    expect(accepts(preset, { kind: "preset-list", zoneId: full.id })).toBe(true);
    expect(accepts({ kind: "curve", id: curves[0].id }, { kind: "source", id: "x", zoneId: full.id })).toBe(true);
    expect(dropRefusal(integrator, preset, { kind: "preset-list", zoneId: full.id })).toMatch(/full/);
    expect(dropRefusal(installer, { kind: "curve", id: curves[0].id }, { kind: "source", id: "x", zoneId: locked.id })).toMatch(/locked/);
    expect(dropRefusal(integrator, { kind: "curve", id: curves[0].id }, { kind: "source", id: "x", zoneId: locked.id })).toBeNull();
  });
});

describe("optimistic transforms", () => {
  it("reorder, transfer and merge touch only what they name", () => {
    const a = zone({ presets: [...zone().presets, { ...zone().presets[0], id: "p2", name: "Second" }] });
    const b = zone({ id: "z2", name: "Porch", presets: [] });
    const start = board({}, [a, b]);
    const reordered = optimistic.reorderPresets(a.id, ["p2", a.presets[0].id])(start);
    expect(reordered.zones[0].presets.map((p) => p.name)).toEqual(["Second", "Morning Fog Radio"]);
    expect(reordered.zones[1]).toBe(b);
    const moved = optimistic.transferPreset(a.id, "p2", b.id, "move")(start);
    expect(moved.zones[0].presets.map((p) => p.id)).toEqual([a.presets[0].id]);
    expect(moved.zones[1].presets.map((p) => p.name)).toEqual(["Second"]);
    const copied = optimistic.transferPreset(a.id, "p2", b.id, "copy")(start);
    expect(copied.zones[0].presets).toHaveLength(2);
    // An out-of-date id list leaves the order as it was rather than losing cards.
    expect(optimistic.reorderPresets(a.id, ["p2"])(start).zones[0].presets).toHaveLength(2);
    const fresh = { ...b, version: 9 };
    const merged = mergeZones(start, [fresh]);
    expect(merged.zones[0]).toBe(a);
    expect(merged.zones[1].version).toBe(9);
  });
});
