import "server-only";
import { and, asc, desc, eq, ilike, inArray, isNull, or, sql, type SQL } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import {
  auditEvents,
  devices,
  firmwareUpdates,
  fleetEvents,
  homes,
  modelProfiles,
  pushTargets,
  user,
  zoneRevisions,
  zones,
} from "@/db/schema";
import { finishPushIfDone, resolveTargetsForDevice } from "@/db/queries/push-targets";
import { AppError } from "@/lib/errors";
import type { FleetWebhookEvent } from "@/lib/fleet/api-schema";
import { computeDrift, driftLabels, normalizeConfig, type DriftState } from "@/lib/fleet/drift";
import { targetStateLabels } from "@/lib/fleet/push-state";
import { withJobs } from "@/lib/fleet/queue";
import { type Actor, can } from "@/lib/permissions";
import { toAuditChanges, diffZoneConfigs } from "@/lib/zones/config-diff";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import type { DeviceListQuery } from "@/lib/validation/pushes";

// Devices: what the fleet tells us about them (webhook ingestion), drift per
// zone, and the device page's read model. Reads start from the actor's company.

// ── webhook ingestion ───────────────────────────────────────────────────────

export type IngestOutcome = "stored" | "stale" | "duplicate" | "unknown-device";

export interface IngestResult {
  outcome: IngestOutcome;
  /** Push targets moved to a final state by this event. */
  settledPushes: number;
}

/** Fleet-driven entries in the activity trail have no person behind them. */
async function recordSystemAudit(
  tx: Transaction,
  event: { organizationId: string; homeId: string | null; zoneId: string | null; kind: string; summary: string; changes?: { field: string; before: unknown; after: unknown }[] },
) {
  await tx.insert(auditEvents).values({
    organizationId: event.organizationId,
    homeId: event.homeId,
    zoneId: event.zoneId,
    actorUserId: null,
    actorName: "Device fleet",
    actorRole: "system",
    kind: event.kind,
    summary: event.summary,
    changes: event.changes ?? [],
  });
}

/**
 * One webhook event, exactly once: deduplicated on eventId, ordered per device by
 * sequence (an event not above the last stored one is stale — it may still settle
 * a waiting push target, because what it says the device applied stays true, but
 * it never overwrites the device's newer state).
 */
