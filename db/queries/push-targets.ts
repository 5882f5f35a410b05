import "server-only";
import { createHash } from "node:crypto";
import { and, eq, inArray, sql } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { devices, modelProfiles, pushes, pushTargets, zoneRevisions, zones, type PushTargetState } from "@/db/schema";
import type { CapabilityProfile } from "@/lib/zones/config-fits-device";
import { resolveFromReport, type ReportFacts, type Resolution } from "@/lib/fleet/push-state";
import { PGBOSS_SCHEMA, QUEUES, type JobRequest } from "@/lib/fleet/queue";
import type { ZoneConfig } from "@/lib/validation/zone-config";

// The push target state machine, as compare-and-set updates: each transition
// names the state(s) it starts from, so of two workers (or a worker and a
// webhook) racing on one target exactly one wins and the other sees no row.

type Executor = Transaction | typeof db;

export interface TargetWork {
  id: string;
  pushId: string;
  state: PushTargetState;
  attempts: number;
  idempotencyKey: string;
  desiredVersion: number | null;
  sentAt: Date | null;
  createdAt: Date;
  updatedAt: Date;
  revisionId: string;
  revisionNumber: number;
  config: ZoneConfig;
  zoneId: string;
  zoneName: string;
  deviceId: string;
  fleetDeviceId: string;
  deviceDesiredVersion: number;
  deviceOnline: boolean;
  profile: CapabilityProfile | null;
}

const workColumns = {
  id: pushTargets.id,
  pushId: pushTargets.pushId,
  state: pushTargets.state,
  attempts: pushTargets.attempts,
  idempotencyKey: pushTargets.idempotencyKey,
  desiredVersion: pushTargets.desiredVersion,
  sentAt: pushTargets.sentAt,
  createdAt: pushTargets.createdAt,
  updatedAt: pushTargets.updatedAt,
  revisionId: pushTargets.revisionId,
  revisionNumber: zoneRevisions.number,
  config: zoneRevisions.config,
  zoneId: pushTargets.zoneId,
  zoneName: zones.name,
  deviceId: pushTargets.deviceId,
  fleetDeviceId: devices.fleetDeviceId,
  deviceDesiredVersion: devices.desiredVersion,
  deviceOnline: devices.online,
  profileName: modelProfiles.name,
  presetSlots: modelProfiles.presetSlots,
  eqBands: modelProfiles.eqBands,
  inputs: modelProfiles.inputs,
  subwooferOutputs: modelProfiles.subwooferOutputs,
  hasLineOut: modelProfiles.hasLineOut,
};

function selectWork(tx: Executor, targetId: string) {
  return tx
    .select(workColumns)
    .from(pushTargets)
    .innerJoin(zoneRevisions, eq(zoneRevisions.id, pushTargets.revisionId))
    .innerJoin(zones, eq(zones.id, pushTargets.zoneId))
    .innerJoin(devices, eq(devices.id, pushTargets.deviceId))
    .leftJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(eq(pushTargets.id, targetId));
}

type WorkRow = Awaited<ReturnType<typeof selectWork>>[number];

function toWork(r: WorkRow): TargetWork {
  const { profileName, presetSlots, eqBands, inputs, subwooferOutputs, hasLineOut, ...rest } = r;
  return {
    ...rest,
    profile:
      profileName === null
        ? null
        : { name: profileName, presetSlots: presetSlots!, eqBands: eqBands!, inputs: inputs!, subwooferOutputs: subwooferOutputs!, hasLineOut: hasLineOut! },
  };
}

export async function loadTargetWork(targetId: string, tx: Executor = db): Promise<TargetWork | null> {
  const [row] = await selectWork(tx, targetId);
  return row ? toWork(row) : null;
}

export interface ClaimedTarget extends TargetWork {
  /** A push started later than this target's, to the same device, is still going or applied. */
  overtaken: boolean;
}

type ClaimRow = {
  id: string;
  push_id: string;
  state: PushTargetState;
  attempts: number;
  idempotency_key: string;
  desired_version: number | null;
  sent_at: Date | null;
  created_at: Date;
  updated_at: Date;
  revision_id: string;
  revision_number: number;
  config: ZoneConfig;
  zone_id: string;
  zone_name: string;
  device_id: string;
  fleet_device_id: string;
  device_desired_version: number;
  device_online: boolean;
  profile_name: string | null;
  preset_slots: number | null;
  eq_bands: number | null;
  inputs: CapabilityProfile["inputs"] | null;
  subwoofer_outputs: number | null;
  has_line_out: boolean | null;
  overtaken: boolean;
};

