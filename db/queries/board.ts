import "server-only";
import { createHash } from "node:crypto";
import { LRUCache } from "lru-cache";
import { and, asc, count, eq, inArray, max, sql } from "drizzle-orm";
import { db, pool, type Transaction } from "@/db/client";
import { devices, modelProfiles, sources, streamPresets, toneCurveBands, toneCurves, user, zones, type Zone } from "@/db/schema";
import type { FieldChange } from "@/db/queries/audit";
import {
  applyListOrder,
  assertGuestControlsEditable,
  changeZone,
  loadZoneForActor,
  changeZoneInTransaction,
  type ZoneChangeResult,
} from "@/db/queries/zone-writes";
import { toFieldErrors } from "@/lib/api/handler";
import type { BoardDto, BoardPermissions, BoardWriteResult, ZoneColumnDto } from "@/lib/board/types";
import { modelProfiles as knownProfiles, sourceKindLabels, type SourceKind } from "@/lib/devices/model-profiles";
import { AppError } from "@/lib/errors";
import { type Actor, can, type HomeRef } from "@/lib/permissions";
import {
  zoneSettingsSchema,
  type GuestControlFlags,
  type PresetForm,
  type SourceForm,
  type ZoneSettings,
} from "@/lib/validation/board";
import { canonicalJson } from "@/lib/zones/content-hash";

// The zone board: one read that builds the whole board, and every write the
// board makes. All writes go through changeZone (version check, revision,
// audit in one transaction); each answers with the fresh columns it changed.

type Executor = Transaction | typeof db;

/** Without a device, a zone may hold as many presets as the largest model profile. */
const MAX_PRESET_SLOTS = Math.max(...knownProfiles.map((p) => p.presetSlots));

