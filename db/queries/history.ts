import "server-only";
import { and, asc, count, desc, eq, gte, inArray, isNull, like, lt, or, sql, type SQL } from "drizzle-orm";
import { db } from "@/db/client";
import { auditEvents, homes, member, pushTargets, user, zoneRevisions, zones, type Zone } from "@/db/schema";
import { escapeLike } from "@/db/queries/like";
import { applyZoneConfig, CurveResolver } from "@/db/queries/apply-config";
import { finishPushIfDone } from "@/db/queries/push-targets";
import { changeZone, changeZoneInTransaction } from "@/db/queries/zone-writes";
import { AppError } from "@/lib/errors";
import { withJobs } from "@/lib/fleet/queue";
import { type Actor, can, visibleHomeIds } from "@/lib/permissions";
import { diffZoneConfigs, summarizeDiff, toAuditChanges, type ConfigDiff } from "@/lib/zones/config-diff";
import { zoneConfigSchema, type ZoneConfig } from "@/lib/validation/zone-config";
import { activityRange, type ActivityFilters, type ActivityQuery, type RevisionListQuery } from "@/lib/validation/history";

// Zone history (revisions, compare, restore, soft delete) and the activity
// trail. Reads start from the actor's company; writes go through changeZone.

// ── zones, including deleted ones ──────────────────────────────────────────

export interface HistoryZone {
  zone: Zone;
  homeName: string;
  deleted: boolean;
}

/**
 * The zone for its history pages: like loadZoneForActor, but a deleted zone is
 * still found — by those who may read deleted zones' history (integrators and
 * the owner); everyone else gets the same 404 as for a zone that never was.
 */
export async function loadZoneForHistory({ actor, zoneId }: { actor: Actor; zoneId: string }): Promise<HistoryZone> {
  const [row] = await db
    .select({ zone: zones, homeName: homes.name })
    .from(zones)
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .where(and(eq(zones.id, zoneId), eq(zones.organizationId, actor.organizationId)));
  if (!row) throw new AppError("zone:not-found");
  const home = { id: row.zone.homeId, organizationId: row.zone.organizationId };
  if (!can(actor, "zone:read", home)) throw new AppError("zone:not-found");
  const deleted = row.zone.deletedAt !== null;
  if (deleted && !can(actor, "zone:read-deleted", home)) throw new AppError("zone:not-found");
  return { zone: row.zone, homeName: row.homeName, deleted };
}

export interface HistoryZoneDto {
  id: string;
  name: string;
  homeId: string;
  homeName: string;
  version: number;
  currentRevisionId: string | null;
  deletedAt: string | null;
  /** What the viewer may do here (the server checks again on every request). */
  canRestore: boolean;
  canDelete: boolean;
}

export function toHistoryZoneDto(actor: Actor, h: HistoryZone): HistoryZoneDto {
  const home = { id: h.zone.homeId, organizationId: h.zone.organizationId };
  return {
    id: h.zone.id,
    name: h.zone.name,
    homeId: h.zone.homeId,
    homeName: h.homeName,
    version: h.zone.version,
    currentRevisionId: h.zone.currentRevisionId,
    deletedAt: h.zone.deletedAt?.toISOString() ?? null,
    canRestore: !h.deleted && can(actor, "zone:edit", home),
    canDelete: !h.deleted && can(actor, "zone:delete", home),
  };
}

// ── revisions ──────────────────────────────────────────────────────────────

export interface RevisionDto {
  id: string;
  number: number;
  contentHash: string;
  authorName: string | null;
  message: string | null;
  createdAt: string;
  current: boolean;
  /** What changed since the revision before it ("First revision" for number 1). */
  summary: string;
  changeCount: number;
}

export interface RevisionListDto {
  zone: HistoryZoneDto;
  items: RevisionDto[];
  total: number;
  page: number;
  pageSize: number;
}

const revisionColumns = {
  id: zoneRevisions.id,
  number: zoneRevisions.number,
  contentHash: zoneRevisions.contentHash,
  config: zoneRevisions.config,
  message: zoneRevisions.message,
  createdAt: zoneRevisions.createdAt,
  authorName: user.name,
};

/** Stored configurations are parsed, so an older or damaged one fails clearly. */
function parseStoredConfig(config: unknown, number: number): ZoneConfig {
  const parsed = zoneConfigSchema.safeParse(config);
  if (!parsed.success) {
    throw new AppError("zone:rule", { message: `Revision ${number} is stored in a format this version cannot read.` });
  }
  return parsed.data;
}