/**
 * queued → sending (attempts + 1) for a batch of targets, returning everything each
 * send needs, in one statement. A target left in `sending` longer than the lease
 * belongs to a worker that died mid-send; it may be claimed again — the fleet's
 * idempotency key makes the second send return the first answer. Targets not
 * returned were not claimable (another worker has them, or they moved on).
 */
export async function claimTargets(targetIds: string[], leaseMs: number): Promise<Map<string, ClaimedTarget>> {
  const claimed = new Map<string, ClaimedTarget>();
  if (targetIds.length === 0) return claimed;
  const result = await db.execute<ClaimRow>(sql`
    update push_targets t set state = 'sending', attempts = t.attempts + 1, updated_at = now()
    from zone_revisions r, zones z, devices d left join model_profiles m on m.id = d.model_profile_id
    where t.id = any(${sql.param([...new Set(targetIds)])}::uuid[])
      and r.id = t.revision_id and z.id = t.zone_id and d.id = t.device_id
      and (t.state = 'queued' or (t.state = 'sending' and t.updated_at < now() - ${leaseMs} * interval '1 millisecond'))
    returning t.id, t.push_id, t.state, t.attempts, t.idempotency_key, t.desired_version, t.sent_at, t.created_at, t.updated_at,
      t.revision_id, r.number as revision_number, r.config, t.zone_id, z.name as zone_name,
      t.device_id, d.fleet_device_id, d.desired_version as device_desired_version, d.online as device_online,
      m.name as profile_name, m.preset_slots, m.eq_bands, m.inputs, m.subwoofer_outputs, m.has_line_out,
      exists (
        select 1 from push_targets n
        where n.device_id = t.device_id and n.id <> t.id and n.created_at > t.created_at
          and n.state in ('queued', 'sending', 'awaiting_report', 'applied')
      ) as overtaken
  `);
  const date = (v: Date | string | null) => (v === null ? null : v instanceof Date ? v : new Date(v));
  for (const r of result.rows) {
    claimed.set(r.id, {
      id: r.id,
      pushId: r.push_id,
      state: r.state,
      attempts: r.attempts,
      idempotencyKey: r.idempotency_key,
      desiredVersion: r.desired_version,
      sentAt: date(r.sent_at),
      createdAt: date(r.created_at)!,
      updatedAt: date(r.updated_at)!,
      revisionId: r.revision_id,
      revisionNumber: r.revision_number,
      config: r.config,
      zoneId: r.zone_id,
      zoneName: r.zone_name,
      deviceId: r.device_id,
      fleetDeviceId: r.fleet_device_id,
      deviceDesiredVersion: r.device_desired_version,
      deviceOnline: r.device_online,
      profile:
        r.profile_name === null
          ? null
          : {
              name: r.profile_name,
              presetSlots: r.preset_slots!,
              eqBands: r.eq_bands!,
              inputs: r.inputs!,
              subwooferOutputs: r.subwoofer_outputs!,
              hasLineOut: r.has_line_out!,
            },
      overtaken: r.overtaken,
    });
  }
  return claimed;
}

/** One target: see claimTargets. */
export async function claimTarget(targetId: string, leaseMs: number): Promise<ClaimedTarget | null> {
  return (await claimTargets([targetId], leaseMs)).get(targetId) ?? null;
}

export interface SentTarget {
  targetId: string;
  deviceId: string;
  /** The desired version the fleet stored for it. */
  version: number;
}

/**
 * sending → awaiting_report for many targets at once, with the desired version
 * the fleet gave each. If a device already reported that version (its webhook
 * beat this bookkeeping), its target is settled right here. Returns the pushes
 * that had a target finish.
 */