const iso = (column: string) => `to_char(${column} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

/**
 * Zone columns as JSON built by PostgreSQL in one statement: zones with
 * device, model profile and lock holder, their sources and presets in order,
 * and each card's latest measured true peak. `scope` is a fixed condition on
 * `z` using $2 (the statement text never varies, so it can be prepared).
 */
function columnsSql(scope: string) {
  return `
    select coalesce(json_agg(col order by col.position, col.name), '[]'::json) as zones
    from (
      select
        z.id, z.name, z.position, z.version,
        z.volume_ceiling as "volumeCeiling",
        z.turn_on_volume as "turnOnVolume",
        z.tone_curve_id as "toneCurveId",
        json_build_object(
          'volume', z.guest_volume, 'source', z.guest_source, 'wake', z.guest_wake,
          'locked', z.guest_locked, 'lockedAt', ${iso("z.locked_at")},
          'lockedByName', lu.name, 'lockReason', z.lock_reason
        ) as guest,
        z.device_settings as "deviceSettings",
        case when d.id is null then null else json_build_object(
          'id', d.id, 'serial', d.serial, 'firmwareVersion', d.firmware_version, 'online', d.online,
          'lastReportAt', ${iso("d.last_report_at")},
          'profile', json_build_object('id', mp.id, 'name', mp.name, 'presetSlots', mp.preset_slots,
                                       'eqBands', mp.eq_bands, 'inputs', mp.inputs)
        ) end as device,
        coalesce(mp.preset_slots, ${MAX_PRESET_SLOTS}) as "presetSlots",
        mp.eq_bands as "eqBands",
        coalesce((
          select json_agg(json_build_object(
            'id', s.id, 'label', s.label, 'kind', s.kind, 'enabled', s.enabled,
            'loudnessOffsetDb', s.loudness_offset_db, 'subsonic', s.subsonic,
            'toneCurveId', s.tone_curve_id, 'truePeakDbtp', tp.true_peak_dbtp
          ) order by s.position, s.id)
          from sources s
          left join (
            select distinct on (c.source_id) c.source_id, c.true_peak_dbtp
            from level_match_clips c
            where c.zone_id = z.id and c.source_id is not null and c.true_peak_dbtp is not null
            order by c.source_id, c.created_at desc
          ) tp on tp.source_id = s.id
          where s.zone_id = z.id
        ), '[]'::json) as sources,
        coalesce((
          select json_agg(json_build_object(
            'id', p.id, 'name', p.name, 'streamUrl', p.stream_url, 'genre', p.genre,
            'directoryId', p.directory_id, 'loudnessOffsetDb', p.loudness_offset_db,
            'toneCurveId', p.tone_curve_id, 'truePeakDbtp', tp.true_peak_dbtp
          ) order by p.position, p.id)
          from stream_presets p
          left join (
            select distinct on (c.preset_id) c.preset_id, c.true_peak_dbtp
            from level_match_clips c
            where c.zone_id = z.id and c.preset_id is not null and c.true_peak_dbtp is not null
            order by c.preset_id, c.created_at desc
          ) tp on tp.preset_id = p.id
          where p.zone_id = z.id
        ), '[]'::json) as presets
      from zones z
      left join devices d on d.id = z.device_id
      left join model_profiles mp on mp.id = d.model_profile_id
      left join "user" lu on lu.id = z.locked_by
      where z.organization_id = $1 and z.deleted_at is null and ${scope}
    ) col`;
}

/** The company's tone-curve library with bands ($1 = organization). */
const curvesSql = `
    select coalesce(json_agg(c order by c.name, c.id), '[]'::json) as curves
    from (
      select tc.id, tc.name, tc.description,
        coalesce((
          select json_agg(json_build_object('type', b.type, 'frequencyHz', b.frequency_hz, 'gainDb', b.gain_db,
                                            'q', b.q, 'enabled', b.enabled) order by b.position)
          from tone_curve_bands b where b.curve_id = tc.id
        ), '[]'::json) as bands
      from tone_curves tc
      where tc.organization_id = $1
    ) c`;

/**
 * Named (prepared) statements: the board statement takes PostgreSQL longer to
 * plan than to run, so each connection plans it once. The JSON comes back as
 * text, so the board route passes some 120 KB through without parsing and
 * re-serialising it. Both board statements return the version stamps kept by
 * the triggers of drizzle/0002 (homes.board_version, library_versions.curves).
 */
const libraryVersionSql = `coalesce((select lv.curves from library_versions lv where lv.organization_id = $1), 0)::text`;
const statements = {
  stamp: {
    name: "zw_board_stamp_v1",
    text: `select h.id, h.organization_id as "organizationId", h.name, h.household_name as "householdName", h.city,
                  h.service_plan as "servicePlan", h.board_version::text as "boardVersion", ${libraryVersionSql} as "libraryVersion"
           from homes h where h.id = $2 and h.organization_id = $1`,
  },
  board: {
    name: "zw_board_v3",
    text: `select h.board_version::text as "boardVersion", ${libraryVersionSql} as "libraryVersion",
                  (${columnsSql("z.home_id = $2")})::text as zones, (${curvesSql})::text as curves
           from homes h where h.id = $2 and h.organization_id = $1`,
  },
  columns: {
    name: "zw_board_columns_v1",
    text: `select (${columnsSql("z.id = any($2::uuid[])")})::text as zones`,
  },
};

export async function readZoneColumns(organizationId: string, zoneIds: string[]): Promise<ZoneColumnDto[]> {
  if (zoneIds.length === 0) return [];
  const result = await pool.query<{ zones: string }>({ ...statements.columns, values: [organizationId, zoneIds] });
  return JSON.parse(result.rows[0]?.zones ?? "[]") as ZoneColumnDto[];
}

export function boardPermissions(actor: Actor, home: HomeRef): BoardPermissions {
  return {
    editZone: can(actor, "zone:edit", home),
    editGuest: can(actor, "guest:edit", home),
    lock: can(actor, "guest:lock", home),
    unlock: can(actor, "guest:unlock", home),
    reorderPresets: can(actor, "preset:reorder", home),
  };
}

interface CachedColumns {
  boardVersion: string;
  libraryVersion: string;
  /** `,"curves":[…],"zones":[…]}` as UTF-8: the part of the answer every reader of this home shares. */
  tail: Buffer;
}

/**
 * The shared part of recent boards, per process, keyed by home and valid while
 * the home's board version and the company's library version are unchanged.
 * The versions move in the same transaction as any change (database triggers),
 * so a stale entry is never served, from this process or any other.
 */
const columnsCache = new LRUCache<string, CachedColumns>({
  maxSize: 64 * 1024 * 1024,
  sizeCalculation: (entry) => entry.tail.byteLength + 128,
});

export interface BoardBody {
  /** Changes whenever anything in the answer would: the home, its zones, the library, or who asks. */
  etag: string;
  /**
   * The answer in two parts: this reader's head, then the shared cached columns
   * (sent as they are, never copied or changed).
   */
  parts: [Uint8Array, Uint8Array];
}

/**
 * The board of one home as JSON, ready to send. The home checks are those of
 * getHomeForActor: another company's home, or someone else's household, is
 * "not found"; a role that may not read it is refused. A small stamp query
 * comes first; the columns and library are built by PostgreSQL only when the
 * versions differ from the cached ones.
 */
export async function getBoardBody({ actor, homeId }: { actor: Actor; homeId: string }): Promise<BoardBody> {
  type Stamp = BoardDto["home"] & { organizationId: string; boardVersion: string; libraryVersion: string };
  const stamp = (await pool.query<Stamp>({ ...statements.stamp, values: [actor.organizationId, homeId] })).rows[0];
  if (!stamp) throw new AppError("home:not-found");
  const home = { id: stamp.id, organizationId: stamp.organizationId };
  if (!can(actor, "home:read", home) || !can(actor, "zone:read", home)) {
    if (actor.role === "homeowner") throw new AppError("home:not-found");
    throw new AppError("auth:forbidden");
  }
  const key = `${stamp.organizationId}/${stamp.id}`;
  let columns = columnsCache.get(key);
  if (!columns || columns.boardVersion !== stamp.boardVersion || columns.libraryVersion !== stamp.libraryVersion) {
    const result = await pool.query<{ boardVersion: string; libraryVersion: string; zones: string; curves: string }>({
      ...statements.board,
      values: [actor.organizationId, homeId],
    });
    const row = result.rows[0];
    if (!row) throw new AppError("home:not-found");
    columns = {
      boardVersion: row.boardVersion,
      libraryVersion: row.libraryVersion,
      tail: Buffer.from(`,"curves":${row.curves},"zones":${row.zones}}`),
    };
    columnsCache.set(key, columns);
  }
  const head: Omit<BoardDto, "curves" | "zones"> = {
    home: { id: stamp.id, name: stamp.name, householdName: stamp.householdName, city: stamp.city, servicePlan: stamp.servicePlan },
    actor: { name: actor.name, role: actor.role },
    may: boardPermissions(actor, home),
  };
  const headJson = JSON.stringify(head).slice(0, -1);
  const headHash = createHash("sha1").update(headJson).digest("base64url").slice(0, 16);
  return { etag: `W/"b${columns.boardVersion}.l${columns.libraryVersion}.${headHash}"`, parts: [Buffer.from(headJson), columns.tail] };
}

export async function getBoard(input: { actor: Actor; homeId: string }): Promise<BoardDto> {
  const { parts } = await getBoardBody(input);
  return JSON.parse(Buffer.concat(parts).toString("utf8")) as BoardDto;
}

// ── rules shared by the writes ─────────────────────────────────────────────

const homeOf = (zone: Zone): HomeRef => ({ id: zone.homeId, organizationId: zone.organizationId });

async function lockHolderName(tx: Executor, zone: Zone) {
  if (!zone.lockedBy) return null;
  const [row] = await tx.select({ name: user.name }).from(user).where(eq(user.id, zone.lockedBy));
  return row?.name ?? null;
}

function describeLock(zone: Zone, holder: string | null) {
  const when = zone.lockedAt ? ` on ${zone.lockedAt.toISOString().slice(0, 16).replace("T", " ")} UTC` : "";
  return `${holder ?? "Support"} locked “${zone.name}”${when}${zone.lockReason ? `: ${zone.lockReason}` : ""}`;
}

/**
 * A zone whose guest controls support has locked takes no changes from anyone
 * who may not unlock it (installers; homeowners reordering presets), so a
 * support fix is not undone by a drop or an edit on the board.
 */
async function assertZoneOpenFor(tx: Executor, actor: Actor, zone: Zone) {
  if (!zone.guestLocked || can(actor, "guest:unlock", homeOf(zone))) return;
  const holder = await lockHolderName(tx, zone);
  throw new AppError("zone:locked", {
    message: `${describeLock(zone, holder)}. Ask support or an integrator to unlock it first.`,
    details: { lockedByName: holder, lockedAt: zone.lockedAt?.toISOString() ?? null, reason: zone.lockReason },
  });
}

async function profileOf(tx: Executor, zone: Zone) {
  if (!zone.deviceId) return null;
  const [row] = await tx
    .select({ name: modelProfiles.name, presetSlots: modelProfiles.presetSlots, eqBands: modelProfiles.eqBands, inputs: modelProfiles.inputs })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(eq(devices.id, zone.deviceId));
  return row ?? null;
}

async function curveName(tx: Executor, actor: Actor, curveId: string | null) {
  if (!curveId) return null;
  const [row] = await tx
    .select({ name: toneCurves.name })
    .from(toneCurves)
    .where(and(eq(toneCurves.id, curveId), eq(toneCurves.organizationId, actor.organizationId)));
  if (!row) {
    throw new AppError("curve:not-found", { fieldErrors: { toneCurveId: ["That tone curve is not in your library."] } });
  }
  return row.name;
}

async function bandCount(tx: Executor, curveId: string | null) {
  if (!curveId) return 0;
  const [row] = await tx.select({ n: count() }).from(toneCurveBands).where(eq(toneCurveBands.curveId, curveId));
  return row?.n ?? 0;
}

/** The zone's curve and a card's curve run in series on the device's EQ bands. */
async function assertBandsFit(tx: Executor, zone: Zone, curveId: string | null) {
  if (!curveId) return;
  const profile = await profileOf(tx, zone);
  if (!profile) return;
  const [own, zoneBands] = await Promise.all([bandCount(tx, curveId), bandCount(tx, zone.toneCurveId)]);
  if (own + zoneBands > profile.eqBands) {
    throw new AppError("zone:rule", {
      message: `“${zone.name}” has ${profile.eqBands} EQ bands (${profile.name}); its zone curve uses ${zoneBands} and this curve needs ${own}.`,
      fieldErrors: { toneCurveId: [`Needs ${own} bands; only ${profile.eqBands - zoneBands} are free on this device.`] },
    });
  }
}

/** The zone curve runs in series with each card's own curve: it must fit beside the largest. */
async function assertZoneCurveFits(tx: Executor, zone: Zone, curveId: string | null) {
  if (!curveId) return;
  const profile = await profileOf(tx, zone);
  if (!profile) return;
  const [{ most }] = (
    await tx.execute<{ most: number }>(sql`
      select coalesce(max(n), 0)::int as most from (
        select count(*) as n from tone_curve_bands b
        where b.curve_id in (select tone_curve_id from sources where zone_id = ${zone.id}
                             union select tone_curve_id from stream_presets where zone_id = ${zone.id})
        group by b.curve_id) per_curve`)
  ).rows;
  const own = await bandCount(tx, curveId);
  if (own + most > profile.eqBands) {
    throw new AppError("zone:rule", {
      message: `“${zone.name}” has ${profile.eqBands} EQ bands (${profile.name}); a card's own curve uses ${most} and this zone curve needs ${own}.`,
      fieldErrors: { toneCurveId: [`Needs ${own} bands; only ${profile.eqBands - most} are free beside the cards' curves.`] },
    });
  }
}

