import "server-only";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { homes, levelMatchClips, sources, streamPresets, user, type Zone } from "@/db/schema";
import { recordAudit, type FieldChange } from "@/db/queries/audit";
import { changeZone, loadCurvesForConfig, loadZoneForActor } from "@/db/queries/zone-writes";
import type { LoudnessMeasurement } from "@/lib/audio/loudness";
import { largestBoostDb } from "@/lib/audio/tone-curve";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";
import type { ClipTargetKind, LevelMatchApplyInput } from "@/lib/validation/level-match";
import type { LevelMatchItem, MeasuredClipDto } from "@/lib/zones/level-match-rows";

// Level matching of one zone: the latest measured clip of each source and
// stream preset (level_match_clips holds the measurement, never the audio),
// storing a new measurement, and applying offsets through changeZone.

type Executor = Transaction | typeof db;

export interface LevelMatchDto {
  zone: { id: string; name: string; version: number; homeId: string; homeName: string; locked: boolean; zoneCurveName: string | null };
  items: LevelMatchItem[];
  may: { edit: boolean };
}

const finite = (v: number) => (Number.isFinite(v) ? v : null);

function clipDto(row: typeof levelMatchClips.$inferSelect, uploadedByName: string | null): MeasuredClipDto {
  return {
    id: row.id,
    fileName: row.fileName,
    integratedLufs: row.integratedLufs,
    loudnessRangeLu: row.loudnessRangeLu,
    truePeakDbtp: row.truePeakDbtp,
    samplePeakDbfs: row.samplePeakDbfs,
    durationSeconds: row.durationSeconds,
    sampleRate: row.sampleRate,
    channelCount: row.channelCount,
    uploadedByName,
    createdAt: row.createdAt.toISOString(),
  };
}

/** Installers may not change a zone whose guest controls support has locked (the board's rule). */
function assertOpenFor(actor: Actor, zone: Zone) {
  if (!zone.guestLocked || can(actor, "guest:unlock", { id: zone.homeId, organizationId: zone.organizationId })) return;
  throw new AppError("zone:locked", {
    message: `Support locked “${zone.name}”${zone.lockReason ? `: ${zone.lockReason}` : ""}. Ask support or an integrator to unlock it first.`,
  });
}

async function clipsOf(ex: Executor, zoneId: string, limit?: number) {
  const q = ex
    .select({ clip: levelMatchClips, uploadedByName: user.name })
    .from(levelMatchClips)
    .leftJoin(user, eq(user.id, levelMatchClips.uploadedBy))
    .where(eq(levelMatchClips.zoneId, zoneId))
    .orderBy(desc(levelMatchClips.createdAt), desc(levelMatchClips.id));
  return limit ? q.limit(limit) : q;
}