export async function markSent(tx: Transaction, sent: SentTarget[], { firstCheck, jobs }: { firstCheck: Date; jobs: JobRequest[] }): Promise<string[]> {
  if (sent.length === 0) return [];
  const deviceIds = [...new Set(sent.map((s) => s.deviceId))].sort();
  // Device rows first and in id order — the webhook also locks the device before its
  // targets — so concurrent batches and webhooks never wait on each other in a circle.
  await tx.execute(sql`select id from devices where id = any(${sql.param(deviceIds)}::uuid[]) order by id for update`);
  const devicesAfter = await tx.execute<{ id: string; reported_version: number; reported_status: string | null; reported_error: string | null }>(sql`
    update devices d set desired_version = greatest(d.desired_version, v.version), updated_at = now()
    from (select id, max(version) as version from unnest(${sql.param(sent.map((s) => s.deviceId))}::uuid[], ${sql.param(sent.map((s) => s.version))}::int[]) as u(id, version) group by id) v
    where d.id = v.id
    returning d.id, d.reported_version, d.reported_status, d.reported_error`);
  const moved = await tx.execute<{ id: string; device_id: string; desired_version: number }>(sql`
    update push_targets t set state = 'awaiting_report', desired_version = v.version, sent_at = now(), updated_at = now(), last_error = null
    from unnest(${sql.param(sent.map((s) => s.targetId))}::uuid[], ${sql.param(sent.map((s) => s.version))}::int[]) as v(id, version)
    where t.id = v.id and t.state = 'sending'
    returning t.id, t.device_id, t.desired_version`);
  const byDevice = new Map(devicesAfter.rows.map((d) => [d.id, d] as const));
  const settled = new Set<string>();
  for (const target of moved.rows) {
    const device = byDevice.get(target.device_id);
    if (device && device.reported_version >= target.desired_version) {
      const pushIds = await resolveTargetsForDevice(tx, target.device_id, {
        reportedVersion: device.reported_version,
        status: (device.reported_status as ReportFacts["status"]) ?? null,
        error: device.reported_error,
      });
      if (pushIds.length) {
        for (const id of pushIds) settled.add(id);
        continue;
      }
    }
    // The worker asks the fleet itself later on, so a report whose webhook was lost is still found.
    jobs.push({ queue: QUEUES.pushTarget, data: { targetId: target.id }, startAfter: firstCheck });
  }
  return [...settled];
}

/** Moves a target to a final state if it is still in one of `from`; returns its push id when it moved. */
export async function finishTarget(
  tx: Executor,
  targetId: string,
  from: PushTargetState[],
  resolution: Resolution | { state: "cancelled"; reason: string },
): Promise<string | null> {
  const rows = await tx
    .update(pushTargets)
    .set({
      state: resolution.state,
      lastError: "reason" in resolution ? resolution.reason : null,
      appliedAt: resolution.state === "applied" ? sql`now()` : undefined,
      updatedAt: sql`now()`,
    })
    .where(and(eq(pushTargets.id, targetId), inArray(pushTargets.state, from)))
    .returning({ pushId: pushTargets.pushId });
  return rows[0]?.pushId ?? null;
}

/** sending → queued with the reason, and a job for the next attempt after `delayMs`. */
export async function rescheduleTarget(
  tx: Transaction,
  { targetId, reason, delayMs, jobs }: { targetId: string; reason: string; delayMs: number; jobs: JobRequest[] },
): Promise<boolean> {
  const rows = await tx
    .update(pushTargets)
    .set({ state: "queued", lastError: reason, updatedAt: sql`now()` })
    .where(and(eq(pushTargets.id, targetId), eq(pushTargets.state, "sending")))
    .returning({ id: pushTargets.id });
  if (rows.length === 0) return false;
  jobs.push({ queue: QUEUES.pushTarget, data: { targetId }, startAfter: new Date(Date.now() + delayMs) });
  return true;
}

/** Records a retryable problem on a target without leaving `sending` (e.g. a version conflict handled inline). */
export async function noteTargetProblem(targetId: string, reason: string) {
  await db
    .update(pushTargets)
    .set({ lastError: reason, updatedAt: sql`now()` })
    .where(and(eq(pushTargets.id, targetId), eq(pushTargets.state, "sending")));
}

/**
 * Applies what a device reported to every target of that device waiting for a
 * version at or below the reported one. Returns the pushes that had a target finish.
 */
