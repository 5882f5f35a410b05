import "server-only";
import { and, asc, count, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { db } from "@/db/client";
import {
  auditEvents,
  devices,
  homes,
  member,
  modelProfiles,
  pushes,
  pushTargets,
  sources,
  streamPresets,
  toneCurves,
  user,
  zones,
  zoneTemplates,
} from "@/db/schema";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";

// Read models for the shell's overview pages. Each starts from the actor's
// company and checks the permission table first.

export interface ZoneSummaryDto {
  id: string;
  name: string;
  volumeCeiling: number;
  turnOnVolume: number;
  guestControls: { volume: boolean; source: boolean; wake: boolean; locked: boolean };
  device: { id: string; serial: string; modelName: string; online: boolean } | null;
  sources: { id: string; label: string; kind: string }[];
  presets: { id: string; name: string; genre: string | null }[];
}

export async function listZoneSummaries({ actor, homeId }: { actor: Actor; homeId: string }): Promise<ZoneSummaryDto[]> {
  const rows = await db
    .select({
      id: zones.id,
      name: zones.name,
      volumeCeiling: zones.volumeCeiling,
      turnOnVolume: zones.turnOnVolume,
      guestVolume: zones.guestVolume,
      guestSource: zones.guestSource,
      guestWake: zones.guestWake,
      guestLocked: zones.guestLocked,
      deviceId: devices.id,
      serial: devices.serial,
      online: devices.online,
      modelName: modelProfiles.name,
    })
    .from(zones)
    .leftJoin(devices, eq(devices.id, zones.deviceId))
    .leftJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(and(eq(zones.homeId, homeId), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)))
    .orderBy(asc(zones.position), asc(zones.name));
  const ids = rows.map((r) => r.id);
  const [sourceRows, presetRows] = ids.length
    ? await Promise.all([
        db.select({ id: sources.id, zoneId: sources.zoneId, label: sources.label, kind: sources.kind, enabled: sources.enabled })
          .from(sources).where(inArray(sources.zoneId, ids)).orderBy(asc(sources.position)),
        db.select({ id: streamPresets.id, zoneId: streamPresets.zoneId, name: streamPresets.name, genre: streamPresets.genre })
          .from(streamPresets).where(inArray(streamPresets.zoneId, ids)).orderBy(asc(streamPresets.position)),
      ])
    : [[], []];
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    volumeCeiling: r.volumeCeiling,
    turnOnVolume: r.turnOnVolume,
    guestControls: { volume: r.guestVolume, source: r.guestSource, wake: r.guestWake, locked: r.guestLocked },
    device: r.deviceId ? { id: r.deviceId, serial: r.serial!, modelName: r.modelName ?? "Unknown model", online: r.online! } : null,
    sources: sourceRows.filter((s) => s.zoneId === r.id && s.enabled).map(({ id, label, kind }) => ({ id, label, kind })),
    presets: presetRows.filter((p) => p.zoneId === r.id).map(({ id, name, genre }) => ({ id, name, genre })),
  }));
}

export async function listHouseholdHomes({ actor }: { actor: Actor }) {
  if (actor.householdHomeIds.length === 0) return [];
  const rows = await db
    .select({ id: homes.id, name: homes.name, householdName: homes.householdName, city: homes.city })
    .from(homes)
    .where(and(eq(homes.organizationId, actor.organizationId), inArray(homes.id, actor.householdHomeIds)))
    .orderBy(asc(homes.name));
  return Promise.all(rows.map(async (h) => ({ ...h, zones: await listZoneSummaries({ actor, homeId: h.id }) })));
}

export async function listLibrary({ actor }: { actor: Actor }) {
  if (!can(actor, "library:read")) throw new AppError("auth:forbidden");
  const curveRows = await db
    .select({
      id: toneCurves.id,
      name: toneCurves.name,
      description: toneCurves.description,
      bandCount: sql<number>`(select count(*)::int from tone_curve_bands b where b.curve_id = "tone_curves"."id")`,
      usedBy: sql<number>`((select count(*) from sources s where s.tone_curve_id = "tone_curves"."id")
        + (select count(*) from stream_presets p where p.tone_curve_id = "tone_curves"."id")
        + (select count(*) from zones z where z.tone_curve_id = "tone_curves"."id" and z.deleted_at is null))::int`,
    })
    .from(toneCurves)
    .where(eq(toneCurves.organizationId, actor.organizationId))
    .orderBy(asc(toneCurves.name));
  const templateRows = await db
    .select({
      id: zoneTemplates.id,
      name: zoneTemplates.name,
      description: zoneTemplates.description,
      version: zoneTemplates.version,
      zoneCount: sql<number>`(select count(*)::int from zones z where z.template_id = "zone_templates"."id" and z.deleted_at is null)`,
    })
    .from(zoneTemplates)
    .where(eq(zoneTemplates.organizationId, actor.organizationId))
    .orderBy(asc(zoneTemplates.name));
  return { curves: curveRows, templates: templateRows };
}

export async function listTeam({ actor }: { actor: Actor }) {
  if (!can(actor, "team:read")) throw new AppError("auth:forbidden");
  return db
    .select({ memberId: member.id, userId: user.id, name: user.name, email: user.email, role: member.role, since: member.createdAt })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(eq(member.organizationId, actor.organizationId))
    .orderBy(asc(member.role), asc(user.name));
}

export async function listRecentActivity({ actor, limit = 50 }: { actor: Actor; limit?: number }) {
  if (!can(actor, "audit:read")) throw new AppError("auth:forbidden");
  return db
    .select({
      id: auditEvents.id,
      kind: auditEvents.kind,
      summary: auditEvents.summary,
      actorName: auditEvents.actorName,
      actorRole: auditEvents.actorRole,
      homeName: homes.name,
      createdAt: auditEvents.createdAt,
      changes: auditEvents.changes,
    })
    .from(auditEvents)
    .leftJoin(homes, eq(homes.id, auditEvents.homeId))
    .where(eq(auditEvents.organizationId, actor.organizationId))
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(limit);
}

export async function listRecentPushes({ actor, limit = 50 }: { actor: Actor; limit?: number }) {
  if (!can(actor, "push:read")) throw new AppError("auth:forbidden");
  const rows = await db
    .select({
      id: pushes.id,
      scopeLabel: pushes.scopeLabel,
      status: pushes.status,
      createdAt: pushes.createdAt,
      createdBy: user.name,
    })
    .from(pushes)
    .leftJoin(user, eq(user.id, pushes.createdBy))
    .where(eq(pushes.organizationId, actor.organizationId))
    .orderBy(desc(pushes.createdAt))
    .limit(limit);
  const ids = rows.map((r) => r.id);
  const counts = ids.length
    ? await db
        .select({ pushId: pushTargets.pushId, state: pushTargets.state, n: count() })
        .from(pushTargets)
        .where(inArray(pushTargets.pushId, ids))
        .groupBy(pushTargets.pushId, pushTargets.state)
    : [];
  return rows.map((r) => ({
    ...r,
    counts: Object.fromEntries(counts.filter((c) => c.pushId === r.id).map((c) => [c.state, c.n])) as Record<string, number>,
  }));
}
