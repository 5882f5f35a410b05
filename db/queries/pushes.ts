import "server-only";
import { and, asc, count, desc, eq, inArray, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { devices, homes, pushes, pushTargets, user, zoneRevisions, zones, type PushTargetState } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { targetStateLabels } from "@/lib/fleet/push-state";
import { type Actor, can } from "@/lib/permissions";
import type { PushDetailQuery, PushListQuery } from "@/lib/validation/pushes";

// Read models of pushes: the history table and one push with its targets.

export type TargetCounts = Record<PushTargetState, number>;

const emptyCounts = (): TargetCounts => ({
  queued: 0,
  sending: 0,
  awaiting_report: 0,
  applied: 0,
  failed: 0,
  superseded: 0,
  cancelled: 0,
});

export interface PushRowDto {
  id: string;
  scopeKind: string;
  scopeLabel: string;
  status: "running" | "finished" | "cancelled";
  createdBy: string | null;
  createdAt: string;
  finishedAt: string | null;
  total: number;
  counts: TargetCounts;
}

export interface PushListDto {
  items: PushRowDto[];
  total: number;
  page: number;
  pageSize: number;
  /** Any push still running: clients poll while true. */
  anyRunning: boolean;
}

async function countsFor(pushIds: string[]): Promise<Map<string, TargetCounts>> {
  const map = new Map<string, TargetCounts>();
  if (pushIds.length === 0) return map;
  const rows = await db
    .select({ pushId: pushTargets.pushId, state: pushTargets.state, n: count() })
    .from(pushTargets)
    .where(inArray(pushTargets.pushId, pushIds))
    .groupBy(pushTargets.pushId, pushTargets.state);
  for (const r of rows) {
    const c = map.get(r.pushId) ?? emptyCounts();
    c[r.state] = r.n;
    map.set(r.pushId, c);
  }
  return map;
}

export async function listPushes({ actor, query }: { actor: Actor; query: PushListQuery }): Promise<PushListDto> {
  if (!can(actor, "push:read")) throw new AppError("auth:forbidden");
  const where = eq(pushes.organizationId, actor.organizationId);
  const [rows, [{ total }], [{ running }]] = await Promise.all([
    db
      .select({
        id: pushes.id,
        scopeKind: pushes.scopeKind,
        scopeLabel: pushes.scopeLabel,
        status: pushes.status,
        createdAt: pushes.createdAt,
        finishedAt: pushes.finishedAt,
        createdBy: user.name,
      })
      .from(pushes)
      .leftJoin(user, eq(user.id, pushes.createdBy))
      .where(where)
      .orderBy(desc(pushes.createdAt), desc(pushes.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ total: count() }).from(pushes).where(where),
    db.select({ running: count() }).from(pushes).where(and(where, eq(pushes.status, "running"))),
  ]);
  const counts = await countsFor(rows.map((r) => r.id));
  return {
    items: rows.map((r) => {
      const c = counts.get(r.id) ?? emptyCounts();
      return {
        ...r,
        createdAt: r.createdAt.toISOString(),
        finishedAt: r.finishedAt?.toISOString() ?? null,
        counts: c,
        total: Object.values(c).reduce((a, b) => a + b, 0),
      };
    }),
    total,
    page: query.page,
    pageSize: query.pageSize,
    anyRunning: running > 0,
  };
}

export interface PushTargetDto {
  id: string;
  zoneId: string;
  zoneName: string;
  homeId: string;
  homeName: string;
  deviceId: string;
  deviceSerial: string;
  revisionNumber: number;
  state: PushTargetState;
  stateLabel: string;
  attempts: number;
  lastError: string | null;
  desiredVersion: number | null;
  sentAt: string | null;
  appliedAt: string | null;
  updatedAt: string;
}

export interface PushDetailDto {
  id: string;
  scopeKind: string;
  scopeLabel: string;
  status: "running" | "finished" | "cancelled";
  createdBy: string | null;
  createdAt: string;
  finishedAt: string | null;
  counts: TargetCounts;
  total: number;
  targets: PushTargetDto[];
  /** Targets matching the filter (the list is one page of them). */
  filteredTotal: number;
  page: number;
  pageSize: number;
  canRetry: boolean;
  canCancel: boolean;
}

export async function getPushDetail({ actor, pushId, query }: { actor: Actor; pushId: string; query: PushDetailQuery }): Promise<PushDetailDto> {
  if (!can(actor, "push:read")) throw new AppError("auth:forbidden");
  const [push] = await db
    .select({
      id: pushes.id,
      scopeKind: pushes.scopeKind,
      scopeLabel: pushes.scopeLabel,
      status: pushes.status,
      createdAt: pushes.createdAt,
      finishedAt: pushes.finishedAt,
      createdBy: user.name,
      organizationId: pushes.organizationId,
    })
    .from(pushes)
    .leftJoin(user, eq(user.id, pushes.createdBy))
    .where(and(eq(pushes.id, pushId), eq(pushes.organizationId, actor.organizationId)));
  if (!push) throw new AppError("push:not-found");

  const filter = query.state ? and(eq(pushTargets.pushId, pushId), eq(pushTargets.state, query.state)) : eq(pushTargets.pushId, pushId);
  // Failed first, then what is still moving, then the rest: what needs attention is on top.
  const stateOrder = sql`case ${pushTargets.state} when 'failed' then 0 when 'sending' then 1 when 'awaiting_report' then 2 when 'queued' then 3 else 4 end`;
  const [targets, [{ filteredTotal }], counts, homeRows] = await Promise.all([
    db
      .select({
        id: pushTargets.id,
        zoneId: pushTargets.zoneId,
        zoneName: zones.name,
        homeId: zones.homeId,
        homeName: homes.name,
        deviceId: pushTargets.deviceId,
        deviceSerial: devices.serial,
        revisionNumber: zoneRevisions.number,
        state: pushTargets.state,
        attempts: pushTargets.attempts,
        lastError: pushTargets.lastError,
        desiredVersion: pushTargets.desiredVersion,
        sentAt: pushTargets.sentAt,
        appliedAt: pushTargets.appliedAt,
        updatedAt: pushTargets.updatedAt,
      })
      .from(pushTargets)
      .innerJoin(zones, eq(zones.id, pushTargets.zoneId))
      .innerJoin(homes, eq(homes.id, zones.homeId))
      .innerJoin(devices, eq(devices.id, pushTargets.deviceId))
      .innerJoin(zoneRevisions, eq(zoneRevisions.id, pushTargets.revisionId))
      .where(filter)
      .orderBy(stateOrder, asc(homes.name), asc(zones.name))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ filteredTotal: count() }).from(pushTargets).where(filter),
    countsFor([pushId]),
    db
      .selectDistinct({ homeId: zones.homeId })
      .from(pushTargets)
      .innerJoin(zones, eq(zones.id, pushTargets.zoneId))
      .where(eq(pushTargets.pushId, pushId)),
  ]);
  const c = counts.get(pushId) ?? emptyCounts();
  const mayAct = homeRows.every((h) => {
    const home = { id: h.homeId, organizationId: push.organizationId };
    return can(actor, "push:create", home) || can(actor, "push:repush", home);
  });
  return {
    id: push.id,
    scopeKind: push.scopeKind,
    scopeLabel: push.scopeLabel,
    status: push.status,
    createdBy: push.createdBy,
    createdAt: push.createdAt.toISOString(),
    finishedAt: push.finishedAt?.toISOString() ?? null,
    counts: c,
    total: Object.values(c).reduce((a, b) => a + b, 0),
    targets: targets.map((t) => ({
      ...t,
      stateLabel: targetStateLabels[t.state],
      sentAt: t.sentAt?.toISOString() ?? null,
      appliedAt: t.appliedAt?.toISOString() ?? null,
      updatedAt: t.updatedAt.toISOString(),
    })),
    filteredTotal,
    page: query.page,
    pageSize: query.pageSize,
    canRetry: mayAct && c.failed > 0,
    canCancel: mayAct && c.queued > 0,
  };
}