async function assertInputFits(tx: Executor, zone: Zone, kind: SourceKind) {
  const profile = await profileOf(tx, zone);
  if (profile && !profile.inputs.includes(kind)) {
    throw new AppError("zone:rule", {
      message: `The ${profile.name} in “${zone.name}” has no ${sourceKindLabels[kind]} input.`,
      fieldErrors: { kind: [`This device has no ${sourceKindLabels[kind]} input.`] },
    });
  }
}

async function assertPresetSlotFree(tx: Executor, zone: Zone, adding = 1) {
  const profile = await profileOf(tx, zone);
  const slots = profile?.presetSlots ?? MAX_PRESET_SLOTS;
  const [row] = await tx.select({ n: count() }).from(streamPresets).where(eq(streamPresets.zoneId, zone.id));
  if ((row?.n ?? 0) + adding > slots) {
    throw new AppError("zone:rule", {
      message: `“${zone.name}” is full: its ${profile ? profile.name : "zone"} has ${slots} preset slots and all are used.`,
    });
  }
}

async function loadSource(tx: Executor, zoneId: string, sourceId: string) {
  const [row] = await tx.select().from(sources).where(and(eq(sources.id, sourceId), eq(sources.zoneId, zoneId)));
  if (!row) throw new AppError("source:not-found");
  return row;
}

