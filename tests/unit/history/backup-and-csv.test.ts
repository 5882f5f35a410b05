import { describe, expect, it } from "vitest";
import { ACTIVITY_CSV_HEADER, activityCsvRow, csvField } from "@/lib/history/activity-csv";
import { AppError } from "@/lib/errors";
import { backupContentHash, issuePath, migrateV0, parseBackupText } from "@/lib/validation/backup";
import { activityRange, activitySearch } from "@/lib/validation/history";
import { deviceFitProblems } from "@/lib/zones/config-fits-device";
import { findModelProfile } from "@/lib/devices/model-profiles";
import type { ZoneConfig } from "@/lib/validation/zone-config";

// Pure parts of history and backup. Expected values follow our own formats
// (lib/validation/backup.ts header, lib/history/activity-csv.ts) unless a
// source is named beside the check.

const config: ZoneConfig = {
  schema: 1,
  name: "Den",
  volumeCeiling: 70,
  turnOnVolume: 20,
  guestControls: { volume: true, source: true, wake: true, locked: false },
  deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
  zoneCurve: null,
  sources: [{ key: "s1", label: "Streaming", kind: "network_stream", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null }],
  presets: [],
  outputLayout: { crossover: null, outputs: [] },
};

function file(overrides: Record<string, unknown> = {}) {
  const content = {
    schemaVersion: 1 as const,
    home: { id: "0b7c5b8e-4b7b-4a53-9d0f-4a6c1f2f9a10", name: "Test home", householdName: "Test family", city: "", servicePlan: "standard" as const, notes: "" },
    zones: [{ id: "5d0c8f3e-1a2b-4c3d-8e9f-0a1b2c3d4e5f", position: 0, device: null, template: null, overrides: [], revision: null, config: structuredClone(config) }],
    curves: [],
    templates: [],
  };
  return { format: "zonewright-home-backup", createdAt: "2025-05-01T10:00:00.000Z", contentHash: backupContentHash(content), ...content, ...overrides };
}

function refusal(text: string): AppError {
  try {
    parseBackupText(text);
  } catch (error) {
    if (error instanceof AppError) return error;
    throw error;
  }
  throw new Error("expected a refusal");
}

describe("parseBackupText", () => {
  it("accepts a good file and checks its hash", () => {
    const parsed = parseBackupText(JSON.stringify(file()));
    expect(parsed.migratedFrom).toBeNull();
    expect(parsed.backup.zones[0].config.name).toBe("Den");
  });

  it("names bad fields by path, brackets for list positions", () => {
    expect(issuePath(["zones", 3, "config", "sources", 1, "loudnessOffsetDb"])).toBe("zones[3].config.sources[1].loudnessOffsetDb");
    expect(issuePath([])).toBe("(file)");
    const bad = file();
    (bad.zones[0].config.sources[0] as Record<string, unknown>).kind = "cassette";
    const e = refusal(JSON.stringify(bad));
    expect(e.code).toBe("backup:invalid");
    expect(Object.keys(e.fieldErrors!)).toEqual(["zones[0].config.sources[0].kind"]);
  });

  it("refuses truncated JSON, other formats and unknown versions with a reason", () => {
    expect(refusal(JSON.stringify(file()).slice(0, 50)).message).toMatch(/not valid JSON/);
    expect(refusal(JSON.stringify({ ...file(), format: "something-else" })).message).toMatch(/not a Zonewright home backup/);
    const newer = refusal(JSON.stringify({ ...file(), schemaVersion: 7 }));
    expect(newer.code).toBe("backup:unsupported-version");
    expect(newer.message).toMatch(/schema version 7/);
  });

  it("migrates version 0 (volume.{ceiling,turnOn}, offsetDb, exportedAt) to version 1", () => {
    const v0 = {
      format: "zonewright-home-backup",
      schemaVersion: 0,
      exportedAt: "2024-11-02T08:00:00.000Z",
      home: file().home,
      zones: [
        {
          id: file().zones[0].id,
          position: 0,
          device: null,
          config: {
            name: "Den",
            volume: { ceiling: 70, turnOn: 20 },
            guestControls: config.guestControls,
            deviceSettings: config.deviceSettings,
            zoneCurve: null,
            sources: [{ key: "s1", label: "Streaming", kind: "network_stream", enabled: true, offsetDb: -1.5, subsonic: false, toneCurve: null }],
            presets: [],
            outputLayout: config.outputLayout,
          },
        },
      ],
      curves: [],
    };
    const migrated = migrateV0(v0) as { zones: { config: Record<string, unknown> }[]; createdAt: string; templates: unknown[] };
    expect(migrated.createdAt).toBe("2024-11-02T08:00:00.000Z");
    expect(migrated.zones[0].config).toMatchObject({ schema: 1, volumeCeiling: 70, turnOnVolume: 20 });
    expect(migrated.templates).toEqual([]);
    const parsed = parseBackupText(JSON.stringify(v0));
    expect(parsed.migratedFrom).toBe(0);
    expect(parsed.backup.zones[0].config.sources[0].loudnessOffsetDb).toBe(-1.5);
    expect(parsed.backup.contentHash).toBe(backupContentHash(parsed.backup));
  });
});

