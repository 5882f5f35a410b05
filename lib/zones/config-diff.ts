import type { ConfigBand, ZoneConfig } from "@/lib/validation/zone-config";

// Pure, field-by-field difference between two zone configurations, readable by
// people. Used to compare revisions, preview restores and backups, and later
// for drift (reported vs desired) and template updates. Lists are matched by
// identity, not by position: sources and presets by `key`, outputs by `id`, so
// a moved item shows up as a reorder, not as a change of every row below it.

export type DiffSection = "zone" | "guestControls" | "deviceSettings" | "zoneCurve" | "sources" | "presets" | "outputLayout";
export type DiffOp = "changed" | "added" | "removed" | "reordered";

export interface ConfigChange {
  op: DiffOp;
  section: DiffSection;
  /** Stable machine path: "sources[<key>].loudnessOffsetDb", "outputLayout.outputs[sub-1].trimDb". */
  path: string;
  /** Who the change is about, for people: "Zone", "Source “TV”", "Output “Subwoofer”". */
  subject: string;
  /** The field, for people: "Loudness offset" (for added/removed items: the item kind). */
  field: string;
  before: unknown;
  after: unknown;
  /** `before`/`after` with units ("−4 dB", "allowed", "none"). */
  beforeText: string;
  afterText: string;
  /** One readable line. */
  text: string;
}

export interface ConfigDiff {
  identical: boolean;
  changes: ConfigChange[];
  counts: Record<DiffOp, number>;
  /** Sections that changed, in display order. */
  sections: DiffSection[];
}

type Source = ZoneConfig["sources"][number];
type Preset = ZoneConfig["presets"][number];
type Output = ZoneConfig["outputLayout"]["outputs"][number];
type Curve = NonNullable<ZoneConfig["zoneCurve"]>;

export interface DiffOptions {
  /** How sources are matched across the two sides (default: `key`). Template updates match by label and kind. */
  sourceKey?: (source: Source) => string;
  /** How presets are matched (default: `key`). */
  presetKey?: (preset: Preset) => string;
  /** Paths (or path prefixes ending in "." or "[") to leave out, e.g. "guestControls.locked", "name". */
  ignore?: string[];
  /** Numbers closer than this count as equal (reported values may be rounded by a device). Default 1e-9. */
  epsilon?: number;
}

export const sectionLabels: Record<DiffSection, string> = {
  zone: "Zone",
  guestControls: "Guest controls",
  deviceSettings: "Device settings",
  zoneCurve: "Zone tone curve",
  sources: "Sources",
  presets: "Stream presets",
  outputLayout: "Output layout",
};

const sectionOrder: DiffSection[] = ["zone", "guestControls", "deviceSettings", "zoneCurve", "sources", "presets", "outputLayout"];

// ── Formatting ──────────────────────────────────────────────────────────────

const MINUS = "\u2212";

function num(n: number, maxDigits = 2): string {
  const s = Number.isInteger(n) ? String(n) : String(Number(n.toFixed(maxDigits)));
  return s.replace("-", MINUS);
}

export function formatDb(v: unknown): string {
  if (typeof v !== "number") return formatValue(v);
  const sign = v > 0 ? "+" : "";
  return `${sign}${num(v)} dB`;
}

export function formatHz(v: unknown): string {
  if (typeof v !== "number") return formatValue(v);
  return v >= 1000 ? `${num(v / 1000, 3)} kHz` : `${num(v, 1)} Hz`;
}

const withUnit = (unit: string) => (v: unknown) => (typeof v === "number" ? `${num(v)} ${unit}` : formatValue(v));
const onOff = (v: unknown) => (v === true ? "on" : v === false ? "off" : formatValue(v));
const allowed = (v: unknown) => (v === true ? "allowed" : v === false ? "not allowed" : formatValue(v));
const quoted = (v: unknown) => (typeof v === "string" ? `“${v}”` : formatValue(v));

