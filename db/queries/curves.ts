import "server-only";
import { and, asc, eq, inArray, isNull, sql } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { homes, sources, streamPresets, toneCurveBands, toneCurves, zones } from "@/db/schema";
import { recordAudit, type FieldChange } from "@/db/queries/audit";
import { snapshotZone } from "@/db/queries/zone-writes";
import { largestBoostDb } from "@/lib/audio/tone-curve";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";
import { MAX_LIBRARY_BANDS, type CurveCreateInput, type CurveUpdateInput } from "@/lib/validation/curves";
import type { ConfigBand } from "@/lib/validation/zone-config";
import { zoneBandProblem, type ZoneCurveUse } from "@/lib/zones/curve-fit";
import { canonicalJson } from "@/lib/zones/content-hash";

// The tone-curve library: list, read (with where each curve is attached),
// create, edit (compare-and-set on the curve's version), duplicate, delete
// while unused, import. Editing an attached curve changes the desired
// configuration of every zone that uses it, so the same transaction locks
// those zones (in id order, so two edits cannot deadlock), snapshots a new
// revision for each and audits it.

type Executor = Transaction | typeof db;

export interface CurveBandDto {
  type: ConfigBand["type"];
  frequencyHz: number;
  gainDb: number;
  q: number;
  enabled: boolean;
}

export interface CurveSummaryDto {
  id: string;
  name: string;
  description: string;
  version: number;
  bandCount: number;
  /** Largest boost of the combined curve, dB (>= 0). */
  largestBoostDb: number;
  /** Zones, sources and stations it is attached to. */
  attachedCount: number;
  /** Zones whose device has fewer EQ bands than their curves need. */
  misfitZoneCount: number;
  updatedAt: string;
}

export interface CurveAttachmentDto {
  kind: "zone" | "source" | "preset";
  /** The source's or station's id; the zone's id for kind "zone". */
  targetId: string;
  label: string;
  zoneId: string;
  zoneName: string;
  homeId: string;
  homeName: string;
  /** Set when the zone's device cannot hold the bands its curves need. */
  fitProblem: string | null;
}

export interface CurveDetailDto extends CurveSummaryDto {
  bands: CurveBandDto[];
  attachments: CurveAttachmentDto[];
  maxBands: number;
  may: { edit: boolean };
}

function requireRead(actor: Actor) {
  if (!can(actor, "library:read")) throw new AppError("auth:forbidden");
}

function requireEdit(actor: Actor) {
  if (!can(actor, "curve:edit")) throw new AppError("auth:forbidden");
}

const iso = (d: Date) => d.toISOString();

async function bandsOf(ex: Executor, curveIds: string[]): Promise<Map<string, CurveBandDto[]>> {
  const map = new Map<string, CurveBandDto[]>();
  if (curveIds.length === 0) return map;
  const rows = await ex
    .select({
      curveId: toneCurveBands.curveId,
      type: toneCurveBands.type,
      frequencyHz: toneCurveBands.frequencyHz,
      gainDb: toneCurveBands.gainDb,
      q: toneCurveBands.q,
      enabled: toneCurveBands.enabled,
    })
    .from(toneCurveBands)
    .where(inArray(toneCurveBands.curveId, curveIds))
    .orderBy(asc(toneCurveBands.curveId), asc(toneCurveBands.position));
  for (const { curveId, ...band } of rows) {
    const list = map.get(curveId) ?? [];
    list.push(band);
    map.set(curveId, list);
  }
  return map;
}

/**
 * Per live zone with a device: its model profile's EQ bands, its zone curve's
 * band count, and the band count of each source and station curve. One
 * statement for the whole company (or the given zones).
 */
