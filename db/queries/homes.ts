import "server-only";
import { and, asc, count, desc, eq, ilike, inArray, isNull, or, sql, type SQL } from "drizzle-orm";
import { db } from "@/db/client";
import { homeAssignments, homes, zones } from "@/db/schema";
import { escapeLike } from "@/db/queries/like";
import { recordAudit, diffFields } from "@/db/queries/audit";
import { driftSummaryForHomes, type DriftCounts } from "@/db/queries/drift-summary";
import { AppError } from "@/lib/errors";
import { type Actor, can, visibleHomeIds } from "@/lib/permissions";
import type { HomeInput, HomeListQuery } from "@/lib/validation/homes";

export interface HomeRowDto {
  id: string;
  name: string;
  householdName: string;
  city: string;
  servicePlan: string;
  zoneCount: number;
  offlineDevices: number;
  updatedAt: string;
  /** Zones per drift state (in sync, pending, drifted, offline…). */
  drift: DriftCounts;
}

export interface HomeListDto {
  items: HomeRowDto[];
  total: number;
  page: number;
  pageSize: number;
}

// Correlated subqueries spelled out in SQL: drizzle leaves columns unqualified
// when a select has one table, which would bind them to the inner table.
const zoneCount = sql<number>`(select count(*)::int from zones z where z.home_id = "homes"."id" and z.deleted_at is null)`;
const offlineDevices = sql<number>`(select count(*)::int from devices d where d.home_id = "homes"."id" and d.online = false)`;


export async function listHomes({ actor, query }: { actor: Actor; query: HomeListQuery }): Promise<HomeListDto> {
  const filters: SQL[] = [eq(homes.organizationId, actor.organizationId)];
  const visible = visibleHomeIds(actor);
  if (visible) {
    if (visible.length === 0) return { items: [], total: 0, page: query.page, pageSize: query.pageSize };
    filters.push(inArray(homes.id, visible));
  }
  if (query.search) {
    const pattern = `%${escapeLike(query.search)}%`;
    filters.push(or(ilike(homes.name, pattern), ilike(homes.householdName, pattern), ilike(homes.city, pattern))!);
  }
  const where = and(...filters);
  // Sorting by zone count needs every home's count: one grouped pass over the
  // company's zones, joined, rather than a count per home. Otherwise the count
  // is worked out only for the rows of the page (PostgreSQL defers it past LIMIT).
  const byZones = query.sort === "zones";
  const zoneCounts = db
    .select({ homeId: zones.homeId, n: sql<number>`count(*)::int`.as("n") })
    .from(zones)
    .where(and(eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)))
    .groupBy(zones.homeId)
    .as("zc");
  const joinedCount = sql<number>`coalesce(${zoneCounts.n}, 0)`;
  const sortColumn = {
    name: homes.name,
    household: homes.householdName,
    city: homes.city,
    zones: joinedCount,
    updated: homes.updatedAt,
  }[query.sort];
  const order = query.dir === "desc" ? desc(sortColumn) : asc(sortColumn);

  const columns = {
    id: homes.id,
    name: homes.name,
    householdName: homes.householdName,
    city: homes.city,
    servicePlan: homes.servicePlan,
    updatedAt: homes.updatedAt,
    zoneCount: byZones ? joinedCount : zoneCount,
    offlineDevices,
  };
  const page = byZones
    ? db.select(columns).from(homes).leftJoin(zoneCounts, eq(zoneCounts.homeId, homes.id)).where(where)
    : db.select(columns).from(homes).where(where);
  const [rows, [{ total }]] = await Promise.all([
    page
      .orderBy(order, asc(homes.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ total: count() }).from(homes).where(where),
  ]);

  const drift = await driftSummaryForHomes(rows.map((r) => r.id));
  return {
    items: rows.map((r) => ({
      ...r,
      updatedAt: r.updatedAt.toISOString(),
      drift: drift.get(r.id) ?? { in_sync: 0, pending: 0, drifted: 0, offline: 0, never_reported: 0, no_device: 0 },
    })),
    total,
    page: query.page,
    pageSize: query.pageSize,
  };
}

export interface HomeDto {
  id: string;
  name: string;
  householdName: string;
  city: string;
  servicePlan: string;
  notes: string;
  version: number;
  updatedAt: string;
}

/** Load a home the actor may see; a home of another company is "not found". */
export async function getHomeForActor({ actor, homeId }: { actor: Actor; homeId: string }) {
  const [home] = await db
    .select({
      id: homes.id,
      organizationId: homes.organizationId,
      name: homes.name,
      householdName: homes.householdName,
      city: homes.city,
      servicePlan: homes.servicePlan,
      notes: homes.notes,
      version: homes.version,
      updatedAt: homes.updatedAt,
    })
    .from(homes)
    .where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId)));
  if (!home) throw new AppError("home:not-found");
  // A household member asking for someone else's home learns nothing either.
  if (!can(actor, "home:read", home)) {
    if (actor.role === "homeowner") throw new AppError("home:not-found");
    throw new AppError("auth:forbidden");
  }
  return home;
}

export function toHomeDto(home: Awaited<ReturnType<typeof getHomeForActor>>): HomeDto {
  return {
    id: home.id,
    name: home.name,
    householdName: home.householdName,
    city: home.city,
    servicePlan: home.servicePlan,
    notes: home.notes,
    version: home.version,
    updatedAt: home.updatedAt.toISOString(),
  };
}

export async function createHome({ actor, input }: { actor: Actor; input: HomeInput }): Promise<HomeDto> {
  if (!can(actor, "home:create")) throw new AppError("auth:forbidden");
  return db.transaction(async (tx) => {
    const [home] = await tx
      .insert(homes)
      .values({ organizationId: actor.organizationId, ...input })
      .returning();
    if (actor.role === "installer") {
      await tx.insert(homeAssignments).values({ homeId: home.id, userId: actor.userId });
    }
    await recordAudit(tx, actor, {
      kind: "home.created",
      summary: `Created home “${home.name}”`,
      homeId: home.id,
      changes: diffFields({}, input),
    });
    return toHomeDto(home);
  });
}

export async function updateHome({
  actor,
  homeId,
  input,
}: {
  actor: Actor;
  homeId: string;
  input: Partial<HomeInput> & { version: number };
}): Promise<HomeDto> {
  const home = await getHomeForActor({ actor, homeId });
  if (!can(actor, "home:update", home)) throw new AppError("auth:forbidden");
  const { version, ...fields } = input;
  return db.transaction(async (tx) => {
    const [updated] = await tx
      .update(homes)
      .set({ ...fields, version: sql`${homes.version} + 1`, updatedAt: new Date() })
      .where(and(eq(homes.id, homeId), eq(homes.version, version)))
      .returning();
    if (!updated) throw new AppError("zone:stale", { message: "Someone else changed this home. Reload and try again." });
    await recordAudit(tx, actor, {
      kind: "home.updated",
      summary: `Updated home “${updated.name}”`,
      homeId,
      changes: diffFields(home as unknown as Record<string, unknown>, fields),
    });
    return toHomeDto(updated);
  });
}