export function formatValue(v: unknown): string {
  if (v === null || v === undefined) return "none";
  if (typeof v === "string") return v === "" ? "(empty)" : v;
  if (typeof v === "number") return num(v);
  if (typeof v === "boolean") return v ? "yes" : "no";
  return JSON.stringify(v);
}

const bandTypeLabels: Record<string, string> = {
  peaking: "peaking",
  lowshelf: "low shelf",
  highshelf: "high shelf",
  highpass: "high-pass",
  lowpass: "low-pass",
  notch: "notch",
};

export function formatBand(b: ConfigBand): string {
  const type = bandTypeLabels[b.type] ?? b.type;
  const gain = b.type === "highpass" || b.type === "lowpass" || b.type === "notch" ? "" : ` ${formatDb(b.gainDb)}`;
  const off = b.enabled === false ? " (off)" : "";
  return `${type} ${formatHz(b.frequencyHz)}${gain} Q ${num(b.q)}${off}`;
}

export function formatCurve(c: Curve | null | undefined): string {
  if (!c) return "none";
  const bands = c.bands.length === 0 ? "no bands" : c.bands.map(formatBand).join("; ");
  return `“${c.name}” (${bands})`;
}

const slopeLabel = (v: unknown) => (typeof v === "number" ? `${v} dB/octave` : formatValue(v));
const crossoverTypeLabel = (v: unknown) =>
  v === "linkwitz_riley" ? "Linkwitz-Riley" : v === "butterworth" ? "Butterworth" : formatValue(v);
const roleLabel = (v: unknown) =>
  ({ main_left: "main left", main_right: "main right", subwoofer: "subwoofer", line_out: "line out" })[String(v)] ?? formatValue(v);
const distanceLabel = (v: unknown) => {
  const d = v as { value?: unknown; unit?: unknown } | null;
  return d && typeof d.value === "number" ? `${num(d.value)} ${String(d.unit)}` : formatValue(v);
};

interface FieldSpec {
  label: string;
  format?: (v: unknown) => string;
}

const zoneFields: Record<string, FieldSpec> = {
  schema: { label: "Configuration schema" },
  name: { label: "Name", format: quoted },
  volumeCeiling: { label: "Volume ceiling", format: withUnit("%") },
  turnOnVolume: { label: "Turn-on volume", format: withUnit("%") },
};
const guestFields: Record<string, FieldSpec> = {
  volume: { label: "Guests may change volume", format: allowed },
  source: { label: "Guests may switch source", format: allowed },
  wake: { label: "Guests may wake the zone", format: allowed },
  locked: { label: "Lock", format: (v) => (v === true ? "locked" : v === false ? "unlocked" : formatValue(v)) },
};
const deviceFields: Record<string, FieldSpec> = {
  standbyMinutes: { label: "Standby after", format: withUnit("min") },
  displayBrightness: { label: "Display brightness", format: withUnit("%") },
  cecPower: { label: "HDMI CEC power", format: onOff },
  cecVolume: { label: "HDMI CEC volume", format: onOff },
  trigger12v: { label: "12 V trigger", format: onOff },
};
const sourceFields: Record<string, FieldSpec> = {
  label: { label: "Name", format: quoted },
  kind: { label: "Input" },
  enabled: { label: "Shown to the household", format: (v) => (v === true ? "shown" : v === false ? "hidden" : formatValue(v)) },
  loudnessOffsetDb: { label: "Loudness offset", format: formatDb },
  subsonic: { label: "Subsonic filter", format: onOff },
};
const presetFields: Record<string, FieldSpec> = {
  name: { label: "Name", format: quoted },
  streamUrl: { label: "Stream URL" },
  genre: { label: "Genre" },
  loudnessOffsetDb: { label: "Loudness offset", format: formatDb },
};
const crossoverFields: Record<string, FieldSpec> = {
  type: { label: "Crossover type", format: crossoverTypeLabel },
  slopeDbPerOctave: { label: "Crossover slope", format: slopeLabel },
  frequencyHz: { label: "Crossover frequency", format: formatHz },
};
const outputFields: Record<string, FieldSpec> = {
  role: { label: "Role", format: roleLabel },
  label: { label: "Name", format: quoted },
  distance: { label: "Distance", format: distanceLabel },
  latencyMs: { label: "Processing latency", format: withUnit("ms") },
  trimDb: { label: "Trim", format: formatDb },
  polarityInverted: { label: "Polarity", format: (v) => (v === true ? "inverted" : v === false ? "normal" : formatValue(v)) },
};
const bandFields: Record<string, FieldSpec> = {
  type: { label: "type", format: (v) => bandTypeLabels[String(v)] ?? formatValue(v) },
  frequencyHz: { label: "frequency", format: formatHz },
  gainDb: { label: "gain", format: formatDb },
  q: { label: "Q", format: (v) => (typeof v === "number" ? num(v) : formatValue(v)) },
  enabled: { label: "enabled", format: onOff },
};