/** Homes and templates a person can start a push for (the pushes page's "new push" panel). */
export async function listPushScopes({ actor }: { actor: Actor }) {
  if (!can(actor, "push:read")) throw new AppError("auth:forbidden");
  const homeRows = await db
    .select({
      id: homes.id,
      name: homes.name,
      zoneCount: sql<number>`(select count(*)::int from zones z where z.home_id = "homes"."id" and z.deleted_at is null)`,
    })
    .from(homes)
    .where(eq(homes.organizationId, actor.organizationId))
    .orderBy(asc(homes.name));
  const templateRows = await db.execute<{ id: string; name: string; zone_count: number }>(sql`
    select t.id, t.name, (select count(*)::int from zones z where z.template_id = t.id and z.deleted_at is null) as zone_count
    from zone_templates t where t.organization_id = ${actor.organizationId} order by t.name`);
  const pushable = homeRows.filter(
    (h) => can(actor, "push:create", { id: h.id, organizationId: actor.organizationId }) || can(actor, "push:repush", { id: h.id, organizationId: actor.organizationId }),
  );
  const homeNames = new Map(pushable.map((h) => [h.id, h.name] as const));
  // For choosing zones across homes; the list is searched in the browser, so it is capped.
  const zoneRows = pushable.length
    ? await db
        .select({ id: zones.id, name: zones.name, homeId: zones.homeId })
        .from(zones)
        .where(and(inArray(zones.homeId, pushable.map((h) => h.id)), sql`${zones.deletedAt} is null`, sql`${zones.deviceId} is not null`))
        .orderBy(asc(zones.name))
        .limit(5000)
    : [];
  return {
    homes: pushable.map((h) => ({ id: h.id, name: h.name, zoneCount: h.zoneCount })),
    templates: templateRows.rows.map((t) => ({ id: t.id, name: t.name, zoneCount: t.zone_count })),
    zones: zoneRows.map((z) => ({ id: z.id, name: z.name, homeName: homeNames.get(z.homeId)! })).sort((a, b) => a.homeName.localeCompare(b.homeName) || a.name.localeCompare(b.name)),
  };
}