async function loadPreset(tx: Executor, zoneId: string, presetId: string) {
  const [row] = await tx.select().from(streamPresets).where(and(eq(streamPresets.id, presetId), eq(streamPresets.zoneId, zoneId)));
  if (!row) throw new AppError("preset:not-found");
  return row;
}

function changed<T extends Record<string, unknown>>(prefix: string, before: T, after: Partial<T>): FieldChange[] {
  const out: FieldChange[] = [];
  for (const [field, value] of Object.entries(after)) {
    if (value === undefined) continue;
    // Compared as canonical JSON: jsonb hands objects back with its own key order.
    if (canonicalJson(before[field]) !== canonicalJson(value)) out.push({ field: `${prefix}.${field}`, before: before[field], after: value });
  }
  return out;
}

/** Positions 0…n-1 in the order given; the list must name exactly the zone's items. */
function assertSameSet(current: string[], wanted: string[], what: string) {
  const a = [...current].sort();
  const b = [...new Set(wanted)].sort();
  if (a.length !== b.length || wanted.length !== b.length || a.some((id, i) => id !== b[i])) {
    throw new AppError("zone:rule", {
      message: `The new order must list every ${what} of the zone exactly once. Reload the board and try again.`,
    });
  }
}

async function finish(organizationId: string, results: ZoneChangeResult[]): Promise<BoardWriteResult> {
  return {
    zones: await readZoneColumns(organizationId, [...new Set(results.map((r) => r.zoneId))]),
    revisions: results.map((r) => ({ zoneId: r.zoneId, number: r.revision.number, created: r.revision.created })),
  };
}