async function zoneCurveUses(ex: Executor, organizationId: string, zoneIds?: string[]) {
  if (zoneIds && zoneIds.length === 0) return [];
  const scope = zoneIds
    ? sql`and z.id in (${sql.join(
        zoneIds.map((id) => sql`${id}`),
        sql`, `,
      )})`
    : sql``;
  const result = await ex.execute<{
    zone_id: string;
    zone_name: string;
    profile_name: string;
    eq_bands: number;
    zone_bands: number;
    card_bands: number[] | null;
    curve_ids: string[] | null;
  }>(sql`
    with counts as (select curve_id, count(*)::int as n from tone_curve_bands group by curve_id)
    select z.id as zone_id, z.name as zone_name, mp.name as profile_name, mp.eq_bands,
      coalesce((select n from counts where curve_id = z.tone_curve_id), 0) as zone_bands,
      (select array_agg(coalesce(c.n, 0)) from (
         select tone_curve_id from sources where zone_id = z.id and tone_curve_id is not null
         union all
         select tone_curve_id from stream_presets where zone_id = z.id and tone_curve_id is not null
       ) u left join counts c on c.curve_id = u.tone_curve_id) as card_bands,
      (select array_agg(distinct u.id) from (
         select z.tone_curve_id as id where z.tone_curve_id is not null
         union all select tone_curve_id from sources where zone_id = z.id and tone_curve_id is not null
         union all select tone_curve_id from stream_presets where zone_id = z.id and tone_curve_id is not null
       ) u) as curve_ids
    from zones z
    join devices d on d.id = z.device_id
    join model_profiles mp on mp.id = d.model_profile_id
    where z.organization_id = ${organizationId} and z.deleted_at is null ${scope}
  `);
  return result.rows.map((r) => {
    const use: ZoneCurveUse = { zoneCurveBands: r.zone_bands, cardCurveBands: r.card_bands ?? [] };
    return {
      zoneId: r.zone_id,
      curveIds: r.curve_ids ?? [],
      problem: zoneBandProblem(r.zone_name, { name: r.profile_name, eqBands: r.eq_bands }, use),
    };
  });
}

export async function listCurves({ actor }: { actor: Actor }): Promise<CurveSummaryDto[]> {
  requireRead(actor);
  const rows = await db
    .select({
      id: toneCurves.id,
      name: toneCurves.name,
      description: toneCurves.description,
      version: toneCurves.version,
      updatedAt: toneCurves.updatedAt,
      attachedCount: sql<number>`((select count(*) from sources s join zones z on z.id = s.zone_id
            where s.tone_curve_id = "tone_curves"."id" and z.deleted_at is null)
        + (select count(*) from stream_presets p join zones z on z.id = p.zone_id
            where p.tone_curve_id = "tone_curves"."id" and z.deleted_at is null)
        + (select count(*) from zones z where z.tone_curve_id = "tone_curves"."id" and z.deleted_at is null))::int`,
    })
    .from(toneCurves)
    .where(eq(toneCurves.organizationId, actor.organizationId))
    .orderBy(asc(toneCurves.name), asc(toneCurves.id));
  const [bands, uses] = await Promise.all([bandsOf(db, rows.map((r) => r.id)), zoneCurveUses(db, actor.organizationId)]);
  const misfits = new Map<string, number>();
  for (const u of uses) {
    if (!u.problem) continue;
    for (const id of u.curveIds) misfits.set(id, (misfits.get(id) ?? 0) + 1);
  }
  return rows.map((r) => {
    const b = bands.get(r.id) ?? [];
    return {
      id: r.id,
      name: r.name,
      description: r.description,
      version: r.version,
      bandCount: b.length,
      largestBoostDb: largestBoostDb(b),
      attachedCount: r.attachedCount,
      misfitZoneCount: misfits.get(r.id) ?? 0,
      updatedAt: iso(r.updatedAt),
    };
  });
}

