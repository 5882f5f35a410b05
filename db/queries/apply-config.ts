import "server-only";
import { asc, eq, inArray } from "drizzle-orm";
import type { Transaction } from "@/db/client";
import { devices, modelProfiles, sources, streamPresets, toneCurveBands, toneCurves, zones, type Zone } from "@/db/schema";
import { recordAudit } from "@/db/queries/audit";
import { assertGuestControlsEditable, loadZoneConfig } from "@/db/queries/zone-writes";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";
import { diffZoneConfigs, type ConfigDiff } from "@/lib/zones/config-diff";
import { deviceFitProblems } from "@/lib/zones/config-fits-device";
import { contentHash } from "@/lib/zones/content-hash";
import type { ConfigBand, ZoneConfig } from "@/lib/validation/zone-config";

// Writes a whole ZoneConfig back into a zone's tables (zones, sources,
// stream_presets), resolving tone-curve references against the company's
// library. Used by revision restore and home backup restore; meant for template
// application and adopting reported state too. Runs inside the caller's
// transaction — normally the `apply` of changeZone/changeZoneInTransaction,
// which locks the zone, bumps its version, snapshots and audits.

type ConfigCurve = NonNullable<ZoneConfig["zoneCurve"]>;

export type CurveOutcome = "reattached" | "matched" | "created";

export interface CurveResolution {
  /** The curve as the configuration names it. */
  requested: { id: string | null; name: string };
  outcome: CurveOutcome;
  curveId: string;
  curveName: string;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function bandsKey(bands: ConfigBand[]): string {
  return contentHash(
    bands.map((b) => ({ type: b.type, frequencyHz: b.frequencyHz, gainDb: b.gainDb, q: b.q, enabled: b.enabled ?? true })),
  );
}

interface LibraryCurve {
  id: string;
  name: string;
  bandsKey: string;
}

/**
 * Finds, for a curve a configuration refers to, the library curve to attach:
 * the same curve by id while it still has the same bands; else a library curve
 * with the same bands (preferring the same name); else a new library curve.
 * Loads the company's library once per instance; remembers what it created.
 */
export class CurveResolver {
  private library: LibraryCurve[] | null = null;
  private readonly cache = new Map<string, CurveResolution>();
  readonly resolutions: CurveResolution[] = [];

  constructor(
    private readonly tx: Transaction,
    private readonly actor: Actor,
    private readonly options: {
      /** Description of curves this resolver has to create (why they exist). */
      createdDescription: string;
      /** Descriptions from a backup file, by the curve id it names. */
      descriptions?: Map<string, string>;
      /** Only work out what would happen; write nothing (backup preview). */
      dryRun?: boolean;
    },
  ) {}

  private async loadLibrary(): Promise<LibraryCurve[]> {
    if (this.library) return this.library;
    const curveRows = await this.tx
      .select({ id: toneCurves.id, name: toneCurves.name })
      .from(toneCurves)
      .where(eq(toneCurves.organizationId, this.actor.organizationId))
      .orderBy(asc(toneCurves.createdAt), asc(toneCurves.id));
    const ids = curveRows.map((c) => c.id);
    const bandRows = ids.length
      ? await this.tx.select().from(toneCurveBands).where(inArray(toneCurveBands.curveId, ids)).orderBy(asc(toneCurveBands.position))
      : [];
    const byCurve = new Map<string, ConfigBand[]>();
    for (const b of bandRows) {
      const list = byCurve.get(b.curveId) ?? [];
      list.push({ type: b.type, frequencyHz: b.frequencyHz, gainDb: b.gainDb, q: b.q, enabled: b.enabled });
      byCurve.set(b.curveId, list);
    }
    this.library = curveRows.map((c) => ({ id: c.id, name: c.name, bandsKey: bandsKey(byCurve.get(c.id) ?? []) }));
    return this.library;
  }

  async resolve(ref: ConfigCurve | null | undefined): Promise<string | null> {
    if (!ref) return null;
    const key = `${ref.id ?? ""}|${ref.name}|${bandsKey(ref.bands)}`;
    const cached = this.cache.get(key);
    if (cached) return cached.curveId;
    const library = await this.loadLibrary();
    const wanted = bandsKey(ref.bands);
    let resolution: CurveResolution;
    const byId = ref.id ? library.find((c) => c.id === ref.id) : undefined;
    if (byId && byId.bandsKey === wanted) {
      resolution = { requested: { id: ref.id, name: ref.name }, outcome: "reattached", curveId: byId.id, curveName: byId.name };
    } else {
      const sameBands = library.filter((c) => c.bandsKey === wanted);
      const match = sameBands.find((c) => c.name === ref.name) ?? sameBands[0];
      if (match) {
        resolution = { requested: { id: ref.id, name: ref.name }, outcome: "matched", curveId: match.id, curveName: match.name };
      } else {
        const name = uniqueName(ref.name, library.map((c) => c.name));
        const id = this.options.dryRun ? `new:${key}` : await this.create(ref, name);
        library.push({ id, name, bandsKey: wanted });
        resolution = { requested: { id: ref.id, name: ref.name }, outcome: "created", curveId: id, curveName: name };
      }
    }
    this.cache.set(key, resolution);
    this.resolutions.push(resolution);
    return resolution.curveId;
  }