export async function ingestFleetEvent(event: FleetWebhookEvent): Promise<IngestResult> {
  return withJobs(async (tx, jobs) => {
    // One statement: lock the device row (it serialises events of one device across app
    // instances), store the event unless its id is known, and read the last sequence stored
    // before it (every part of a statement sees the same snapshot, so not the new row).
    const result = await tx.execute<{
      id: string | null;
      organization_id: string | null;
      home_id: string | null;
      serial: string | null;
      firmware_version: string | null;
      inserted: number;
      last: number | null;
    }>(sql`
      with device as (
        select id, organization_id, home_id, serial, firmware_version from devices where fleet_device_id = ${event.deviceId} for update
      ), stored as (
        insert into fleet_events (event_id, fleet_device_id, kind, payload)
        values (${event.eventId}, ${event.deviceId}, ${event.kind}, ${JSON.stringify(event)}::jsonb)
        on conflict do nothing
        returning event_id
      )
      select d.id, d.organization_id, d.home_id, d.serial, d.firmware_version,
        (select count(*)::int from stored) as inserted,
        (select max((payload->>'sequence')::int) from fleet_events where fleet_device_id = ${event.deviceId}) as last
      from (select 1) one left join device d on true`);
    const row = result.rows[0];
    if (!row || row.inserted === 0) return { outcome: "duplicate", settledPushes: 0 };
    if (!row.id) return { outcome: "unknown-device", settledPushes: 0 };
    const device = { id: row.id, organizationId: row.organization_id!, homeId: row.home_id, serial: row.serial!, firmwareVersion: row.firmware_version! };
    const last = row.last;
    const fresh = event.sequence > (last ?? 0);

    if (fresh) {
      await tx
        .update(devices)
        .set({
          online: event.online,
          firmwareVersion: event.firmwareVersion,
          lastReportAt: new Date(event.occurredAt),
          reportedVersion: event.reportedVersion,
          reportedConfig: event.config,
          reportedStatus: event.status,
          reportedError: event.error,
          desiredVersion: sql`greatest(${devices.desiredVersion}, ${event.desiredVersion})`,
          updatedAt: sql`now()`,
        })
        .where(eq(devices.id, device.id));

      if (event.kind === "reported" && event.origin === "local" && event.config) {
        await auditLocalChange(tx, device, event.config);
      }
      if (event.kind === "firmware" && event.status === "applied" && event.firmwareVersion !== device.firmwareVersion) {
        await recordSystemAudit(tx, {
          organizationId: device.organizationId,
          homeId: device.homeId,
          zoneId: null,
          kind: "device.firmware-installed",
          summary: `Device ${device.serial} installed firmware ${event.firmwareVersion}`,
          changes: [{ field: "firmwareVersion", before: device.firmwareVersion, after: event.firmwareVersion }],
        });
      }
    }

    const settled = await resolveTargetsForDevice(tx, device.id, {
      reportedVersion: event.reportedVersion,
      status: event.kind === "firmware" ? null : event.status,
      error: event.error,
    });
    for (const pushId of settled) await finishPushIfDone(tx, pushId, jobs);

    if (event.kind === "firmware") {
      await tx
        .update(firmwareUpdates)
        .set({
          state: event.status === "applied" ? "applied" : "failed",
          lastError: event.status === "applied" ? null : `The device did not install it: ${event.error ?? "no detail given"}.`,
          updatedAt: sql`now()`,
        })
        .where(
          and(
            eq(firmwareUpdates.fleetUpdateId, event.updateId),
            eq(firmwareUpdates.deviceId, device.id),
            inArray(firmwareUpdates.state, ["sending", "awaiting_report"]),
          ),
        );
    }
    return { outcome: fresh ? "stored" : "stale", settledPushes: settled.length };
  });
}

/** Someone changed the device at the device: record the drift in the zone's activity. */
async function auditLocalChange(
  tx: Transaction,
  device: { id: string; organizationId: string; homeId: string | null; serial: string },
  reported: ZoneConfig,
) {
  const [zone] = await tx
    .select({ id: zones.id, name: zones.name, homeId: zones.homeId, config: zoneRevisions.config })
    .from(zones)
    .leftJoin(zoneRevisions, eq(zoneRevisions.id, zones.currentRevisionId))
    .where(and(eq(zones.deviceId, device.id), isNull(zones.deletedAt)));
  const desired = zone?.config ? normalizeConfig(zone.config) : null;
  const got = normalizeConfig(reported);
  const diff = desired && got ? diffZoneConfigs(desired, got) : null;
  await recordSystemAudit(tx, {
    organizationId: device.organizationId,
    homeId: zone?.homeId ?? device.homeId,
    zoneId: zone?.id ?? null,
    kind: "device.drifted",
    summary: `Device ${device.serial}${zone ? ` (${zone.name})` : ""} was changed at the device${
      diff ? (diff.identical ? "; it still matches the desired configuration" : ` and now differs in ${diff.changes.length} field${diff.changes.length === 1 ? "" : "s"}`) : ""
    }`,
    changes: diff ? toAuditChanges(diff).slice(0, 40) : [],
  });
}

// ── drift ───────────────────────────────────────────────────────────────────

export interface DriftChangeDto {
  op: string;
  path: string;
  subject: string;
  field: string;
  desired: string;
  reported: string;
  text: string;
}

export interface ZoneDriftDto {
  zoneId: string;
  zoneName: string;
  zoneVersion: number;
  homeId: string;
  state: DriftState;
  label: string;
  summary: string;
  explanation: string;
  changes: DriftChangeDto[];
  desiredRevision: { id: string; number: number } | null;
  device: {
    id: string;
    serial: string;
    fleetDeviceId: string;
    online: boolean;
    reportedVersion: number;
    desiredVersion: number;
    reportedStatus: string | null;
    reportedError: string | null;
    lastReportAt: string | null;
  } | null;
  /** The push carrying this zone right now, if any. */
  activePush: { pushId: string; state: string } | null;
  canPushAgain: boolean;
  canAdopt: boolean;
}

