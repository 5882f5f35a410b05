import "server-only";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { homes, sources, streamPresets, toneCurveBands, toneCurves, zoneRevisions, zones, type Zone } from "@/db/schema";
import { recordAudit, type FieldChange } from "@/db/queries/audit";
import { AppError } from "@/lib/errors";
import { type Action, type Actor, can } from "@/lib/permissions";
import { buildZoneConfig, type CurveForConfig } from "@/lib/zones/build-config";
import { contentHash } from "@/lib/zones/content-hash";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { addOverrides, overridePathsForEdit } from "@/lib/zones/template-merge";

// The one path by which a zone's desired configuration changes. Every change:
// locks the zone row, checks tenant, role and the version it was based on,
// applies, bumps the version, snapshots an immutable revision (skipped when the
// content is identical) and writes an audit event — all in one transaction.

type Executor = Transaction | typeof db;

/** A zone the actor may see, or a 404 (another company's zone looks absent). */
export async function loadZoneForActor({
  actor,
  zoneId,
  action = "zone:read",
  tx = db,
  forUpdate = false,
}: {
  actor: Actor;
  zoneId: string;
  action?: Action;
  tx?: Executor;
  forUpdate?: boolean;
}): Promise<Zone> {
  const base = tx
    .select()
    .from(zones)
    .where(and(eq(zones.id, zoneId), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)));
  const [zone] = forUpdate ? await base.for("update") : await base;
  if (!zone) throw new AppError("zone:not-found");
  const home = { id: zone.homeId, organizationId: zone.organizationId };
  if (!can(actor, "zone:read", home)) throw new AppError("zone:not-found");
  if (action !== "zone:read" && !can(actor, action, home)) throw new AppError("auth:forbidden");
  return zone;
}

export async function loadCurvesForConfig(tx: Executor, curveIds: string[]): Promise<Map<string, CurveForConfig>> {
  const ids = [...new Set(curveIds)];
  const map = new Map<string, CurveForConfig>();
  if (ids.length === 0) return map;
  const [curveRows, bandRows] = await Promise.all([
    tx.select({ id: toneCurves.id, name: toneCurves.name }).from(toneCurves).where(inArray(toneCurves.id, ids)),
    tx.select().from(toneCurveBands).where(inArray(toneCurveBands.curveId, ids)).orderBy(asc(toneCurveBands.position)),
  ]);
  for (const c of curveRows) {
    map.set(c.id, {
      id: c.id,
      name: c.name,
      bands: bandRows
        .filter((b) => b.curveId === c.id)
        .map((b) => ({ type: b.type, frequencyHz: b.frequencyHz, gainDb: b.gainDb, q: b.q, enabled: b.enabled })),
    });
  }
  return map;
}

/** The zone's whole desired configuration as it stands in the tables now. */
export async function loadZoneConfig(tx: Executor, zoneId: string): Promise<ZoneConfig> {
  const [zone] = await tx.select().from(zones).where(eq(zones.id, zoneId));
  if (!zone) throw new AppError("zone:not-found");
  const [sourceRows, presetRows] = await Promise.all([
    tx.select().from(sources).where(eq(sources.zoneId, zoneId)),
    tx.select().from(streamPresets).where(eq(streamPresets.zoneId, zoneId)),
  ]);
  const curves = await loadCurvesForConfig(tx, [
    ...(zone.toneCurveId ? [zone.toneCurveId] : []),
    ...sourceRows.flatMap((s) => (s.toneCurveId ? [s.toneCurveId] : [])),
    ...presetRows.flatMap((p) => (p.toneCurveId ? [p.toneCurveId] : [])),
  ]);
  return buildZoneConfig({ zone, sources: sourceRows, presets: presetRows, curves });
}

export interface RevisionRef {
  id: string;
  number: number;
  contentHash: string;
  created: boolean;
}

/**
 * Snapshot the zone as a revision unless the latest one has the same content.
 * `config`: the zone's configuration when the caller has just loaded it.
 */
export async function snapshotZone(
  tx: Transaction,
  {
    zoneId,
    organizationId,
    authorId,
    message,
    config: loaded,
  }: { zoneId: string; organizationId: string; authorId: string | null; message?: string | null; config?: ZoneConfig },
): Promise<RevisionRef> {
  const config = loaded ?? (await loadZoneConfig(tx, zoneId));
  const hash = contentHash(config);
  const [latest] = await tx
    .select({ id: zoneRevisions.id, number: zoneRevisions.number, contentHash: zoneRevisions.contentHash })
    .from(zoneRevisions)
    .where(eq(zoneRevisions.zoneId, zoneId))
    .orderBy(desc(zoneRevisions.number))
    .limit(1);
  if (latest && latest.contentHash === hash) {
    await tx.update(zones).set({ currentRevisionId: latest.id }).where(eq(zones.id, zoneId));
    return { ...latest, created: false };
  }
  const number = (latest?.number ?? 0) + 1;
  const [row] = await tx
    .insert(zoneRevisions)
    .values({ organizationId, zoneId, number, contentHash: hash, config, authorId, message: message ?? null })
    .returning({ id: zoneRevisions.id, number: zoneRevisions.number, contentHash: zoneRevisions.contentHash });
  await tx.update(zones).set({ currentRevisionId: row.id }).where(eq(zones.id, zoneId));
  return { ...row, created: true };
}