export async function listRevisions({
  actor,
  zoneId,
  query,
}: {
  actor: Actor;
  zoneId: string;
  query: RevisionListQuery;
}): Promise<RevisionListDto> {
  const h = await loadZoneForHistory({ actor, zoneId });
  const offset = (query.page - 1) * query.pageSize;
  // One extra row: the revision before the oldest on this page, to summarise it.
  const [rows, [{ total }]] = await Promise.all([
    db
      .select(revisionColumns)
      .from(zoneRevisions)
      .leftJoin(user, eq(user.id, zoneRevisions.authorId))
      .where(eq(zoneRevisions.zoneId, zoneId))
      .orderBy(desc(zoneRevisions.number))
      .limit(query.pageSize + 1)
      .offset(offset),
    db.select({ total: count() }).from(zoneRevisions).where(eq(zoneRevisions.zoneId, zoneId)),
  ]);
  const items = rows.slice(0, query.pageSize).map((r, i) => {
    const previous = rows[i + 1];
    let diff: ConfigDiff | null = null;
    if (previous) {
      const a = zoneConfigSchema.safeParse(previous.config);
      const b = zoneConfigSchema.safeParse(r.config);
      if (a.success && b.success) diff = diffZoneConfigs(a.data, b.data);
    }
    return {
      id: r.id,
      number: r.number,
      contentHash: r.contentHash,
      authorName: r.authorName,
      message: r.message,
      createdAt: r.createdAt.toISOString(),
      current: r.id === h.zone.currentRevisionId,
      summary: previous ? (diff ? summarizeDiff(diff) : "Stored in an older format") : r.number === 1 ? "First revision" : "",
      changeCount: diff?.changes.length ?? 0,
    };
  });
  return { zone: toHistoryZoneDto(actor, h), items, total, page: query.page, pageSize: query.pageSize };
}

export interface RevisionDetailDto extends RevisionDto {
  config: ZoneConfig;
}

async function loadRevision(zone: Zone, ref: string) {
  const id = ref === "current" ? zone.currentRevisionId : ref;
  if (!id) throw new AppError("revision:not-found");
  const [row] = await db
    .select(revisionColumns)
    .from(zoneRevisions)
    .leftJoin(user, eq(user.id, zoneRevisions.authorId))
    .where(and(eq(zoneRevisions.id, id), eq(zoneRevisions.zoneId, zone.id)));
  if (!row) throw new AppError("revision:not-found");
  return row;
}

function toRevisionDetail(zone: Zone, row: Awaited<ReturnType<typeof loadRevision>>): RevisionDetailDto {
  return {
    id: row.id,
    number: row.number,
    contentHash: row.contentHash,
    authorName: row.authorName,
    message: row.message,
    createdAt: row.createdAt.toISOString(),
    current: row.id === zone.currentRevisionId,
    summary: "",
    changeCount: 0,
    config: parseStoredConfig(row.config, row.number),
  };
}

export async function getRevision({ actor, zoneId, revisionId }: { actor: Actor; zoneId: string; revisionId: string }) {
  const h = await loadZoneForHistory({ actor, zoneId });
  return { zone: toHistoryZoneDto(actor, h), revision: toRevisionDetail(h.zone, await loadRevision(h.zone, revisionId)) };
}

export interface CompareDto {
  zone: HistoryZoneDto;
  from: Omit<RevisionDetailDto, "config">;
  to: Omit<RevisionDetailDto, "config">;
  diff: ConfigDiff;
}

export async function compareRevisions({
  actor,
  zoneId,
  from,
  to,
}: {
  actor: Actor;
  zoneId: string;
  from: string;
  to: string;
}): Promise<CompareDto> {
  const h = await loadZoneForHistory({ actor, zoneId });
  const [a, b] = await Promise.all([loadRevision(h.zone, from), loadRevision(h.zone, to)]);
  const { config: ca, ...fromMeta } = toRevisionDetail(h.zone, a);
  const { config: cb, ...toMeta } = toRevisionDetail(h.zone, b);
  const diff = diffZoneConfigs(ca, cb);
  return { zone: toHistoryZoneDto(actor, h), from: fromMeta, to: toMeta, diff };
}