describe("activity CSV", () => {
  // RFC 4180 §2.6 (fields with line breaks, quotes or commas are enclosed in quotes) and §2.7 (quotes doubled).
  it.each([
    ["plain", "plain"],
    ["a, b", '"a, b"'],
    ['say "hi"', '"say ""hi"""'],
    ["two\nlines", '"two\nlines"'],
    [null, ""],
    [-4, "-4"],
  ])("%j → %s", (value, expected) => {
    expect(csvField(value)).toBe(expected);
  });

  // Common practice, no source (OWASP, "CSV injection"): text a spreadsheet would evaluate gets a leading apostrophe.
  it.each(["=SUM(A1)", "+1", "-cmd", "@x"])("neutralises formula-like text %s", (value) => {
    expect(csvField(value).replace(/^"/, "")).toMatch(/^'/);
  });

  it("writes one row per event, changes as field: before → after", () => {
    expect(ACTIVITY_CSV_HEADER).toHaveLength(8);
    const row = activityCsvRow({
      createdAt: "2025-05-01T10:00:00.000Z",
      actorName: "Theo Banerjee",
      actorRole: "integrator",
      homeName: "Lindqvist residence",
      zoneName: "Patio",
      zoneDeleted: true,
      kind: "zone.restored",
      summary: "Restored “Patio” to revision 1",
      changes: [
        { field: "Zone · Volume ceiling", before: 80, after: 60 },
        { field: "Zone · Tone curve", before: null, after: "“Bright”" },
      ],
    });
    expect(row).toBe(
      "2025-05-01T10:00:00.000Z,Theo Banerjee,integrator,Lindqvist residence,Patio (deleted),zone.restored,Restored “Patio” to revision 1,Zone · Volume ceiling: 80 → 60; Zone · Tone curve: none → “Bright”",
    );
  });
});

describe("activity days and time zones", () => {
  it("turns local days into UTC instants (Date#getTimezoneOffset sign: UTC+2 → -120)", () => {
    const { start, end } = activityRange({ from: "2025-03-01", to: "2025-03-02", tz: -120 });
    expect(start!.toISOString()).toBe("2025-02-28T22:00:00.000Z");
    expect(end!.toISOString()).toBe("2025-03-02T22:00:00.000Z");
    expect(activityRange({ tz: 0 })).toEqual({ start: null, end: null });
  });

  it("builds the same query string on server and client, leaving out defaults", () => {
    expect(activitySearch({ kind: "zone.", page: 1, pageSize: 25, tz: 0 })).toBe("kind=zone.");
    expect(activitySearch({ home: "h", from: "2025-01-01", page: 3, tz: -60 })).toBe("home=h&from=2025-01-01&tz=-60&page=3");
  });
});

describe("deviceFitProblems", () => {
  it("names what a device cannot take (model profiles in lib/devices/model-profiles.ts)", () => {
    const outdoor = findModelProfile("amp-outdoor-2x50")!; // 6 preset slots, 5 bands, no HDMI, no sub out
    const tooMuch: ZoneConfig = {
      ...config,
      sources: [...config.sources, { key: "tv", label: "TV", kind: "hdmi_arc", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null }],
      presets: Array.from({ length: 7 }, (_, i) => ({ key: `p${i}`, name: `Station ${i}`, streamUrl: `https://s.example/${i}`, genre: null, loudnessOffsetDb: 0, toneCurve: null })),
      zoneCurve: { id: null, name: "Busy", bands: Array.from({ length: 6 }, () => ({ type: "peaking" as const, frequencyHz: 1000, gainDb: 1, q: 1, enabled: true })) },
      outputLayout: {
        crossover: null,
        outputs: [{ id: "sub", role: "subwoofer", label: "Sub", distance: { value: 1, unit: "m" }, latencyMs: 0, trimDb: 0, polarityInverted: false }],
      },
    };
    const problems = deviceFitProblems(tooMuch, outdoor);
    expect(problems, problems.join("\n")).toHaveLength(4);
    expect(problems[0]).toMatch(/7 stream presets, but .* has 6 preset slots/);
    expect(problems[1]).toMatch(/zone curve “Busy” has 6 EQ bands, but .* has 5/);
    expect(problems[2]).toMatch(/“TV” needs a HDMI ARC input/);
    expect(problems[3]).toMatch(/1 subwoofer output, but .* has 0/);
    expect(deviceFitProblems(config, outdoor)).toEqual([]);
  });
});
