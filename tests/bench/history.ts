/**
 * History benchmark: `npx tsx tests/bench/history.ts [runs]`
 *
 * Prints medians (figures only; asserts nothing about speed) of:
 *  - the field-by-field diff of two large zone configurations (32 sources,
 *    100 stream presets, a 10-band curve on each, order reversed and every
 *    offset changed) — the worst case a revision compare or a restore preview meets;
 *  - parsing, validating and hash-checking a home backup close to the 5 MB
 *    upload limit (many zones of that size);
 *  - the content hash alone of that file.
 */
import { performance } from "node:perf_hooks";
import { backupContentHash, BACKUP_MAX_BYTES, parseBackupText } from "../../lib/validation/backup";
import type { ZoneConfig } from "../../lib/validation/zone-config";
import { diffZoneConfigs } from "../../lib/zones/config-diff";

const runs = Math.max(1, Number(process.argv.slice(2).find((a) => /^\d+$/.test(a)) ?? 5));

function median(values: number[]) {
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

function time(fn: () => void, n = runs) {
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const t = performance.now();
    fn();
    out.push(performance.now() - t);
  }
  return median(out);
}

const uuid = (i: number, salt: number) => `${salt.toString(16).padStart(8, "0")}-0000-4000-8000-${i.toString(16).padStart(12, "0")}`;

function curve(i: number) {
  return {
    id: uuid(i, 9),
    name: `Curve ${i}`,
    bands: Array.from({ length: 10 }, (_, b) => ({ type: "peaking" as const, frequencyHz: 40 * 2 ** (b / 1.2), gainDb: (b % 5) - 2, q: 1, enabled: true })),
  };
}

function bigConfig(salt: number): ZoneConfig {
  return {
    schema: 1,
    name: `Zone ${salt}`,
    volumeCeiling: 70,
    turnOnVolume: 20,
    guestControls: { volume: true, source: true, wake: true, locked: false },
    deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: true, cecVolume: true, trigger12v: false },
    zoneCurve: curve(0),
    sources: Array.from({ length: 32 }, (_, i) => ({
      key: uuid(i, salt),
      label: `Source ${i}`,
      kind: "analog" as const,
      enabled: true,
      loudnessOffsetDb: (i % 10) - 5,
      subsonic: false,
      toneCurve: curve(i),
    })),
    presets: Array.from({ length: 100 }, (_, i) => ({
      key: uuid(1000 + i, salt),
      name: `Station ${i}`,
      streamUrl: `https://stream.example.net/station-${i}`,
      genre: "Jazz",
      loudnessOffsetDb: 0,
      toneCurve: curve(i % 7),
    })),
    outputLayout: { crossover: { type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 }, outputs: [] },
  };
}

const a = bigConfig(1);
const b = structuredClone(a);
b.sources.reverse();
b.presets.reverse();
for (const s of b.sources) s.loudnessOffsetDb += 0.5;
for (const p of b.presets) if (p.toneCurve) p.toneCurve.bands[3].gainDb += 1;
let changes = 0;
const diffMs = time(() => {
  changes = diffZoneConfigs(a, b).changes.length;
}, runs * 4);
console.log(`diff of two large zone configurations: ${diffMs.toFixed(2)} ms median (${changes} changes found)`);

// A backup close to the upload limit.
const zones: { id: string; position: number; device: null; template: null; overrides: string[]; revision: null; config: ZoneConfig }[] = [];
let content = { schemaVersion: 1 as const, home: { id: uuid(1, 7), name: "Bench home", householdName: "Bench family", city: "", servicePlan: "standard" as const, notes: "" }, zones, curves: [], templates: [] };
let text = "";
for (let i = 0; ; i++) {
  zones.push({ id: uuid(i, 3), position: i, device: null, template: null, overrides: [], revision: null, config: bigConfig(100 + i) });
  const candidate = JSON.stringify({ format: "zonewright-home-backup", createdAt: new Date().toISOString(), contentHash: backupContentHash(content), ...content });
  if (candidate.length > BACKUP_MAX_BYTES * 0.95 || zones.length >= 200) break;
  text = candidate;
}
zones.pop();
content = { ...content, zones };
text = JSON.stringify({ format: "zonewright-home-backup", createdAt: new Date().toISOString(), contentHash: backupContentHash(content), ...content });
const parseMs = time(() => parseBackupText(text));
const hashMs = time(() => backupContentHash(content));
console.log(`parse + validate + verify a ${(text.length / 1024 / 1024).toFixed(2)} MB backup (${zones.length} zones): ${parseMs.toFixed(1)} ms median`);
console.log(`content hash of that backup alone: ${hashMs.toFixed(1)} ms median`);