async function loadDriftRows(where: SQL) {
  return db
    .select({
      zoneId: zones.id,
      zoneName: zones.name,
      zoneVersion: zones.version,
      homeId: zones.homeId,
      organizationId: zones.organizationId,
      revisionId: zoneRevisions.id,
      revisionNumber: zoneRevisions.number,
      revisionHash: zoneRevisions.contentHash,
      desired: zoneRevisions.config,
      deviceId: devices.id,
      serial: devices.serial,
      fleetDeviceId: devices.fleetDeviceId,
      online: devices.online,
      reportedConfig: devices.reportedConfig,
      reportedVersion: devices.reportedVersion,
      desiredVersion: devices.desiredVersion,
      reportedStatus: devices.reportedStatus,
      reportedError: devices.reportedError,
      lastReportAt: devices.lastReportAt,
      activePushId: sql<string | null>`(select t.push_id from push_targets t where t.zone_id = "zones"."id" and t.state in ('queued','sending','awaiting_report') order by t.created_at desc limit 1)`,
      activeState: sql<string | null>`(select t.state from push_targets t where t.zone_id = "zones"."id" and t.state in ('queued','sending','awaiting_report') order by t.created_at desc limit 1)`,
    })
    .from(zones)
    .leftJoin(zoneRevisions, eq(zoneRevisions.id, zones.currentRevisionId))
    .leftJoin(devices, eq(devices.id, zones.deviceId))
    .where(and(where, isNull(zones.deletedAt)))
    .orderBy(asc(zones.position), asc(zones.name));
}

type DriftRow = Awaited<ReturnType<typeof loadDriftRows>>[number];

function driftOf(row: DriftRow) {
  return computeDrift({
    desired: (row.desired as ZoneConfig | null) ?? null,
    device: row.deviceId
      ? { online: row.online!, reportedConfig: row.reportedConfig ?? null, reportedVersion: row.reportedVersion!, desiredVersion: row.desiredVersion! }
      : null,
    pushInFlight: row.activePushId !== null,
  });
}

function toDriftDto(actor: Actor, row: DriftRow): ZoneDriftDto {
  const drift = driftOf(row);
  const home = { id: row.homeId, organizationId: row.organizationId };
  return {
    zoneId: row.zoneId,
    zoneName: row.zoneName,
    zoneVersion: row.zoneVersion,
    homeId: row.homeId,
    state: drift.state,
    label: driftLabels[drift.state],
    summary: drift.summary,
    explanation: drift.explanation,
    changes: drift.changes.map((c) => ({
      op: c.op,
      path: c.path,
      subject: c.subject,
      field: c.field,
      desired: c.beforeText,
      reported: c.afterText,
      text: c.text,
    })),
    desiredRevision: row.revisionId ? { id: row.revisionId, number: row.revisionNumber! } : null,
    device: row.deviceId
      ? {
          id: row.deviceId,
          serial: row.serial!,
          fleetDeviceId: row.fleetDeviceId!,
          online: row.online!,
          reportedVersion: row.reportedVersion!,
          desiredVersion: row.desiredVersion!,
          reportedStatus: row.reportedStatus,
          reportedError: row.reportedError,
          lastReportAt: row.lastReportAt?.toISOString() ?? null,
        }
      : null,
    activePush: row.activePushId ? { pushId: row.activePushId, state: targetStateLabels[row.activeState as keyof typeof targetStateLabels] ?? row.activeState! } : null,
    canPushAgain:
      row.deviceId !== null && row.revisionId !== null && (can(actor, "push:create", home) || can(actor, "push:repush", home)),
    canAdopt: row.reportedConfig !== null && (drift.state === "drifted" || drift.state === "offline") && drift.changes.length > 0 && can(actor, "zone:edit", home),
  };
}