/** Where a curve is attached: live zones, their sources and stations, with home names. */
async function attachmentsOf(ex: Executor, organizationId: string, curveId: string): Promise<CurveAttachmentDto[]> {
  const zoneCols = { zoneId: zones.id, zoneName: zones.name, homeId: homes.id, homeName: homes.name };
  const live = and(eq(zones.organizationId, organizationId), isNull(zones.deletedAt));
  // One after another: inside a transaction the statements share one connection.
  const zoneRows = await ex
    .select(zoneCols)
    .from(zones)
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .where(and(live, eq(zones.toneCurveId, curveId)));
  const sourceRows = await ex
    .select({ ...zoneCols, targetId: sources.id, label: sources.label })
    .from(sources)
    .innerJoin(zones, eq(zones.id, sources.zoneId))
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .where(and(live, eq(sources.toneCurveId, curveId)));
  const presetRows = await ex
    .select({ ...zoneCols, targetId: streamPresets.id, label: streamPresets.name })
    .from(streamPresets)
    .innerJoin(zones, eq(zones.id, streamPresets.zoneId))
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .where(and(live, eq(streamPresets.toneCurveId, curveId)));
  const all: Omit<CurveAttachmentDto, "fitProblem">[] = [
    ...zoneRows.map((r) => ({ ...r, kind: "zone" as const, targetId: r.zoneId, label: r.zoneName })),
    ...sourceRows.map((r) => ({ ...r, kind: "source" as const })),
    ...presetRows.map((r) => ({ ...r, kind: "preset" as const })),
  ];
  const uses = await zoneCurveUses(ex, organizationId, [...new Set(all.map((a) => a.zoneId))]);
  const problems = new Map(uses.map((u) => [u.zoneId, u.problem]));
  const order = { zone: 0, source: 1, preset: 2 };
  return all
    .map((a) => ({ ...a, fitProblem: problems.get(a.zoneId) ?? null }))
    .sort((a, b) => a.homeName.localeCompare(b.homeName) || a.zoneName.localeCompare(b.zoneName) || order[a.kind] - order[b.kind] || a.label.localeCompare(b.label));
}

async function loadCurveRow(ex: Executor, actor: Actor, curveId: string, forUpdate = false) {
  const q = ex
    .select()
    .from(toneCurves)
    .where(and(eq(toneCurves.id, curveId), eq(toneCurves.organizationId, actor.organizationId)));
  const [row] = forUpdate ? await q.for("update") : await q;
  if (!row) throw new AppError("curve:not-found");
  return row;
}

export async function getCurve({ actor, curveId }: { actor: Actor; curveId: string }): Promise<CurveDetailDto> {
  const row = await loadCurveRow(db, actor, curveId);
  requireRead(actor);
  return curveDetail(db, actor, row);
}

async function curveDetail(ex: Executor, actor: Actor, row: typeof toneCurves.$inferSelect): Promise<CurveDetailDto> {
  const bands = await bandsOf(ex, [row.id]);
  const attachments = await attachmentsOf(ex, actor.organizationId, row.id);
  const b = bands.get(row.id) ?? [];
  return {
    id: row.id,
    name: row.name,
    description: row.description,
    version: row.version,
    bandCount: b.length,
    largestBoostDb: largestBoostDb(b),
    attachedCount: attachments.length,
    misfitZoneCount: new Set(attachments.filter((a) => a.fitProblem).map((a) => a.zoneId)).size,
    updatedAt: iso(row.updatedAt),
    bands: b,
    attachments,
    maxBands: MAX_LIBRARY_BANDS,
    may: { edit: can(actor, "curve:edit") },
  };
}

async function insertBands(tx: Transaction, curveId: string, bands: readonly CurveBandDto[]) {
  if (bands.length === 0) return;
  await tx.insert(toneCurveBands).values(
    bands.map((b, position) => ({
      curveId,
      position,
      type: b.type,
      frequencyHz: b.frequencyHz,
      gainDb: b.gainDb,
      q: b.q,
      enabled: b.enabled,
    })),
  );
}

function describeBands(bands: readonly CurveBandDto[]) {
  return bands.map((b) => `${b.type} ${b.frequencyHz} Hz ${b.gainDb} dB Q ${b.q}${b.enabled ? "" : " (off)"}`);
}

export async function createCurve(
  { actor, input, auditKind = "curve.created", summary }: { actor: Actor; input: CurveCreateInput; auditKind?: string; summary?: string },
  tx?: Transaction,
): Promise<CurveDetailDto> {
  requireEdit(actor);
  const run = async (t: Transaction) => {
    const [row] = await t
      .insert(toneCurves)
      .values({ organizationId: actor.organizationId, name: input.name, description: input.description })
      .returning();
    await insertBands(t, row.id, input.bands);
    await recordAudit(t, actor, {
      kind: auditKind,
      summary: summary ?? `Created tone curve “${input.name}” (${input.bands.length} band${input.bands.length === 1 ? "" : "s"})`,
      changes: [{ field: `curve.${row.id}.bands`, before: null, after: describeBands(input.bands) }],
    });
    return curveDetail(t, actor, row);
  };
  return tx ? run(tx) : db.transaction(run);
}