export async function getLevelMatch({ actor, zoneId }: { actor: Actor; zoneId: string }): Promise<LevelMatchDto> {
  const zone = await loadZoneForActor({ actor, zoneId });
  const [homeRow] = await db.select({ name: homes.name }).from(homes).where(eq(homes.id, zone.homeId));
  const [sourceRows, presetRows, clipRows] = await Promise.all([
    db.select().from(sources).where(eq(sources.zoneId, zone.id)).orderBy(asc(sources.position)),
    db.select().from(streamPresets).where(eq(streamPresets.zoneId, zone.id)).orderBy(asc(streamPresets.position)),
    clipsOf(db, zone.id),
  ]);
  const curves = await loadCurvesForConfig(db, [
    ...(zone.toneCurveId ? [zone.toneCurveId] : []),
    ...sourceRows.flatMap((s) => (s.toneCurveId ? [s.toneCurveId] : [])),
    ...presetRows.flatMap((p) => (p.toneCurveId ? [p.toneCurveId] : [])),
  ]);
  const zoneBands = zone.toneCurveId ? (curves.get(zone.toneCurveId)?.bands ?? []) : [];
  const boostCache = new Map<string | null, number>();
  const boost = (curveId: string | null) => {
    if (!boostCache.has(curveId)) boostCache.set(curveId, largestBoostDb([...zoneBands, ...(curveId ? (curves.get(curveId)?.bands ?? []) : [])]));
    return boostCache.get(curveId)!;
  };
  const latest = new Map<string, MeasuredClipDto>();
  for (const { clip, uploadedByName } of clipRows) {
    const key = clip.sourceId ? `source:${clip.sourceId}` : clip.presetId ? `preset:${clip.presetId}` : null;
    if (key && !latest.has(key)) latest.set(key, clipDto(clip, uploadedByName));
  }
  const items: LevelMatchItem[] = [
    ...sourceRows.map((s) => ({
      kind: "source" as const,
      id: s.id,
      label: s.label,
      enabled: s.enabled,
      loudnessOffsetDb: s.loudnessOffsetDb,
      chainBoostDb: boost(s.toneCurveId),
      clip: latest.get(`source:${s.id}`) ?? null,
    })),
    ...presetRows.map((p) => ({
      kind: "preset" as const,
      id: p.id,
      label: p.name,
      enabled: true,
      loudnessOffsetDb: p.loudnessOffsetDb,
      chainBoostDb: boost(p.toneCurveId),
      clip: latest.get(`preset:${p.id}`) ?? null,
    })),
  ];
  const home = { id: zone.homeId, organizationId: zone.organizationId };
  return {
    zone: {
      id: zone.id,
      name: zone.name,
      version: zone.version,
      homeId: zone.homeId,
      homeName: homeRow?.name ?? "",
      locked: zone.guestLocked,
      zoneCurveName: zone.toneCurveId ? (curves.get(zone.toneCurveId)?.name ?? null) : null,
    },
    items,
    may: { edit: can(actor, "zone:edit", home) && (!zone.guestLocked || can(actor, "guest:unlock", home)) },
  };
}

export async function listClips({ actor, zoneId, limit }: { actor: Actor; zoneId: string; limit: number }) {
  const zone = await loadZoneForActor({ actor, zoneId });
  const rows = await clipsOf(db, zone.id, limit);
  const ids = rows.flatMap((r) => [r.clip.sourceId, r.clip.presetId]).filter((v): v is string => v !== null);
  const [sourceRows, presetRows] = ids.length
    ? await Promise.all([
        db.select({ id: sources.id, label: sources.label }).from(sources).where(inArray(sources.id, ids)),
        db.select({ id: streamPresets.id, label: streamPresets.name }).from(streamPresets).where(inArray(streamPresets.id, ids)),
      ])
    : [[], []];
  const labels = new Map([...sourceRows, ...presetRows].map((r) => [r.id, r.label]));
  return {
    items: rows.map(({ clip, uploadedByName }) => ({
      ...clipDto(clip, uploadedByName),
      target: clip.sourceId
        ? { kind: "source" as const, id: clip.sourceId, label: labels.get(clip.sourceId) ?? "" }
        : { kind: "preset" as const, id: clip.presetId!, label: labels.get(clip.presetId!) ?? "" },
    })),
  };
}

/** The zone (with zone:edit, not locked against the actor) a clip may be uploaded to; checked before reading the upload. */
export async function loadZoneForClipUpload({ actor, zoneId }: { actor: Actor; zoneId: string }): Promise<Zone> {
  const zone = await loadZoneForActor({ actor, zoneId, action: "zone:edit" });
  assertOpenFor(actor, zone);
  return zone;
}

async function targetLabel(ex: Executor, zoneId: string, kind: ClipTargetKind, id: string): Promise<string> {
  if (kind === "source") {
    const [row] = await ex.select({ label: sources.label }).from(sources).where(and(eq(sources.id, id), eq(sources.zoneId, zoneId)));
    if (!row) throw new AppError("source:not-found", { fieldErrors: { sourceId: ["That source is not in this zone."] } });
    return row.label;
  }
  const [row] = await ex.select({ label: streamPresets.name }).from(streamPresets).where(and(eq(streamPresets.id, id), eq(streamPresets.zoneId, zoneId)));
  if (!row) throw new AppError("preset:not-found", { fieldErrors: { presetId: ["That stream preset is not in this zone."] } });
  return row.label;
}

/** Checks that the source or preset belongs to the zone (before the clip is decoded). */
export async function assertClipTarget({ zoneId, kind, id }: { zoneId: string; kind: ClipTargetKind; id: string }) {
  return targetLabel(db, zoneId, kind, id);
}