// ── Engine ──────────────────────────────────────────────────────────────────

class Collector {
  readonly changes: ConfigChange[] = [];
  constructor(private readonly options: Required<Pick<DiffOptions, "ignore" | "epsilon">>) {}

  ignored(path: string): boolean {
    return this.options.ignore.some((p) => path === p || ((p.endsWith(".") || p.endsWith("[")) && path.startsWith(p)) || path.startsWith(`${p}.`) || path.startsWith(`${p}[`));
  }

  equal(a: unknown, b: unknown): boolean {
    if (typeof a === "number" && typeof b === "number") return a === b || Math.abs(a - b) <= this.options.epsilon;
    if (a === b) return true;
    if (a === null || b === null || typeof a !== "object" || typeof b !== "object") return false;
    if (Array.isArray(a) !== Array.isArray(b)) return false;
    if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((x, i) => this.equal(x, b[i]));
    const ka = Object.keys(a as object).filter((k) => (a as Record<string, unknown>)[k] !== undefined);
    const kb = Object.keys(b as object).filter((k) => (b as Record<string, unknown>)[k] !== undefined);
    if (ka.length !== kb.length) return false;
    return ka.every((k) => this.equal((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
  }

  push(change: Omit<ConfigChange, "text"> & { text?: string }) {
    if (this.ignored(change.path)) return;
    const text =
      change.text ??
      (change.op === "changed"
        ? `${change.subject}: ${lowerFirst(change.field)} ${change.beforeText} → ${change.afterText}`
        : `${change.subject} ${change.op}`);
    this.changes.push({ ...change, text });
  }

  /** Compare the scalar fields of two records; unknown extra fields are compared too. */
  fields(
    section: DiffSection,
    subject: string,
    base: string,
    before: Record<string, unknown>,
    after: Record<string, unknown>,
    specs: Record<string, FieldSpec>,
    skip: string[] = [],
  ) {
    const keys = [...new Set([...Object.keys(specs), ...Object.keys(before), ...Object.keys(after)])].filter((k) => !skip.includes(k));
    for (const key of keys) {
      const a = before[key];
      const b = after[key];
      if (a === undefined && b === undefined) continue;
      if (this.equal(a, b)) continue;
      const spec = specs[key] ?? { label: key };
      const fmt = spec.format ?? formatValue;
      this.push({
        op: "changed",
        section,
        path: `${base}${key}`,
        subject,
        field: spec.label,
        before: a ?? null,
        after: b ?? null,
        beforeText: fmt(a ?? null),
        afterText: fmt(b ?? null),
      });
    }
  }

  curve(section: DiffSection, subject: string, path: string, before: Curve | null | undefined, after: Curve | null | undefined) {
    const a = before ?? null;
    const b = after ?? null;
    if (!a && !b) return;
    if (this.ignored(path)) return;
    if (!a || !b) {
      this.push({
        op: "changed",
        section,
        path,
        subject,
        field: "Tone curve",
        before: a,
        after: b,
        beforeText: formatCurve(a),
        afterText: formatCurve(b),
      });
      return;
    }
    const swapped = a.id !== b.id || a.name !== b.name;
    if (swapped) {
      this.push({
        op: "changed",
        section,
        path: `${path}.name`,
        subject,
        field: "Tone curve",
        before: { id: a.id, name: a.name },
        after: { id: b.id, name: b.name },
        beforeText: `“${a.name}”`,
        afterText: `“${b.name}”`,
        text:
          a.id === b.id
            ? `${subject}: tone curve renamed “${a.name}” → “${b.name}”`
            : a.name === b.name
              ? `${subject}: tone curve “${a.name}” now refers to another library curve of that name`
              : `${subject}: tone curve “${a.name}” → “${b.name}”`,
      });
    }
    // Bands are ordered and have no identity of their own: compare by position.
    const n = Math.max(a.bands.length, b.bands.length);
    for (let i = 0; i < n; i++) {
      const ba = a.bands[i];
      const bb = b.bands[i];
      const bandPath = `${path}.bands[${i}]`;
      const bandSubject = `${subject}, tone curve “${b.name}” band ${i + 1}`;
      if (ba && !bb) {
        this.push({
          op: "removed",
          section,
          path: bandPath,
          subject: bandSubject,
          field: "Band",
          before: ba,
          after: null,
          beforeText: formatBand(ba),
          afterText: "none",
          text: `${bandSubject} removed (${formatBand(ba)})`,
        });
      } else if (!ba && bb) {
        this.push({
          op: "added",
          section,
          path: bandPath,
          subject: bandSubject,
          field: "Band",
          before: null,
          after: bb,
          beforeText: "none",
          afterText: formatBand(bb),
          text: `${bandSubject} added (${formatBand(bb)})`,
        });
      } else if (ba && bb) {
        this.fields(section, `${bandSubject} (${bandTypeLabels[bb.type] ?? bb.type})`, `${bandPath}.`, { ...ba }, { ...bb }, bandFields);
      }
    }
  }

  /** Keyed list: removed, added, changed items, then one reorder entry if the common items moved. */
  list<T>({
    section,
    path,
    noun,
    before,
    after,
    keyOf,
    labelOf,
    describe,
    compare,
  }: {
    section: DiffSection;
    path: string;
    noun: string;
    before: T[];
    after: T[];
    keyOf: (item: T) => string;
    labelOf: (item: T) => string;
    describe: (item: T) => string;
    compare: (subject: string, base: string, a: T, b: T) => void;
  }) {
    const beforeMap = new Map(before.map((x) => [keyOf(x), x] as const));
    const afterMap = new Map(after.map((x) => [keyOf(x), x] as const));
    const cap = noun.charAt(0).toUpperCase() + noun.slice(1);
    for (const item of before) {
      const key = keyOf(item);
      if (afterMap.has(key)) continue;
      const subject = `${cap} “${labelOf(item)}”`;
      this.push({
        op: "removed",
        section,
        path: `${path}[${key}]`,
        subject,
        field: cap,
        before: item,
        after: null,
        beforeText: describe(item),
        afterText: "none",
        text: `${subject} removed (${describe(item)})`,
      });
    }
    for (const [index, item] of after.entries()) {
      const key = keyOf(item);
      if (beforeMap.has(key)) continue;
      const subject = `${cap} “${labelOf(item)}”`;
      this.push({
        op: "added",
        section,
        path: `${path}[${key}]`,
        subject,
        field: cap,
        before: null,
        after: item,
        beforeText: "none",
        afterText: describe(item),
        text: `${subject} added at position ${index + 1} (${describe(item)})`,
      });
    }
    for (const item of after) {
      const key = keyOf(item);
      const old = beforeMap.get(key);
      if (old === undefined) continue;
      compare(`${cap} “${labelOf(item)}”`, `${path}[${key}]`, old, item);
    }
    const commonBefore = before.map(keyOf).filter((k) => afterMap.has(k));
    const commonAfter = after.map(keyOf).filter((k) => beforeMap.has(k));
    if (commonBefore.some((k, i) => k !== commonAfter[i])) {
      const moved = movedKeys(commonBefore, commonAfter);
      const beforeLabels = commonBefore.map((k) => labelOf(beforeMap.get(k)!));
      const afterLabels = commonAfter.map((k) => labelOf(afterMap.get(k)!));
      const movedLabels = moved.map((k) => `“${labelOf(afterMap.get(k)!)}”`);
      this.push({
        op: "reordered",
        section,
        path: `${path}.order`,
        subject: sectionLabels[section],
        field: "Order",
        before: commonBefore,
        after: commonAfter,
        beforeText: beforeLabels.join(", "),
        afterText: afterLabels.join(", "),
        text: `${sectionLabels[section]} reordered: moved ${movedLabels.join(", ")} (${beforeLabels.join(", ")} → ${afterLabels.join(", ")})`,
      });
    }
  }
}

function lowerFirst(s: string) {
  // Keep acronyms and units ("HDMI CEC power", "12 V trigger", "Q") as written.
  if (/^[A-Z0-9]{2,}/.test(s) || /^\d/.test(s) || s.length === 1) return s;
  return s.charAt(0).toLowerCase() + s.slice(1);
}

/**
 * The fewest items that must move to turn one order into the other: everything
 * outside a longest increasing subsequence of the old positions.
 */
export function movedKeys(before: string[], after: string[]): string[] {
  const pos = new Map(before.map((k, i) => [k, i] as const));
  const seq = after.map((k) => pos.get(k)!);
  // Patience sorting, O(n log n), with back-pointers to recover one LIS.
  const tails: number[] = [];
  const tailIdx: number[] = [];
  const prev: number[] = new Array(seq.length).fill(-1);
  for (let i = 0; i < seq.length; i++) {
    let lo = 0;
    let hi = tails.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (tails[mid] < seq[i]) lo = mid + 1;
      else hi = mid;
    }
    tails[lo] = seq[i];
    tailIdx[lo] = i;
    prev[i] = lo > 0 ? tailIdx[lo - 1] : -1;
  }
  const keep = new Set<number>();
  for (let i = tailIdx[tails.length - 1] ?? -1; i >= 0; i = prev[i]) keep.add(i);
  return after.filter((_, i) => !keep.has(i));
}

const describeSource = (s: Source) =>
  `${s.kind.replace(/_/g, " ")}, ${formatDb(s.loudnessOffsetDb)}${s.enabled ? "" : ", hidden"}${s.subsonic ? ", subsonic filter" : ""}${s.toneCurve ? `, curve “${s.toneCurve.name}”` : ""}`;
const describePreset = (p: Preset) => `${p.genre ?? "no genre"}, ${formatDb(p.loudnessOffsetDb)}${p.toneCurve ? `, curve “${p.toneCurve.name}”` : ""}`;
const describeOutput = (o: Output) =>
  `${roleLabel(o.role)}, ${distanceLabel(o.distance)}, ${num(o.latencyMs)} ms latency, trim ${formatDb(o.trimDb)}${o.polarityInverted ? ", polarity inverted" : ""}`;

function record(v: unknown): Record<string, unknown> {
  return v && typeof v === "object" ? (v as Record<string, unknown>) : {};
}

/** Field-by-field differences from `before` to `after`. */
export function diffZoneConfigs(before: ZoneConfig, after: ZoneConfig, options: DiffOptions = {}): ConfigDiff {
  const c = new Collector({ ignore: options.ignore ?? [], epsilon: options.epsilon ?? 1e-9 });

  c.fields("zone", "Zone", "", record(before), record(after), zoneFields, [
    "guestControls",
    "deviceSettings",
    "zoneCurve",
    "sources",
    "presets",
    "outputLayout",
  ]);
  c.fields("guestControls", "Guest controls", "guestControls.", record(before.guestControls), record(after.guestControls), guestFields);
  c.fields("deviceSettings", "Device settings", "deviceSettings.", record(before.deviceSettings), record(after.deviceSettings), deviceFields);
  c.curve("zoneCurve", "Zone", "zoneCurve", before.zoneCurve, after.zoneCurve);

  c.list<Source>({
    section: "sources",
    path: "sources",
    noun: "source",
    before: before.sources ?? [],
    after: after.sources ?? [],
    keyOf: options.sourceKey ?? ((s) => s.key),
    labelOf: (s) => s.label,
    describe: describeSource,
    compare: (subject, base, a, b) => {
      c.fields("sources", subject, `${base}.`, { ...a }, { ...b }, sourceFields, ["key", "toneCurve"]);
      c.curve("sources", subject, `${base}.toneCurve`, a.toneCurve, b.toneCurve);
    },
  });

  c.list<Preset>({
    section: "presets",
    path: "presets",
    noun: "preset",
    before: before.presets ?? [],
    after: after.presets ?? [],
    keyOf: options.presetKey ?? ((p) => p.key),
    labelOf: (p) => p.name,
    describe: describePreset,
    compare: (subject, base, a, b) => {
      c.fields("presets", subject, `${base}.`, { ...a }, { ...b }, presetFields, ["key", "toneCurve"]);
      c.curve("presets", subject, `${base}.toneCurve`, a.toneCurve, b.toneCurve);
    },
  });

  const xa = before.outputLayout?.crossover ?? null;
  const xb = after.outputLayout?.crossover ?? null;
  if (!xa || !xb) {
    if (xa || xb) {
      const fmt = (x: typeof xa) => (x ? `${crossoverTypeLabel(x.type)} ${slopeLabel(x.slopeDbPerOctave)} at ${formatHz(x.frequencyHz)}` : "none");
      c.push({
        op: "changed",
        section: "outputLayout",
        path: "outputLayout.crossover",
        subject: "Output layout",
        field: "Crossover",
        before: xa,
        after: xb,
        beforeText: fmt(xa),
        afterText: fmt(xb),
      });
    }
  } else {
    c.fields("outputLayout", "Output layout", "outputLayout.crossover.", { ...xa }, { ...xb }, crossoverFields);
  }
  c.list<Output>({
    section: "outputLayout",
    path: "outputLayout.outputs",
    noun: "output",
    before: before.outputLayout?.outputs ?? [],
    after: after.outputLayout?.outputs ?? [],
    keyOf: (o) => o.id,
    labelOf: (o) => o.label,
    describe: describeOutput,
    compare: (subject, base, a, b) => c.fields("outputLayout", subject, `${base}.`, { ...a }, { ...b }, outputFields, ["id"]),
  });
  // Fields a newer configuration schema may add to the output layout.
  c.fields("outputLayout", "Output layout", "outputLayout.", record(before.outputLayout), record(after.outputLayout), {}, ["crossover", "outputs"]);

  const counts: Record<DiffOp, number> = { changed: 0, added: 0, removed: 0, reordered: 0 };
  for (const ch of c.changes) counts[ch.op]++;
  const present = new Set(c.changes.map((ch) => ch.section));
  return {
    identical: c.changes.length === 0,
    changes: c.changes,
    counts,
    sections: sectionOrder.filter((s) => present.has(s)),
  };
}

/** A short headline such as "3 changes: sources, volume ceiling". */
export function summarizeDiff(diff: ConfigDiff, maxParts = 3): string {
  if (diff.identical) return "No changes";
  const n = diff.changes.length;
  const parts = diff.sections.map((s) => sectionLabels[s].toLowerCase());
  const shown = parts.slice(0, maxParts).join(", ") + (parts.length > maxParts ? ", …" : "");
  return `${n} change${n === 1 ? "" : "s"}: ${shown}`;
}

/**
 * The audit trail's field-by-field form: readable field names, primitive values
 * kept as they are, anything bigger as its readable text.
 */
export function toAuditChanges(diff: ConfigDiff): { field: string; before: unknown; after: unknown }[] {
  const plain = (v: unknown, text: string) => (v === null || ["string", "number", "boolean"].includes(typeof v) ? v : text);
  return diff.changes.map((ch) => ({
    field: ch.op === "changed" ? `${ch.subject} · ${ch.field}` : `${ch.subject} (${ch.op})`,
    before: plain(ch.before, ch.beforeText),
    after: plain(ch.after, ch.afterText),
  }));
}