export async function duplicateCurve({ actor, curveId, name }: { actor: Actor; curveId: string; name?: string }): Promise<CurveDetailDto> {
  const source = await loadCurveRow(db, actor, curveId);
  requireEdit(actor);
  return db.transaction(async (tx) => {
    const bands = (await bandsOf(tx, [source.id])).get(source.id) ?? [];
    const existing = await tx
      .select({ name: toneCurves.name })
      .from(toneCurves)
      .where(eq(toneCurves.organizationId, actor.organizationId));
    const taken = new Set(existing.map((e) => e.name));
    let copyName = name ?? `${source.name} (copy)`;
    for (let n = 2; !name && taken.has(copyName); n++) copyName = `${source.name} (copy ${n})`;
    return createCurve(
      {
        actor,
        input: { name: copyName.slice(0, 80), description: source.description, bands },
        auditKind: "curve.duplicated",
        summary: `Duplicated tone curve “${source.name}” as “${copyName}”`,
      },
      tx,
    );
  });
}

export interface CurveWriteResult {
  curve: CurveDetailDto;
  /** Zones whose desired configuration changed, with their new revision numbers. */
  zones: { zoneId: string; zoneName: string; version: number; revisionNumber: number }[];
}

export async function updateCurve({ actor, curveId, input }: { actor: Actor; curveId: string; input: CurveUpdateInput }): Promise<CurveWriteResult> {
  await loadCurveRow(db, actor, curveId);
  requireEdit(actor);
  return db.transaction(async (tx) => {
    const row = await loadCurveRow(tx, actor, curveId, true);
    if (row.version !== input.version) {
      throw new AppError("curve:stale", { details: { currentVersion: row.version } });
    }
    const beforeBands = (await bandsOf(tx, [row.id])).get(row.id) ?? [];
    const changes: FieldChange[] = [];
    if (input.name !== undefined && input.name !== row.name) changes.push({ field: `curve.${row.id}.name`, before: row.name, after: input.name });
    if (input.description !== undefined && input.description !== row.description) {
      changes.push({ field: `curve.${row.id}.description`, before: row.description, after: input.description });
    }
    const bandsChanged = input.bands !== undefined && canonicalJson(input.bands) !== canonicalJson(beforeBands);
    if (bandsChanged) changes.push({ field: `curve.${row.id}.bands`, before: describeBands(beforeBands), after: describeBands(input.bands!) });
    if (changes.length === 0) return { curve: await curveDetail(tx, actor, row), zones: [] };

    // Lock every zone that uses the curve, in id order (the order every
    // multi-zone write uses), before changing what their configuration reads.
    const affected = await tx.execute<{ id: string; name: string; home_id: string }>(sql`
      select z.id, z.name, z.home_id from zones z
      where z.organization_id = ${actor.organizationId} and z.deleted_at is null and (
        z.tone_curve_id = ${row.id}
        or exists (select 1 from sources s where s.zone_id = z.id and s.tone_curve_id = ${row.id})
        or exists (select 1 from stream_presets p where p.zone_id = z.id and p.tone_curve_id = ${row.id}))
      order by z.id
      for update of z`);
    const zoneRows = affected.rows;

    if (bandsChanged && input.bands!.length > beforeBands.length && zoneRows.length > 0) {
      // More bands than before: every zone using it must still fit its device.
      const before = new Map((await zoneCurveUses(tx, actor.organizationId, zoneRows.map((z) => z.id))).map((u) => [u.zoneId, u.problem]));
      await tx.delete(toneCurveBands).where(eq(toneCurveBands.curveId, row.id));
      await insertBands(tx, row.id, input.bands!);
      const after = await zoneCurveUses(tx, actor.organizationId, zoneRows.map((z) => z.id));
      const newProblems = after.filter((u) => u.problem && !before.get(u.zoneId)).map((u) => u.problem!);
      if (newProblems.length > 0) {
        throw new AppError("curve:does-not-fit", {
          message: `${input.bands!.length} bands do not fit every device this curve is attached to: ${newProblems.join(" ")} Nothing was saved.`,
          fieldErrors: { bands: newProblems },
          details: { problems: newProblems },
        });
      }
    } else if (bandsChanged) {
      await tx.delete(toneCurveBands).where(eq(toneCurveBands.curveId, row.id));
      await insertBands(tx, row.id, input.bands!);
    }

    const now = new Date();
    const [updated] = await tx
      .update(toneCurves)
      .set({
        name: input.name ?? row.name,
        description: input.description ?? row.description,
        version: sql`${toneCurves.version} + 1`,
        updatedAt: now,
      })
      .where(eq(toneCurves.id, row.id))
      .returning();
    const newName = updated.name;
    await recordAudit(tx, actor, {
      kind: "curve.updated",
      summary: `Edited tone curve “${newName}”${zoneRows.length ? ` (attached in ${zoneRows.length} zone${zoneRows.length === 1 ? "" : "s"})` : ""}`,
      changes,
    });

    const zoneResults: CurveWriteResult["zones"] = [];
    for (const z of zoneRows) {
      const revision = await snapshotZone(tx, {
        zoneId: z.id,
        organizationId: actor.organizationId,
        authorId: actor.userId,
        message: `Tone curve “${newName}” edited in the library`,
      });
      if (!revision.created) continue;
      const [bumped] = await tx
        .update(zones)
        .set({ version: sql`${zones.version} + 1`, updatedAt: now })
        .where(eq(zones.id, z.id))
        .returning({ version: zones.version });
      await tx.update(homes).set({ updatedAt: now }).where(eq(homes.id, z.home_id));
      await recordAudit(tx, actor, {
        kind: "zone.curve-updated",
        summary: `Tone curve “${newName}” changed in “${z.name}” (library edit, revision ${revision.number})`,
        homeId: z.home_id,
        zoneId: z.id,
        changes: changes.filter((c) => !c.field.endsWith(".description")),
      });
      zoneResults.push({ zoneId: z.id, zoneName: z.name, version: bumped.version, revisionNumber: revision.number });
    }
    return { curve: await curveDetail(tx, actor, updated), zones: zoneResults };
  });
}