export interface RestoreResultDto {
  zoneId: string;
  version: number;
  restoredFrom: number;
  revision: { id: string; number: number; contentHash: string; created: boolean };
  changes: { field: string; before: unknown; after: unknown }[];
  curves: { name: string; outcome: string }[];
}

/**
 * Make an earlier revision the zone's desired configuration again. The result
 * is a new revision (history is never rewritten) and an audit event.
 */
export async function restoreRevision({
  actor,
  zoneId,
  revisionId,
  expectedVersion,
  message,
}: {
  actor: Actor;
  zoneId: string;
  revisionId: string;
  expectedVersion: number;
  message?: string;
}): Promise<RestoreResultDto> {
  const h = await loadZoneForHistory({ actor, zoneId });
  if (h.deleted) throw new AppError("zone:deleted");
  if (!can(actor, "zone:edit", { id: h.zone.homeId, organizationId: h.zone.organizationId })) {
    throw new AppError("auth:forbidden", { message: "Your role may not restore revisions. Support may re-push a known-good revision instead." });
  }
  const row = await loadRevision(h.zone, revisionId);
  const config = parseStoredConfig(row.config, row.number);
  let curves: RestoreResultDto["curves"] = [];
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion,
    action: "zone:edit",
    kind: "zone.restored",
    templateOverrides: "skip",
    summary: (z) => `Restored “${z.name}” to revision ${row.number}`,
    message: message ? `Restored from revision ${row.number}: ${message}` : `Restored from revision ${row.number}`,
    apply: async (tx, zone) => {
      const resolver = new CurveResolver(tx, actor, { createdDescription: `Recreated when “${zone.name}” was restored to revision ${row.number}.` });
      const applied = await applyZoneConfig(tx, {
        actor,
        zone,
        config,
        curves: resolver,
        lockReason: `Locked by restoring revision ${row.number}`,
      });
      if (applied.diff.identical) {
        throw new AppError("zone:rule", { message: `Revision ${row.number} is the same as the current configuration; there is nothing to restore.` });
      }
      curves = resolver.resolutions.map((r) => ({ name: r.curveName, outcome: r.outcome }));
      return [{ field: "Restored from revision", before: null, after: row.number }, ...toAuditChanges(applied.diff)];
    },
  });
  return {
    zoneId,
    version: result.version,
    restoredFrom: row.number,
    revision: result.revision,
    changes: result.changes,
    curves,
  };
}

/**
 * Soft delete: the zone leaves the home; its revisions and audit trail stay
 * readable. Push targets of the zone not sent yet are cancelled (their push
 * finishes if nothing else is left); those already sent settle as usual.
 */
export async function deleteZone({ actor, zoneId, expectedVersion }: { actor: Actor; zoneId: string; expectedVersion: number }) {
  const result = await withJobs((tx, jobs) =>
    changeZoneInTransaction(tx, {
      actor,
      zoneId,
      expectedVersion,
      action: "zone:delete",
      kind: "zone.deleted",
      summary: (z) => `Deleted zone “${z.name}”`,
      apply: async (tx, zone) => {
        const now = new Date();
        // The device is released so it can serve another zone; the revisions keep its configuration.
        await tx.update(zones).set({ deletedAt: now, deviceId: null }).where(eq(zones.id, zone.id));
        const cancelled = await tx
          .update(pushTargets)
          .set({ state: "cancelled", lastError: `Zone “${zone.name}” was deleted before this was sent.`, updatedAt: sql`now()` })
          .where(and(eq(pushTargets.zoneId, zone.id), eq(pushTargets.state, "queued")))
          .returning({ pushId: pushTargets.pushId });
        for (const pushId of new Set(cancelled.map((c) => c.pushId))) await finishPushIfDone(tx, pushId, jobs);
        return [
          { field: "deletedAt", before: null, after: now.toISOString() },
          ...(zone.deviceId ? [{ field: "deviceId", before: zone.deviceId, after: null }] : []),
          ...(cancelled.length ? [{ field: "pending push targets cancelled", before: null, after: cancelled.length }] : []),
        ];
      },
    }),
  );
  return { zoneId, version: result.version, deleted: true };
}

// ── zones of a home, with their history ────────────────────────────────────

export interface HomeZoneHistoryDto {
  id: string;
  name: string;
  revisionCount: number;
  lastChangeAt: string | null;
  deletedAt: string | null;
}