  private async create(ref: ConfigCurve, name: string): Promise<string> {
    const description = (ref.id && this.options.descriptions?.get(ref.id)) || this.options.createdDescription;
    const [row] = await this.tx
      .insert(toneCurves)
      .values({ organizationId: this.actor.organizationId, name, description })
      .returning({ id: toneCurves.id });
    if (ref.bands.length) {
      await this.tx.insert(toneCurveBands).values(
        ref.bands.map((b, position) => ({
          curveId: row.id,
          position,
          type: b.type,
          frequencyHz: b.frequencyHz,
          gainDb: b.gainDb,
          q: b.q,
          enabled: b.enabled ?? true,
        })),
      );
    }
    await recordAudit(this.tx, this.actor, {
      kind: "curve.created",
      summary: `Created tone curve “${name}” (${this.options.createdDescription.replace(/\.$/, "")})`,
      changes: [
        { field: "name", before: null, after: name },
        { field: "bands", before: null, after: ref.bands.length },
      ],
    });
    return row.id;
  }
}

function uniqueName(name: string, taken: string[]): string {
  if (!taken.includes(name)) return name;
  const base = `${name} (restored)`;
  if (!taken.includes(base)) return base;
  for (let i = 2; ; i++) if (!taken.includes(`${base} ${i}`)) return `${base} ${i}`;
}

/** The model profile of the zone's device, if it has one. */
async function deviceProfile(tx: Transaction, deviceId: string | null) {
  if (!deviceId) return null;
  const [row] = await tx
    .select({
      name: modelProfiles.name,
      presetSlots: modelProfiles.presetSlots,
      eqBands: modelProfiles.eqBands,
      inputs: modelProfiles.inputs,
      subwooferOutputs: modelProfiles.subwooferOutputs,
      hasLineOut: modelProfiles.hasLineOut,
    })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(eq(devices.id, deviceId));
  return row ?? null;
}

/** Throws zone:rule when the zone's device cannot take this configuration. */
export async function assertConfigFitsDevice(tx: Transaction, zone: Pick<Zone, "deviceId" | "name">, config: ZoneConfig) {
  const profile = await deviceProfile(tx, zone.deviceId);
  if (!profile) return;
  const problems = deviceFitProblems(config, profile);
  if (problems.length) {
    throw new AppError("zone:rule", {
      message: `“${zone.name}” cannot take this configuration: ${problems.join(" ")}`,
      details: { zone: zone.name, problems },
    });
  }
}

/** Role checks for the guest-control part of a configuration change. */
function assertGuestChangeAllowed(actor: Actor, zone: Zone, config: ZoneConfig) {
  const home = { id: zone.homeId, organizationId: zone.organizationId };
  const g = config.guestControls;
  const permissionsChange = g.volume !== zone.guestVolume || g.source !== zone.guestSource || g.wake !== zone.guestWake;
  if (permissionsChange) {
    assertGuestControlsEditable(actor, zone);
    if (!can(actor, "guest:edit", home)) throw new AppError("auth:forbidden", { message: "Your role may not change guest controls." });
  }
  if (g.locked && !zone.guestLocked && !can(actor, "guest:lock", home)) {
    throw new AppError("auth:forbidden", { message: "This configuration locks guest controls, and your role may not lock them." });
  }
  if (!g.locked && zone.guestLocked && !can(actor, "guest:unlock", home)) {
    throw new AppError("zone:locked", {
      message: `This configuration unlocks guest controls${zone.lockReason ? ` (locked: ${zone.lockReason})` : ""}, and your role may not unlock them.`,
    });
  }
}

export interface ApplyConfigResult {
  before: ZoneConfig;
  after: ZoneConfig;
  diff: ConfigDiff;
}

/**
 * Make the zone's tables say `config`. Sources and presets are matched by key:
 * an existing row with that id is updated in place, a missing one is inserted
 * (keeping the key as its id when the id is free, so a round trip through a
 * backup gives back identical revisions), and rows the configuration does not
 * name are deleted. Returns the configuration before and after, and their diff.
 */
export async function applyZoneConfig(
  tx: Transaction,
  {
    actor,
    zone,
    config,
    curves,
    lockReason,
  }: {
    actor: Actor;
    /** The zone row, locked by the caller. */
    zone: Zone;
    config: ZoneConfig;
    curves: CurveResolver;
    /** Recorded when this configuration locks guest controls. */
    lockReason?: string;
  },
): Promise<ApplyConfigResult> {
  assertUniqueKeys(config);
  assertGuestChangeAllowed(actor, zone, config);
  await assertConfigFitsDevice(tx, zone, config);
  const before = await loadZoneConfig(tx, zone.id);
  const now = new Date();

  const lockChange =
    config.guestControls.locked === zone.guestLocked
      ? {}
      : config.guestControls.locked
        ? { lockedBy: actor.userId, lockedAt: now, lockReason: lockReason ?? null }
        : { lockedBy: null, lockedAt: null, lockReason: null };
  await tx
    .update(zones)
    .set({
      name: config.name,
      volumeCeiling: config.volumeCeiling,
      turnOnVolume: config.turnOnVolume,
      guestVolume: config.guestControls.volume,
      guestSource: config.guestControls.source,
      guestWake: config.guestControls.wake,
      guestLocked: config.guestControls.locked,
      ...lockChange,
      toneCurveId: await curves.resolve(config.zoneCurve),
      deviceSettings: structuredClone(config.deviceSettings),
      outputLayout: structuredClone(config.outputLayout),
      updatedAt: now,
    })
    .where(eq(zones.id, zone.id));

  // Sources.
  const existingSources = await tx.select({ id: sources.id }).from(sources).where(eq(sources.zoneId, zone.id));
  const sourceIds = await assignIds(
    tx,
    "sources",
    existingSources.map((s) => s.id),
    config.sources.map((s) => s.key),
  );
  const keepSources = new Set(sourceIds.filter((x) => x.existing).map((x) => x.id));
  const dropSources = existingSources.map((s) => s.id).filter((id) => !keepSources.has(id));
  if (dropSources.length) await tx.delete(sources).where(inArray(sources.id, dropSources));
  for (const [position, s] of config.sources.entries()) {
    const { id, existing } = sourceIds[position];
    const values = {
      position,
      label: s.label,
      kind: s.kind,
      enabled: s.enabled,
      loudnessOffsetDb: s.loudnessOffsetDb,
      subsonic: s.subsonic,
      toneCurveId: await curves.resolve(s.toneCurve),
      updatedAt: now,
    };
    if (existing) await tx.update(sources).set(values).where(eq(sources.id, id));
    else await tx.insert(sources).values({ id, zoneId: zone.id, ...values });
  }

  // Stream presets.
  const existingPresets = await tx.select({ id: streamPresets.id }).from(streamPresets).where(eq(streamPresets.zoneId, zone.id));
  const presetIds = await assignIds(
    tx,
    "presets",
    existingPresets.map((p) => p.id),
    config.presets.map((p) => p.key),
  );
  const keepPresets = new Set(presetIds.filter((x) => x.existing).map((x) => x.id));
  const dropPresets = existingPresets.map((p) => p.id).filter((id) => !keepPresets.has(id));
  if (dropPresets.length) await tx.delete(streamPresets).where(inArray(streamPresets.id, dropPresets));
  for (const [position, p] of config.presets.entries()) {
    const { id, existing } = presetIds[position];
    const values = {
      position,
      name: p.name,
      streamUrl: p.streamUrl,
      genre: p.genre,
      loudnessOffsetDb: p.loudnessOffsetDb,
      toneCurveId: await curves.resolve(p.toneCurve),
      updatedAt: now,
    };
    if (existing) await tx.update(streamPresets).set(values).where(eq(streamPresets.id, id));
    else await tx.insert(streamPresets).values({ id, zoneId: zone.id, ...values });
  }

  const after = await loadZoneConfig(tx, zone.id);
  return { before, after, diff: diffZoneConfigs(before, after) };
}

function assertUniqueKeys(config: ZoneConfig) {
  for (const [list, keys] of [
    ["sources", config.sources.map((s) => s.key)],
    ["presets", config.presets.map((p) => p.key)],
  ] as const) {
    const dup = keys.find((k, i) => keys.indexOf(k) !== i);
    if (dup !== undefined) {
      throw new AppError("zone:rule", { message: `Two ${list} share the key “${dup}”; each needs its own.`, details: { list, key: dup } });
    }
  }
}

/**
 * Row ids for the configuration's items, in order: the zone's own row when the
 * key names one, else the key itself when it is a UUID no other row uses, else
 * a fresh UUID.
 */
async function assignIds(
  tx: Transaction,
  table: "sources" | "presets",
  zoneRowIds: string[],
  keys: string[],
): Promise<{ id: string; existing: boolean }[]> {
  const own = new Set(zoneRowIds);
  const candidates = keys.filter((k) => !own.has(k) && UUID.test(k));
  const t = table === "sources" ? sources : streamPresets;
  const taken = new Set(
    candidates.length ? (await tx.select({ id: t.id }).from(t).where(inArray(t.id, candidates))).map((r) => r.id) : [],
  );
  return keys.map((k) => {
    if (own.has(k)) return { id: k, existing: true };
    if (UUID.test(k) && !taken.has(k)) {
      taken.add(k);
      return { id: k.toLowerCase(), existing: false };
    }
    return { id: crypto.randomUUID(), existing: false };
  });
}