// ── zone settings ──────────────────────────────────────────────────────────

export async function updateZoneSettings({
  actor,
  zoneId,
  version,
  patch,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  patch: Partial<ZoneSettings>;
}): Promise<BoardWriteResult> {
  const guestTouched = patch.guestControls !== undefined;
  const otherTouched = (["name", "volumeCeiling", "turnOnVolume", "deviceSettings"] as const).some((k) => patch[k] !== undefined);
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    // Only guest controls: guest:edit suffices; anything else needs zone:edit.
    action: otherTouched || !guestTouched ? "zone:edit" : "guest:edit",
    kind: "zone.settings-changed",
    summary: (zone) => `Changed settings of “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      const current: ZoneSettings = {
        name: zone.name,
        volumeCeiling: zone.volumeCeiling,
        turnOnVolume: zone.turnOnVolume,
        guestControls: { volume: zone.guestVolume, source: zone.guestSource, wake: zone.guestWake },
        deviceSettings: zone.deviceSettings,
      };
      const merged = {
        ...current,
        ...Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined)),
      };
      const parsed = zoneSettingsSchema.safeParse(merged);
      if (!parsed.success) throw new AppError("request:invalid", { fieldErrors: toFieldErrors(parsed.error) });
      const next = parsed.data;
      const changes = changed("zone", current as unknown as Record<string, unknown>, next as unknown as Record<string, unknown>);
      if (changes.some((c) => c.field === "zone.guestControls")) {
        if (!can(actor, "guest:edit", homeOf(zone))) throw new AppError("auth:forbidden", { message: "Your role may not change guest controls." });
        assertGuestControlsEditable(actor, zone);
      }
      await tx
        .update(zones)
        .set({
          name: next.name,
          volumeCeiling: next.volumeCeiling,
          turnOnVolume: next.turnOnVolume,
          guestVolume: next.guestControls.volume,
          guestSource: next.guestControls.source,
          guestWake: next.guestControls.wake,
          deviceSettings: next.deviceSettings,
        })
        .where(eq(zones.id, zone.id));
      return changes;
    },
  });
  return finish(actor.organizationId, [result]);
}

// ── guest-control lock ─────────────────────────────────────────────────────

export async function lockGuestControls({
  actor,
  zoneId,
  version,
  reason,
  guestControls,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  reason: string;
  guestControls?: GuestControlFlags;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "guest:lock",
    kind: "zone.guest-locked",
    summary: (zone) => `Locked guest controls of “${zone.name}”: ${reason}`,
    apply: async (tx, zone) => {
      if (zone.guestLocked) {
        const holder = await lockHolderName(tx, zone);
        throw new AppError("zone:rule", { message: `Already locked. ${describeLock(zone, holder)}.` });
      }
      const before = { volume: zone.guestVolume, source: zone.guestSource, wake: zone.guestWake };
      const flags = guestControls ?? before;
      await tx
        .update(zones)
        .set({
          guestLocked: true,
          lockedBy: actor.userId,
          lockedAt: new Date(),
          lockReason: reason,
          guestVolume: flags.volume,
          guestSource: flags.source,
          guestWake: flags.wake,
        })
        .where(eq(zones.id, zone.id));
      return [
        { field: "zone.guestControls.locked", before: false, after: true },
        { field: "zone.lockReason", before: null, after: reason },
        ...changed("zone", { guestControls: before }, { guestControls: flags }),
      ];
    },
  });
  return finish(actor.organizationId, [result]);
}

export async function unlockGuestControls({
  actor,
  zoneId,
  version,
  reason,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  reason: string;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "guest:unlock",
    kind: "zone.guest-unlocked",
    summary: (zone) => `Unlocked guest controls of “${zone.name}”: ${reason}`,
    apply: async (tx, zone) => {
      if (!zone.guestLocked) throw new AppError("zone:rule", { message: `Guest controls of “${zone.name}” are not locked.` });
      await tx.update(zones).set({ guestLocked: false, lockedBy: null, lockedAt: null, lockReason: null }).where(eq(zones.id, zone.id));
      return [
        { field: "zone.guestControls.locked", before: true, after: false },
        { field: "zone.lockReason", before: zone.lockReason, after: null },
        { field: "zone.unlockReason", before: null, after: reason },
      ];
    },
  });
  return finish(actor.organizationId, [result]);
}

// ── sources ────────────────────────────────────────────────────────────────

export async function createSource({
  actor,
  zoneId,
  version,
  input,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  input: SourceForm;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.source-added",
    summary: (zone) => `Added source “${input.label}” to “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      await assertInputFits(tx, zone, input.kind);
      await curveName(tx, actor, input.toneCurveId);
      await assertBandsFit(tx, zone, input.toneCurveId);
      const [{ last }] = await tx.select({ last: max(sources.position) }).from(sources).where(eq(sources.zoneId, zone.id));
      const [row] = await tx
        .insert(sources)
        .values({ zoneId: zone.id, position: (last ?? -1) + 1, ...input })
        .returning({ id: sources.id });
      return [{ field: `source.${row.id}`, before: null, after: input }];
    },
  });
  return finish(actor.organizationId, [result]);
}