export async function listHomeZoneHistories({ actor, homeId }: { actor: Actor; homeId: string }): Promise<HomeZoneHistoryDto[]> {
  const home = { id: homeId, organizationId: actor.organizationId };
  if (!can(actor, "zone:read", home)) return [];
  const showDeleted = can(actor, "zone:read-deleted", home);
  const rows = await db
    .select({
      id: zones.id,
      name: zones.name,
      deletedAt: zones.deletedAt,
      revisionCount: sql<number>`(select count(*)::int from zone_revisions r where r.zone_id = "zones"."id")`,
      lastChangeAt: sql<Date | null>`(select max(r.created_at) from zone_revisions r where r.zone_id = "zones"."id")`,
    })
    .from(zones)
    .where(and(eq(zones.homeId, homeId), eq(zones.organizationId, actor.organizationId), showDeleted ? undefined : isNull(zones.deletedAt)))
    .orderBy(sql`${zones.deletedAt} is not null`, asc(zones.position), asc(zones.name));
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    revisionCount: r.revisionCount,
    lastChangeAt: r.lastChangeAt ? new Date(r.lastChangeAt).toISOString() : null,
    deletedAt: r.deletedAt?.toISOString() ?? null,
  }));
}

// ── activity ───────────────────────────────────────────────────────────────

export interface ActivityItemDto {
  id: number;
  createdAt: string;
  actorUserId: string | null;
  actorName: string;
  actorRole: string;
  kind: string;
  summary: string;
  homeId: string | null;
  homeName: string | null;
  zoneId: string | null;
  zoneName: string | null;
  zoneDeleted: boolean;
  changes: { field: string; before: unknown; after: unknown }[];
}

export interface ActivityListDto {
  items: ActivityItemDto[];
  total: number;
  page: number;
  pageSize: number;
}


function activityWhere(actor: Actor, f: ActivityFilters): SQL {
  const filters: SQL[] = [eq(auditEvents.organizationId, actor.organizationId)];
  // Fail closed: a role that may see only some homes sees only their events.
  const visible = visibleHomeIds(actor);
  if (visible) filters.push(visible.length ? inArray(auditEvents.homeId, visible) : sql`false`);
  if (f.person) filters.push(eq(auditEvents.actorUserId, f.person));
  if (f.home) filters.push(eq(auditEvents.homeId, f.home));
  if (f.zone) filters.push(eq(auditEvents.zoneId, f.zone));
  if (f.kind) {
    filters.push(f.kind.endsWith(".") ? like(auditEvents.kind, `${escapeLike(f.kind)}%`) : eq(auditEvents.kind, f.kind));
  }
  const { start, end } = activityRange(f);
  if (start) filters.push(gte(auditEvents.createdAt, start));
  if (end) filters.push(lt(auditEvents.createdAt, end));
  return and(...filters)!;
}

function assertMayReadActivity(actor: Actor, homeId?: string) {
  if (!can(actor, "audit:read")) throw new AppError("auth:forbidden");
  if (homeId && !can(actor, "audit:read", { id: homeId, organizationId: actor.organizationId })) throw new AppError("auth:forbidden");
}

const activityColumns = {
  id: auditEvents.id,
  createdAt: auditEvents.createdAt,
  actorUserId: auditEvents.actorUserId,
  actorName: auditEvents.actorName,
  actorRole: auditEvents.actorRole,
  kind: auditEvents.kind,
  summary: auditEvents.summary,
  homeId: auditEvents.homeId,
  homeName: homes.name,
  zoneId: auditEvents.zoneId,
  zoneName: zones.name,
  zoneDeletedAt: zones.deletedAt,
  changes: auditEvents.changes,
};

type ActivityRow = {
  id: number;
  createdAt: Date;
  actorUserId: string | null;
  actorName: string;
  actorRole: string;
  kind: string;
  summary: string;
  homeId: string | null;
  homeName: string | null;
  zoneId: string | null;
  zoneName: string | null;
  zoneDeletedAt: Date | null;
  changes: { field: string; before: unknown; after: unknown }[];
};

function toActivityItem(r: ActivityRow): ActivityItemDto {
  return {
    id: r.id,
    createdAt: r.createdAt.toISOString(),
    actorUserId: r.actorUserId,
    actorName: r.actorName,
    actorRole: r.actorRole,
    kind: r.kind,
    summary: r.summary,
    homeId: r.homeId,
    homeName: r.homeName,
    zoneId: r.zoneId,
    zoneName: r.zoneName,
    zoneDeleted: r.zoneDeletedAt !== null,
    changes: r.changes ?? [],
  };
}