/** Drift of one zone, for the board's badge and dialog. */
export async function getZoneDrift({ actor, zoneId }: { actor: Actor; zoneId: string }): Promise<ZoneDriftDto> {
  const [row] = await loadDriftRows(and(eq(zones.id, zoneId), eq(zones.organizationId, actor.organizationId))!);
  if (!row || !can(actor, "zone:read", { id: row.homeId, organizationId: row.organizationId })) throw new AppError("zone:not-found");
  if (!can(actor, "device:read", { id: row.homeId, organizationId: row.organizationId })) throw new AppError("auth:forbidden");
  return toDriftDto(actor, row);
}

/** Drift of every zone of a home (one query), for the board. */
export async function listHomeDrift({ actor, homeId }: { actor: Actor; homeId: string }): Promise<ZoneDriftDto[]> {
  const rows = await loadDriftRows(and(eq(zones.homeId, homeId), eq(zones.organizationId, actor.organizationId))!);
  if (rows.length && !can(actor, "device:read", { id: homeId, organizationId: actor.organizationId })) throw new AppError("auth:forbidden");
  return rows.map((r) => toDriftDto(actor, r));
}

// ── device list and page ────────────────────────────────────────────────────

export interface DeviceRowDto {
  id: string;
  serial: string;
  fleetDeviceId: string;
  modelProfileId: string;
  modelName: string;
  firmwareVersion: string;
  /** The newest firmware we know of for the model (the fleet is asked on the device page). */
  latestFirmware: string;
  outdated: boolean;
  online: boolean;
  homeId: string | null;
  homeName: string | null;
  zoneId: string | null;
  zoneName: string | null;
  lastReportAt: string | null;
  /** A firmware update queued, sent or awaiting the device. */
  pendingFirmware: { version: string; windowStart: string; windowEnd: string; state: string } | null;
}

/** Dotted version comparison (numeric parts). */
export function compareFirmware(a: string, b: string): number {
  const pa = a.split(".").map((p) => Number.parseInt(p, 10) || 0);
  const pb = b.split(".").map((p) => Number.parseInt(p, 10) || 0);
  for (let i = 0; i < Math.max(pa.length, pb.length); i++) {
    const d = (pa[i] ?? 0) - (pb[i] ?? 0);
    if (d !== 0) return Math.sign(d);
  }
  return 0;
}

const pendingFirmwareSql = sql<{ version: string; windowStart: string; windowEnd: string; state: string } | null>`(
  select json_build_object('version', f.target_version, 'windowStart', f.window_start, 'windowEnd', f.window_end, 'state', f.state)
  from firmware_updates f where f.device_id = "devices"."id" and f.state in ('queued','sending','awaiting_report')
  order by f.created_at desc limit 1)`;