export async function storeClipMeasurement({
  actor,
  zone,
  target,
  fileName,
  measurement,
}: {
  actor: Actor;
  zone: Zone;
  target: { kind: ClipTargetKind; id: string };
  fileName: string;
  measurement: LoudnessMeasurement;
}) {
  return db.transaction(async (tx) => {
    const label = await targetLabel(tx, zone.id, target.kind, target.id);
    const [row] = await tx
      .insert(levelMatchClips)
      .values({
        organizationId: zone.organizationId,
        zoneId: zone.id,
        sourceId: target.kind === "source" ? target.id : null,
        presetId: target.kind === "preset" ? target.id : null,
        fileName: fileName.slice(0, 200),
        sampleRate: measurement.sampleRate,
        channelCount: measurement.channelCount,
        durationSeconds: measurement.durationSeconds,
        integratedLufs: finite(measurement.integratedLufs),
        loudnessRangeLu: finite(measurement.loudnessRangeLu),
        truePeakDbtp: finite(measurement.truePeakDbtp),
        samplePeakDbfs: finite(measurement.samplePeakDbfs),
        uploadedBy: actor.userId,
      })
      .returning();
    const reading = row.integratedLufs === null ? "silent" : `${row.integratedLufs.toFixed(1)} LUFS, true peak ${row.truePeakDbtp?.toFixed(1) ?? "–"} dBTP`;
    await recordAudit(tx, actor, {
      kind: "zone.clip-measured",
      summary: `Measured a level-match clip of “${label}” in “${zone.name}”: ${reading}`,
      homeId: zone.homeId,
      zoneId: zone.id,
      changes: [{ field: `${target.kind}.${target.id}.clip`, before: null, after: { file: row.fileName, integratedLufs: row.integratedLufs, truePeakDbtp: row.truePeakDbtp } }],
    });
    return { ...clipDto(row, actor.name), target: { ...target, label } };
  });
}

/** Applies loudness offsets (one suggestion or all) as one zone change: version check, revision, audit. */
export async function applyLevelMatch({ actor, zoneId, input }: { actor: Actor; zoneId: string; input: LevelMatchApplyInput }) {
  let zoneName = "";
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: input.version,
    action: "zone:edit",
    kind: "zone.level-matched",
    summary: (zone) => {
      zoneName = zone.name;
      return `Level-matched ${input.items.length} loudness offset${input.items.length === 1 ? "" : "s"} in “${zone.name}”`;
    },
    message: "Level match from measured clips",
    apply: async (tx, zone) => {
      assertOpenFor(actor, zone);
      const changes: FieldChange[] = [];
      const now = new Date();
      for (const item of input.items) {
        if (item.kind === "source") {
          const [row] = await tx
            .select({ label: sources.label, offset: sources.loudnessOffsetDb })
            .from(sources)
            .where(and(eq(sources.id, item.id), eq(sources.zoneId, zone.id)));
          if (!row) throw new AppError("source:not-found", { message: "A source in the list is no longer in this zone. Reload and try again." });
          if (row.offset === item.loudnessOffsetDb) continue;
          await tx.update(sources).set({ loudnessOffsetDb: item.loudnessOffsetDb, updatedAt: now }).where(eq(sources.id, item.id));
          changes.push({ field: `source.${item.id}.loudnessOffsetDb`, before: row.offset, after: item.loudnessOffsetDb });
        } else {
          const [row] = await tx
            .select({ name: streamPresets.name, offset: streamPresets.loudnessOffsetDb })
            .from(streamPresets)
            .where(and(eq(streamPresets.id, item.id), eq(streamPresets.zoneId, zone.id)));
          if (!row) throw new AppError("preset:not-found", { message: "A stream preset in the list is no longer in this zone. Reload and try again." });
          if (row.offset === item.loudnessOffsetDb) continue;
          await tx.update(streamPresets).set({ loudnessOffsetDb: item.loudnessOffsetDb, updatedAt: now }).where(eq(streamPresets.id, item.id));
          changes.push({ field: `preset.${item.id}.loudnessOffsetDb`, before: row.offset, after: item.loudnessOffsetDb });
        }
      }
      return changes;
    },
  });
  return {
    zoneId: result.zoneId,
    zoneName,
    version: result.version,
    revision: { number: result.revision.number, created: result.revision.created },
    changes: result.changes,
  };
}