export async function updateSource({
  actor,
  zoneId,
  sourceId,
  version,
  input,
}: {
  actor: Actor;
  zoneId: string;
  sourceId: string;
  version: number;
  input: Partial<SourceForm>;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.source-changed",
    summary: (zone) => `Changed source “${input.label ?? "…"}” of “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      const source = await loadSource(tx, zone.id, sourceId);
      if (input.kind !== undefined && input.kind !== source.kind) await assertInputFits(tx, zone, input.kind);
      if (input.toneCurveId !== undefined && input.toneCurveId !== source.toneCurveId) {
        await curveName(tx, actor, input.toneCurveId);
        await assertBandsFit(tx, zone, input.toneCurveId);
      }
      const changes = changed(`source.${source.id}`, source as unknown as Record<string, unknown>, input);
      if (changes.length) await tx.update(sources).set({ ...input, updatedAt: new Date() }).where(eq(sources.id, source.id));
      return changes;
    },
  });
  return finish(actor.organizationId, [result]);
}

export async function deleteSource({
  actor,
  zoneId,
  sourceId,
  version,
}: {
  actor: Actor;
  zoneId: string;
  sourceId: string;
  version: number;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.source-removed",
    summary: (zone) => `Removed a source from “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      const source = await loadSource(tx, zone.id, sourceId);
      await tx.delete(sources).where(eq(sources.id, source.id));
      await compactPositions(tx, "sources", zone.id);
      return [{ field: `source.${source.id}`, before: { label: source.label, kind: source.kind }, after: null }];
    },
  });
  return finish(actor.organizationId, [result]);
}

async function compactPositions(tx: Transaction, table: "sources" | "stream_presets", zoneId: string) {
  await tx.execute(sql`
    update ${sql.identifier(table)} t set position = o.n - 1
    from (select id, row_number() over (order by position, id) as n from ${sql.identifier(table)} where zone_id = ${zoneId}) o
    where t.id = o.id and t.position <> o.n - 1`);
}

/**
 * Put a zone's sources or presets in the order of `ids` (which must name each
 * exactly once); the audit change lists the names before and after.
 */
async function reorderList(tx: Transaction, zoneId: string, list: "sources" | "stream_presets", ids: string[]): Promise<FieldChange> {
  const { table, name, what, field } =
    list === "sources"
      ? { table: sources, name: sources.label, what: "source", field: "zone.sourceOrder" }
      : { table: streamPresets, name: streamPresets.name, what: "stream preset", field: "zone.presetOrder" };
  const current = await tx
    .select({ id: table.id, name })
    .from(table)
    .where(eq(table.zoneId, zoneId))
    .orderBy(asc(table.position), asc(table.id));
  assertSameSet(
    current.map((c) => c.id),
    ids,
    what,
  );
  await applyListOrder(tx, list, zoneId, ids);
  const names = new Map(current.map((c) => [c.id, c.name]));
  return { field, before: current.map((c) => c.name), after: ids.map((id) => names.get(id)) };
}