export async function listDevices({ actor, query }: { actor: Actor; query: DeviceListQuery }): Promise<DeviceRowDto[]> {
  if (!can(actor, "device:read")) throw new AppError("auth:forbidden");
  const filters: SQL[] = [eq(devices.organizationId, actor.organizationId)];
  if (query.search) {
    const pattern = `%${query.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    filters.push(or(ilike(devices.serial, pattern), ilike(devices.fleetDeviceId, pattern), ilike(homes.name, pattern), ilike(zones.name, pattern))!);
  }
  const rows = await db
    .select({
      id: devices.id,
      serial: devices.serial,
      fleetDeviceId: devices.fleetDeviceId,
      modelProfileId: devices.modelProfileId,
      modelName: modelProfiles.name,
      latestFirmware: modelProfiles.latestFirmware,
      firmwareVersion: devices.firmwareVersion,
      online: devices.online,
      homeId: devices.homeId,
      homeName: homes.name,
      zoneId: zones.id,
      zoneName: zones.name,
      lastReportAt: devices.lastReportAt,
      pendingFirmware: pendingFirmwareSql,
    })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .leftJoin(homes, eq(homes.id, devices.homeId))
    .leftJoin(zones, and(eq(zones.deviceId, devices.id), isNull(zones.deletedAt)))
    .where(and(...filters))
    .orderBy(asc(homes.name), asc(zones.name), asc(devices.serial))
    .limit(2000);
  const items = rows.map((r) => ({
    ...r,
    outdated: compareFirmware(r.latestFirmware, r.firmwareVersion) > 0,
    lastReportAt: r.lastReportAt?.toISOString() ?? null,
    pendingFirmware: r.pendingFirmware
      ? { ...r.pendingFirmware, windowStart: new Date(r.pendingFirmware.windowStart).toISOString(), windowEnd: new Date(r.pendingFirmware.windowEnd).toISOString() }
      : null,
  }));
  return query.outdated ? items.filter((d) => d.outdated) : items;
}

export interface DeviceReportDto {
  eventId: string;
  kind: string;
  origin: string;
  sequence: number;
  status: string | null;
  error: string | null;
  reportedVersion: number;
  desiredVersion: number;
  online: boolean;
  firmwareVersion: string;
  occurredAt: string;
  receivedAt: string;
}

export interface DeviceErrorDto {
  at: string;
  source: "report" | "push" | "firmware";
  text: string;
  pushId: string | null;
}

export interface FirmwareUpdateDto {
  id: string;
  targetVersion: string;
  windowStart: string;
  windowEnd: string;
  state: string;
  stateLabel: string;
  attempts: number;
  lastError: string | null;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface DeviceDetailDto {
  id: string;
  serial: string;
  fleetDeviceId: string;
  online: boolean;
  firmwareVersion: string;
  lastReportAt: string | null;
  reportedVersion: number;
  desiredVersion: number;
  reportedStatus: string | null;
  reportedError: string | null;
  model: {
    id: string;
    name: string;
    presetSlots: number;
    eqBands: number;
    inputs: string[];
    subwooferOutputs: number;
    hasLineOut: boolean;
    latestFirmware: string;
  };
  home: { id: string; name: string } | null;
  zone: { id: string; name: string; currentRevisionId: string | null; version: number } | null;
  drift: ZoneDriftDto | null;
  reports: DeviceReportDto[];
  errors: DeviceErrorDto[];
  firmwareUpdates: FirmwareUpdateDto[];
  recentTargets: {
    pushId: string;
    scopeLabel: string;
    state: string;
    stateLabel: string;
    revisionId: string;
    revisionNumber: number;
    lastError: string | null;
    updatedAt: string;
  }[];
  canCare: boolean;
  /** May push an earlier revision to this device's zone (rollback). */
  canRollback: boolean;
  /** May also make that revision the zone's desired configuration again. */
  canRestore: boolean;
}

/** The device row the actor may see, or a 404 (another company's device looks absent). */
export async function loadDeviceForActor({ actor, deviceId, action = "device:read" }: { actor: Actor; deviceId: string; action?: "device:read" | "device:care" }) {
  const [device] = await db
    .select()
    .from(devices)
    .where(and(eq(devices.id, deviceId), eq(devices.organizationId, actor.organizationId)));
  if (!device) throw new AppError("device:not-found");
  const home = device.homeId ? { id: device.homeId, organizationId: device.organizationId } : null;
  if (!can(actor, "device:read", home)) {
    if (actor.role === "homeowner") throw new AppError("device:not-found");
    throw new AppError("auth:forbidden");
  }
  if (action !== "device:read" && !can(actor, action, home)) {
    throw new AppError("auth:forbidden", { message: "Only support, an integrator or the owner may do this to a device." });
  }
  return device;
}

export async function getDeviceDetail({ actor, deviceId }: { actor: Actor; deviceId: string }): Promise<DeviceDetailDto> {
  const device = await loadDeviceForActor({ actor, deviceId });
  const [profileRows, homeRows, zoneRows, eventRows, updateRows, targetRows] = await Promise.all([
    db.select().from(modelProfiles).where(eq(modelProfiles.id, device.modelProfileId)),
    device.homeId ? db.select({ id: homes.id, name: homes.name }).from(homes).where(eq(homes.id, device.homeId)) : Promise.resolve([]),
    db
      .select({ id: zones.id, name: zones.name, currentRevisionId: zones.currentRevisionId, version: zones.version })
      .from(zones)
      .where(and(eq(zones.deviceId, device.id), isNull(zones.deletedAt))),
    db
      .select({ eventId: fleetEvents.eventId, kind: fleetEvents.kind, payload: fleetEvents.payload, receivedAt: fleetEvents.receivedAt })
      .from(fleetEvents)
      .where(eq(fleetEvents.fleetDeviceId, device.fleetDeviceId))
      .orderBy(desc(fleetEvents.receivedAt))
      .limit(25),
    db
      .select({
        id: firmwareUpdates.id,
        targetVersion: firmwareUpdates.targetVersion,
        windowStart: firmwareUpdates.windowStart,
        windowEnd: firmwareUpdates.windowEnd,
        state: firmwareUpdates.state,
        attempts: firmwareUpdates.attempts,
        lastError: firmwareUpdates.lastError,
        createdBy: user.name,
        createdAt: firmwareUpdates.createdAt,
        updatedAt: firmwareUpdates.updatedAt,
      })
      .from(firmwareUpdates)
      .leftJoin(user, eq(user.id, firmwareUpdates.createdBy))
      .where(eq(firmwareUpdates.deviceId, device.id))
      .orderBy(desc(firmwareUpdates.createdAt))
      .limit(20),
    db
      .select({
        pushId: pushTargets.pushId,
        scopeLabel: sql<string>`(select p.scope_label from pushes p where p.id = "push_targets"."push_id")`,
        state: pushTargets.state,
        revisionId: pushTargets.revisionId,
        revisionNumber: zoneRevisions.number,
        lastError: pushTargets.lastError,
        updatedAt: pushTargets.updatedAt,
      })
      .from(pushTargets)
      .innerJoin(zoneRevisions, eq(zoneRevisions.id, pushTargets.revisionId))
      .where(eq(pushTargets.deviceId, device.id))
      .orderBy(desc(pushTargets.updatedAt))
      .limit(15),
  ]);
  const profile = profileRows[0];
  const zone = zoneRows[0] ?? null;
  const drift = zone ? await getZoneDrift({ actor, zoneId: zone.id }).catch(() => null) : null;
  const reports: DeviceReportDto[] = eventRows.map((e) => {
    const p = e.payload as Partial<FleetWebhookEvent>;
    return {
      eventId: e.eventId,
      kind: e.kind,
      origin: String(p.origin ?? ""),
      sequence: Number(p.sequence ?? 0),
      status: (p.status as string | null) ?? null,
      error: (p.error as string | null) ?? null,
      reportedVersion: Number(p.reportedVersion ?? 0),
      desiredVersion: Number(p.desiredVersion ?? 0),
      online: Boolean(p.online),
      firmwareVersion: String(p.firmwareVersion ?? ""),
      occurredAt: String(p.occurredAt ?? e.receivedAt.toISOString()),
      receivedAt: e.receivedAt.toISOString(),
    };
  });
  const errors: DeviceErrorDto[] = [
    ...reports.filter((r) => r.error).map((r) => ({ at: r.occurredAt, source: "report" as const, text: r.error!, pushId: null })),
    ...targetRows
      .filter((t) => t.state === "failed" && t.lastError)
      .map((t) => ({ at: t.updatedAt.toISOString(), source: "push" as const, text: t.lastError!, pushId: t.pushId })),
    ...updateRows
      .filter((u) => u.state === "failed" && u.lastError)
      .map((u) => ({ at: u.updatedAt.toISOString(), source: "firmware" as const, text: u.lastError!, pushId: null })),
  ].sort((a, b) => b.at.localeCompare(a.at));
  return {
    id: device.id,
    serial: device.serial,
    fleetDeviceId: device.fleetDeviceId,
    online: device.online,
    firmwareVersion: device.firmwareVersion,
    lastReportAt: device.lastReportAt?.toISOString() ?? null,
    reportedVersion: device.reportedVersion,
    desiredVersion: device.desiredVersion,
    reportedStatus: device.reportedStatus,
    reportedError: device.reportedError,
    model: {
      id: profile.id,
      name: profile.name,
      presetSlots: profile.presetSlots,
      eqBands: profile.eqBands,
      inputs: profile.inputs,
      subwooferOutputs: profile.subwooferOutputs,
      hasLineOut: profile.hasLineOut,
      latestFirmware: profile.latestFirmware,
    },
    home: homeRows[0] ?? null,
    zone,
    drift,
    reports,
    errors: errors.slice(0, 20),
    firmwareUpdates: updateRows.map(toFirmwareDto),
    recentTargets: targetRows.map((t) => ({
      pushId: t.pushId,
      scopeLabel: t.scopeLabel,
      state: t.state,
      stateLabel: targetStateLabels[t.state],
      revisionId: t.revisionId,
      revisionNumber: t.revisionNumber,
      lastError: t.lastError,
      updatedAt: t.updatedAt.toISOString(),
    })),
    canCare: can(actor, "device:care", device.homeId ? { id: device.homeId, organizationId: device.organizationId } : null),
    canRollback: device.homeId !== null && (can(actor, "push:create", { id: device.homeId, organizationId: device.organizationId }) || can(actor, "push:repush", { id: device.homeId, organizationId: device.organizationId })),
    canRestore: device.homeId !== null && can(actor, "zone:edit", { id: device.homeId, organizationId: device.organizationId }),
  };
}

function toFirmwareDto(u: {
  id: string;
  targetVersion: string;
  windowStart: Date;
  windowEnd: Date;
  state: keyof typeof targetStateLabels;
  attempts: number;
  lastError: string | null;
  createdBy: string | null;
  createdAt: Date;
  updatedAt: Date;
}): FirmwareUpdateDto {
  return {
    id: u.id,
    targetVersion: u.targetVersion,
    windowStart: u.windowStart.toISOString(),
    windowEnd: u.windowEnd.toISOString(),
    state: u.state,
    stateLabel: u.state === "awaiting_report" ? "Scheduled on the device" : targetStateLabels[u.state],
    attempts: u.attempts,
    lastError: u.lastError,
    createdBy: u.createdBy,
    createdAt: u.createdAt.toISOString(),
    updatedAt: u.updatedAt.toISOString(),
  };
}

// ── maintenance windows (for the household view) ────────────────────────────

export interface MaintenanceWindowDto {
  deviceId: string;
  zoneName: string | null;
  targetVersion: string;
  windowStart: string;
  windowEnd: string;
  state: "scheduled" | "installed" | "missed";
}

/**
 * Firmware maintenance windows of one home that are coming up, running or just
 * over — what a household should know ("the patio amplifier may restart between
 * 02:00 and 04:00"). Readable by the household and by staff.
 */
export async function listMaintenanceWindows({ actor, homeId }: { actor: Actor; homeId: string }): Promise<MaintenanceWindowDto[]> {
  const [home] = await db
    .select({ id: homes.id, organizationId: homes.organizationId })
    .from(homes)
    .where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId)));
  if (!home || !can(actor, "home:read", home)) throw new AppError("home:not-found");
  const rows = await db
    .select({
      deviceId: firmwareUpdates.deviceId,
      zoneName: zones.name,
      targetVersion: firmwareUpdates.targetVersion,
      windowStart: firmwareUpdates.windowStart,
      windowEnd: firmwareUpdates.windowEnd,
      state: firmwareUpdates.state,
    })
    .from(firmwareUpdates)
    .innerJoin(devices, eq(devices.id, firmwareUpdates.deviceId))
    .leftJoin(zones, and(eq(zones.deviceId, devices.id), isNull(zones.deletedAt)))
    .where(
      and(
        eq(devices.homeId, homeId),
        inArray(firmwareUpdates.state, ["queued", "sending", "awaiting_report", "applied", "failed"]),
        sql`${firmwareUpdates.windowEnd} > now() - interval '2 days'`,
      ),
    )
    .orderBy(asc(firmwareUpdates.windowStart));
  return rows.map((r) => ({
    deviceId: r.deviceId,
    zoneName: r.zoneName,
    targetVersion: r.targetVersion,
    windowStart: r.windowStart.toISOString(),
    windowEnd: r.windowEnd.toISOString(),
    state: r.state === "applied" ? "installed" : r.state === "failed" ? "missed" : "scheduled",
  }));
}