function activityBase() {
  return db
    .select(activityColumns)
    .from(auditEvents)
    .leftJoin(homes, eq(homes.id, auditEvents.homeId))
    // zone_id has no foreign key (history outlives rows); join on the same company only.
    .leftJoin(zones, and(eq(zones.id, auditEvents.zoneId), eq(zones.organizationId, auditEvents.organizationId)));
}

export async function listActivity({ actor, query }: { actor: Actor; query: ActivityQuery }): Promise<ActivityListDto> {
  assertMayReadActivity(actor, query.home);
  const where = activityWhere(actor, query);
  const [rows, [{ total }]] = await Promise.all([
    activityBase()
      .where(where)
      .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ total: count() }).from(auditEvents).where(where),
  ]);
  return { items: rows.map(toActivityItem), total, page: query.page, pageSize: query.pageSize };
}

export const ACTIVITY_EXPORT_LIMIT = 100_000;
const EXPORT_BATCH = 1_000;

/**
 * The filtered trail, newest first, in batches by keyset (time, id) so an
 * export of many rows never holds them all in memory. Stops at `limit`.
 */
export async function countActivity({ actor, filters }: { actor: Actor; filters: ActivityFilters }): Promise<number> {
  assertMayReadActivity(actor, filters.home);
  const [{ total }] = await db.select({ total: count() }).from(auditEvents).where(activityWhere(actor, filters));
  return total;
}

export async function* activityBatches({
  actor,
  filters,
  limit = ACTIVITY_EXPORT_LIMIT,
  batchSize = EXPORT_BATCH,
}: {
  actor: Actor;
  filters: ActivityFilters;
  limit?: number;
  batchSize?: number;
}): AsyncGenerator<ActivityItemDto[]> {
  assertMayReadActivity(actor, filters.home);
  const where = activityWhere(actor, filters);
  // The cursor keeps the timestamp as PostgreSQL's own text: a JS Date has only
  // milliseconds, and rounding would skip rows within the same millisecond.
  let after: { at: string; id: number } | null = null;
  let sent = 0;
  while (sent < limit) {
    const cursor: SQL | undefined = after
      ? sql`(${auditEvents.createdAt} < ${after.at}::timestamptz or (${auditEvents.createdAt} = ${after.at}::timestamptz and ${auditEvents.id} < ${after.id}))`
      : undefined;
    const rows: (ActivityRow & { cursorAt: string })[] = await db
      .select({ ...activityColumns, cursorAt: sql<string>`${auditEvents.createdAt}::text` })
      .from(auditEvents)
      .leftJoin(homes, eq(homes.id, auditEvents.homeId))
      .leftJoin(zones, and(eq(zones.id, auditEvents.zoneId), eq(zones.organizationId, auditEvents.organizationId)))
      .where(cursor ? and(where, cursor) : where)
      .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
      .limit(Math.min(batchSize, limit - sent));
    if (rows.length === 0) return;
    sent += rows.length;
    const last: ActivityRow & { cursorAt: string } = rows[rows.length - 1];
    after = { at: last.cursorAt, id: last.id };
    yield rows.map(toActivityItem);
    if (rows.length < batchSize) return;
  }
}

export interface ActivityFacetsDto {
  people: { id: string; name: string; role: string }[];
  homes: { id: string; name: string }[];
  kinds: string[];
}

/** Choices for the activity filters: the company's people and homes, and the kinds seen. */
export async function activityFacets({ actor }: { actor: Actor }): Promise<ActivityFacetsDto> {
  assertMayReadActivity(actor);
  const [people, homeRows, kinds] = await Promise.all([
    db
      .select({ id: user.id, name: user.name, role: member.role })
      .from(member)
      .innerJoin(user, eq(user.id, member.userId))
      .where(eq(member.organizationId, actor.organizationId))
      .orderBy(asc(user.name)),
    db.select({ id: homes.id, name: homes.name }).from(homes).where(eq(homes.organizationId, actor.organizationId)).orderBy(asc(homes.name)),
    db
      .selectDistinct({ kind: auditEvents.kind })
      .from(auditEvents)
      .where(eq(auditEvents.organizationId, actor.organizationId))
      .orderBy(asc(auditEvents.kind)),
  ]);
  return { people, homes: homeRows, kinds: kinds.map((k) => k.kind) };
}