export async function reorderSources({
  actor,
  zoneId,
  version,
  ids,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  ids: string[];
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.sources-reordered",
    summary: (zone) => `Reordered the sources of “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      return [await reorderList(tx, zone.id, "sources", ids)];
    },
  });
  return finish(actor.organizationId, [result]);
}

// ── stream presets ─────────────────────────────────────────────────────────

export async function createPreset({
  actor,
  zoneId,
  version,
  input,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  input: PresetForm & { directoryId?: string | null };
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.preset-added",
    summary: (zone) => `Added stream preset “${input.name}” to “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      await assertPresetSlotFree(tx, zone);
      await curveName(tx, actor, input.toneCurveId);
      await assertBandsFit(tx, zone, input.toneCurveId);
      const [{ last }] = await tx.select({ last: max(streamPresets.position) }).from(streamPresets).where(eq(streamPresets.zoneId, zone.id));
      const [row] = await tx
        .insert(streamPresets)
        .values({ zoneId: zone.id, position: (last ?? -1) + 1, ...input, directoryId: input.directoryId ?? null })
        .returning({ id: streamPresets.id });
      return [{ field: `preset.${row.id}`, before: null, after: input }];
    },
  });
  return finish(actor.organizationId, [result]);
}

export async function updatePreset({
  actor,
  zoneId,
  presetId,
  version,
  input,
}: {
  actor: Actor;
  zoneId: string;
  presetId: string;
  version: number;
  input: Partial<PresetForm>;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.preset-changed",
    summary: (zone) => `Changed stream preset “${input.name ?? "…"}” of “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      const preset = await loadPreset(tx, zone.id, presetId);
      if (input.toneCurveId !== undefined && input.toneCurveId !== preset.toneCurveId) {
        await curveName(tx, actor, input.toneCurveId);
        await assertBandsFit(tx, zone, input.toneCurveId);
      }
      const changes = changed(`preset.${preset.id}`, preset as unknown as Record<string, unknown>, input);
      if (changes.length) await tx.update(streamPresets).set({ ...input, updatedAt: new Date() }).where(eq(streamPresets.id, preset.id));
      return changes;
    },
  });
  return finish(actor.organizationId, [result]);
}

export async function deletePreset({
  actor,
  zoneId,
  presetId,
  version,
}: {
  actor: Actor;
  zoneId: string;
  presetId: string;
  version: number;
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.preset-removed",
    summary: (zone) => `Removed a stream preset from “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      const preset = await loadPreset(tx, zone.id, presetId);
      await tx.delete(streamPresets).where(eq(streamPresets.id, preset.id));
      await compactPositions(tx, "stream_presets", zone.id);
      return [{ field: `preset.${preset.id}`, before: { name: preset.name, streamUrl: preset.streamUrl }, after: null }];
    },
  });
  return finish(actor.organizationId, [result]);
}