export async function deleteCurve({ actor, curveId, version }: { actor: Actor; curveId: string; version: number }) {
  await loadCurveRow(db, actor, curveId);
  requireEdit(actor);
  return db.transaction(async (tx) => {
    const row = await loadCurveRow(tx, actor, curveId, true);
    if (row.version !== version) throw new AppError("curve:stale", { details: { currentVersion: row.version } });
    const attachments = await attachmentsOf(tx, actor.organizationId, row.id);
    // Deleted zones keep their rows (history); their references block the delete too.
    const [{ n: deletedRefs }] = (
      await tx.execute<{ n: number }>(sql`
        select ((select count(*) from zones z where z.tone_curve_id = ${row.id})
          + (select count(*) from sources s where s.tone_curve_id = ${row.id})
          + (select count(*) from stream_presets p where p.tone_curve_id = ${row.id}))::int as n`)
    ).rows;
    if (attachments.length > 0 || deletedRefs > 0) {
      const where = attachments.slice(0, 5).map((a) => `${a.homeName} / ${a.zoneName}${a.kind === "zone" ? "" : ` / ${a.label}`}`);
      const more = attachments.length > 5 ? ` and ${attachments.length - 5} more` : "";
      throw new AppError("curve:in-use", {
        message: attachments.length
          ? `“${row.name}” is still attached: ${where.join("; ")}${more}. Detach it there first.`
          : `“${row.name}” is still referenced by a deleted zone's settings and cannot be removed.`,
        details: { attachments: attachments.map((a) => ({ kind: a.kind, zoneId: a.zoneId, homeId: a.homeId, label: a.label })) },
      });
    }
    const bands = (await bandsOf(tx, [row.id])).get(row.id) ?? [];
    await tx.delete(toneCurves).where(eq(toneCurves.id, row.id));
    await recordAudit(tx, actor, {
      kind: "curve.deleted",
      summary: `Deleted tone curve “${row.name}”`,
      changes: [{ field: `curve.${row.id}.bands`, before: describeBands(bands), after: null }],
    });
    return { ok: true as const, id: row.id };
  });
}

/** The curve's name and bands for export. */
export async function getCurveForExport({ actor, curveId }: { actor: Actor; curveId: string }) {
  const row = await loadCurveRow(db, actor, curveId);
  requireRead(actor);
  const bands = (await bandsOf(db, [row.id])).get(row.id) ?? [];
  return { name: row.name, bands };
}