export async function resolveTargetsForDevice(tx: Transaction, deviceId: string, report: ReportFacts): Promise<string[]> {
  if (report.status === null) return [];
  // Two possible outcomes: the target that sent exactly the reported version takes the
  // report's verdict; any that sent an older one was overtaken. Decided by resolveFromReport,
  // written in one statement (one round trip per report, however many targets wait).
  const exact = resolveFromReport(report.reportedVersion, report);
  const older = report.reportedVersion > 0 ? resolveFromReport(report.reportedVersion - 1, report) : null;
  if (!exact && !older) return [];
  const exactState = exact?.state ?? "awaiting_report";
  const exactReason = exact && "reason" in exact ? exact.reason : null;
  const olderState = older?.state ?? "awaiting_report";
  const olderReason = older && "reason" in older ? older.reason : null;
  const rows = await tx.execute<{ push_id: string }>(sql`
    update push_targets set
      state = case when desired_version = ${report.reportedVersion} then ${exactState} else ${olderState} end,
      last_error = case when desired_version = ${report.reportedVersion} then ${exactReason}::text else ${olderReason}::text end,
      applied_at = case when desired_version = ${report.reportedVersion} and ${exactState} = 'applied' then now() else applied_at end,
      updated_at = now()
    where device_id = ${deviceId} and state = 'awaiting_report' and desired_version <= ${report.reportedVersion}
      and (case when desired_version = ${report.reportedVersion} then ${exactState} else ${olderState} end) <> 'awaiting_report'
    returning push_id`);
  return [...new Set(rows.rows.map((r) => r.push_id))];
}

const activeStatesSql = sql`('queued', 'sending', 'awaiting_report')`;

/** A stable UUID-shaped id from any text (SHA-256, version nibble set to 8 = custom). */
function uuidFrom(text: string): string {
  const h = createHash("sha256").update(text).digest("hex");
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-8${h.slice(13, 16)}-a${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

/**
 * running → finished (or cancelled, when some of it was) once no target is left
 * active. One caller wins; when anything failed it queues the summary e-mail,
 * with the push id as job id so it is sent once.
 */
export async function finishPushIfDone(tx: Transaction, pushId: string, jobs: JobRequest[]): Promise<boolean> {
  const rows = await tx.execute<{ id: string; failed: number; finished_at: string }>(sql`
    update pushes p set
      status = case when exists (select 1 from push_targets t where t.push_id = p.id and t.state = 'cancelled') then 'cancelled' else 'finished' end,
      finished_at = now()
    where p.id = ${pushId} and p.status = 'running'
      and not exists (select 1 from push_targets t where t.push_id = p.id and t.state in ${activeStatesSql})
    returning p.id, (select count(*)::int from push_targets t where t.push_id = p.id and t.state = 'failed') as failed, p.finished_at::text
  `);
  const row = rows.rows[0];
  if (!row) return false;
  // One e-mail per finish (a push finishes again after retry-failed): the job id is derived from both.
  if (row.failed > 0) jobs.push({ queue: QUEUES.pushMail, data: { pushId }, id: uuidFrom(`${pushId}|${row.finished_at}`) });
  return true;
}

/**
 * Targets that should be moving but have no live job: their worker died after
 * fetching the job, or a crash came between two steps. Older than the lease so
 * a live worker's work is never taken from it.
 */
export async function findOrphanedTargets({ leaseMs, limit }: { leaseMs: number; limit: number }): Promise<string[]> {
  const rows = await db.execute<{ id: string }>(sql`
    select t.id from push_targets t
    where t.state in ${activeStatesSql}
      and t.updated_at < now() - ${leaseMs} * interval '1 millisecond'
      and not exists (
        select 1 from ${sql.raw(PGBOSS_SCHEMA)}.job j
        where j.name = ${QUEUES.pushTarget}
          and j.data->>'targetId' = t.id::text
          and (j.state in ('created', 'retry') or (j.state = 'active' and j.started_on > now() - ${leaseMs} * interval '1 millisecond'))
      )
    order by t.updated_at
    limit ${limit}
  `);
  return rows.rows.map((r) => r.id);
}

/** Pushes still marked running although nothing in them is active (a finisher crashed before committing). */
export async function findUnfinishedPushes(limit = 100): Promise<string[]> {
  const rows = await db
    .select({ id: pushes.id })
    .from(pushes)
    .where(
      and(
        eq(pushes.status, "running"),
        sql`not exists (select 1 from push_targets t where t.push_id = "pushes"."id" and t.state in ${activeStatesSql})`,
      ),
    )
    .limit(limit);
  return rows.map((r) => r.id);
}