export interface ZoneChangeResult {
  zoneId: string;
  version: number;
  revision: RevisionRef;
  changes: FieldChange[];
}

export interface ZoneChangeInput {
  actor: Actor;
  zoneId: string;
  /** The version the edit was based on; `null` only for system-driven changes. */
  expectedVersion: number | null;
  action: Action;
  kind: string;
  summary: string | ((zone: Zone) => string);
  message?: string | null;
  apply: (tx: Transaction, zone: Zone) => Promise<FieldChange[]>;
  /**
   * A zone made from a template remembers the fields edited in the zone itself
   * (`zones.overrides`), so a later template update keeps them. "skip" for
   * writes that are not local edits: a template update, setting the overrides
   * themselves, restoring a revision or a backup, rolling back.
   */
  templateOverrides?: "track" | "skip";
}

/**
 * Change a zone. `apply` runs inside the transaction with the locked zone row
 * and returns the field-by-field changes for the audit trail (or throws an
 * AppError, which rolls everything back).
 */
export async function changeZone(input: ZoneChangeInput): Promise<ZoneChangeResult> {
  return db.transaction((tx) => changeZoneInTransaction(tx, input));
}

/**
 * The same change inside a transaction the caller already holds, for writes
 * that must change two zones atomically (moving a stream preset between zones).
 * The caller locks both zone rows first, in id order, so two opposite moves
 * cannot deadlock.
 */
export async function changeZoneInTransaction(
  tx: Transaction,
  { actor, zoneId, expectedVersion, action, kind, summary, message, apply, templateOverrides = "track" }: ZoneChangeInput,
): Promise<ZoneChangeResult> {
  const zone = await loadZoneForActor({ actor, zoneId, action, tx, forUpdate: true });
  if (expectedVersion !== null && expectedVersion !== zone.version) {
    throw new AppError("zone:stale", { details: { currentVersion: zone.version } });
  }
  const tracked = zone.templateId !== null && templateOverrides === "track" ? await loadZoneConfig(tx, zoneId) : null;
  const changes = await apply(tx, zone);
  // Neither the overrides nor the version below are part of the configuration, so
  // what is read here is also what the revision snapshot stores.
  const after = tracked ? await loadZoneConfig(tx, zoneId) : undefined;
  if (tracked && after) {
    const next = addOverrides(zone.overrides, overridePathsForEdit(tracked, after));
    if (next.length !== zone.overrides.length) await tx.update(zones).set({ overrides: next }).where(eq(zones.id, zoneId));
  }
  const [updated] = await tx
    .update(zones)
    .set({ version: sql`${zones.version} + 1`, updatedAt: new Date() })
    .where(eq(zones.id, zoneId))
    .returning({ version: zones.version });
  await tx.update(homes).set({ updatedAt: new Date() }).where(eq(homes.id, zone.homeId));
  const revision = await snapshotZone(tx, { zoneId, organizationId: zone.organizationId, authorId: actor.userId, message, config: after });
  await recordAudit(tx, actor, {
    kind,
    summary: typeof summary === "function" ? summary(zone) : summary,
    homeId: zone.homeId,
    zoneId,
    changes,
  });
  return { zoneId, version: updated.version, revision, changes };
}

/** Guest controls may change only while unlocked — or by a role that may unlock. */
export function assertGuestControlsEditable(actor: Actor, zone: Zone) {
  if (!zone.guestLocked) return;
  if (can(actor, "guest:unlock", { id: zone.homeId, organizationId: zone.organizationId })) return;
  throw new AppError("zone:locked", {
    message: `Guest controls are locked${zone.lockReason ? `: ${zone.lockReason}` : ""}. Only support, an integrator or the owner can unlock them.`,
    details: { lockedBy: zone.lockedBy, lockedAt: zone.lockedAt?.toISOString() ?? null, reason: zone.lockReason },
  });
}

/** Set every row's position from its index in `ids`, in one statement (callers check the set first). */
export async function applyListOrder(tx: Transaction, table: "sources" | "stream_presets", zoneId: string, ids: string[]) {
  const literal = `{${ids.join(",")}}`;
  await tx.execute(sql`
    update ${sql.identifier(table)} set position = array_position(${literal}::uuid[], id) - 1, updated_at = now()
    where zone_id = ${zoneId}`);
}