export async function reorderPresets({
  actor,
  zoneId,
  version,
  ids,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  ids: string[];
}): Promise<BoardWriteResult> {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    // Households may reorder their favourite stations too (permission table).
    action: "preset:reorder",
    kind: "zone.presets-reordered",
    summary: (zone) => `Reordered the stream presets of “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      return [await reorderList(tx, zone.id, "stream_presets", ids)];
    },
  });
  return finish(actor.organizationId, [result]);
}

/** Move or copy a stream preset to another zone of the same home, appended at the end. */
export async function transferPreset({
  actor,
  zoneId,
  presetId,
  version,
  targetZoneId,
  targetVersion,
  mode,
}: {
  actor: Actor;
  zoneId: string;
  presetId: string;
  version: number;
  targetZoneId: string;
  targetVersion: number;
  mode: "move" | "copy";
}): Promise<BoardWriteResult> {
  if (targetZoneId === zoneId) {
    throw new AppError("zone:rule", { message: "Choose another zone: to change the order within a zone, drag the preset up or down." });
  }
  const results = await db.transaction(async (tx) => {
    // Lock both rows in id order so two opposite moves cannot deadlock.
    await tx
      .select({ id: zones.id })
      .from(zones)
      .where(and(inArray(zones.id, [zoneId, targetZoneId]), eq(zones.organizationId, actor.organizationId)))
      .orderBy(asc(zones.id))
      .for("update");
    const fromZone = await loadZoneForActor({ actor, zoneId, action: "zone:edit", tx });
    const preset = await loadPreset(tx, zoneId, presetId);
    const out: ZoneChangeResult[] = [];
    out.push(
      await changeZoneInTransaction(tx, {
        actor,
        zoneId: targetZoneId,
        expectedVersion: targetVersion,
        action: "zone:edit",
        kind: mode === "move" ? "zone.preset-moved-in" : "zone.preset-copied-in",
        summary: (zone) => `${mode === "move" ? "Moved" : "Copied"} stream preset “${preset.name}” to “${zone.name}”`,
        apply: async (tx2, target) => {
          if (target.homeId !== fromZone.homeId) {
            throw new AppError("zone:rule", { message: "Presets move between zones of the same home only." });
          }
          await assertZoneOpenFor(tx2, actor, target);
          await assertPresetSlotFree(tx2, target);
          await assertBandsFit(tx2, target, preset.toneCurveId);
          const [{ last }] = await tx2
            .select({ last: max(streamPresets.position) })
            .from(streamPresets)
            .where(eq(streamPresets.zoneId, target.id));
          const [row] = await tx2
            .insert(streamPresets)
            .values({
              zoneId: target.id,
              position: (last ?? -1) + 1,
              name: preset.name,
              streamUrl: preset.streamUrl,
              genre: preset.genre,
              directoryId: preset.directoryId,
              loudnessOffsetDb: preset.loudnessOffsetDb,
              toneCurveId: preset.toneCurveId,
            })
            .returning({ id: streamPresets.id });
          return [{ field: `preset.${row.id}`, before: null, after: { name: preset.name, from: fromZone.name } }];
        },
      }),
    );
    if (mode === "move") {
      out.push(
        await changeZoneInTransaction(tx, {
          actor,
          zoneId,
          expectedVersion: version,
          action: "zone:edit",
          kind: "zone.preset-moved-out",
          summary: (zone) => `Moved stream preset “${preset.name}” out of “${zone.name}”`,
          apply: async (tx2, source) => {
            await assertZoneOpenFor(tx2, actor, source);
            await tx2.delete(streamPresets).where(eq(streamPresets.id, presetId));
            await compactPositions(tx2, "stream_presets", source.id);
            return [{ field: `preset.${presetId}`, before: { name: preset.name, to: targetZoneId }, after: null }];
          },
        }),
      );
    } else {
      // A copy leaves the source zone as it is, but must be based on its current state.
      if (fromZone.version !== version) throw new AppError("zone:stale", { details: { currentVersion: fromZone.version } });
    }
    return out;
  });
  return finish(actor.organizationId, results);
}

// ── tone curves on cards ───────────────────────────────────────────────────

export async function attachCurve({
  actor,
  zoneId,
  version,
  target,
  toneCurveId,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  target: { type: "source" | "preset"; id: string } | { type: "zone" };
  toneCurveId: string | null;
}): Promise<BoardWriteResult> {
  let name: string | null = null;
  const onZone = target.type === "zone";
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: toneCurveId ? "zone.curve-attached" : "zone.curve-detached",
    summary: (zone) =>
      onZone
        ? toneCurveId
          ? `Made “${name}” the zone curve of “${zone.name}”`
          : `Removed the zone curve of “${zone.name}”`
        : toneCurveId
          ? `Attached tone curve “${name}” in “${zone.name}”`
          : `Detached a tone curve in “${zone.name}”`,
    apply: async (tx, zone) => {
      await assertZoneOpenFor(tx, actor, zone);
      name = await curveName(tx, actor, toneCurveId);
      if (target.type === "zone") {
        if (zone.toneCurveId === toneCurveId) return [];
        await assertZoneCurveFits(tx, zone, toneCurveId);
        await tx.update(zones).set({ toneCurveId, updatedAt: new Date() }).where(eq(zones.id, zone.id));
        return [{ field: "toneCurveId", before: zone.toneCurveId, after: toneCurveId }];
      }
      const row = target.type === "source" ? await loadSource(tx, zone.id, target.id) : await loadPreset(tx, zone.id, target.id);
      if (row.toneCurveId === toneCurveId) return [];
      await assertBandsFit(tx, zone, toneCurveId);
      if (target.type === "source") {
        await tx.update(sources).set({ toneCurveId, updatedAt: new Date() }).where(eq(sources.id, target.id));
      } else {
        await tx.update(streamPresets).set({ toneCurveId, updatedAt: new Date() }).where(eq(streamPresets.id, target.id));
      }
      return [{ field: `${target.type}.${target.id}.toneCurveId`, before: row.toneCurveId, after: toneCurveId }];
    },
  });
  return finish(actor.organizationId, [result]);
}
