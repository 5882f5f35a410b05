import "server-only";
import { setMaxListeners } from "node:events";
import type PgBoss from "pg-boss";
import { and, eq, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { devices, firmwareUpdates, pushes, pushTargets, user, zones } from "@/db/schema";
import {
  claimTarget,
  claimTargets,
  findOrphanedTargets,
  findUnfinishedPushes,
  finishPushIfDone,
  finishTarget,
  loadTargetWork,
  markSent,
  noteTargetProblem,
  rescheduleTarget,
  resolveTargetsForDevice,
  type ClaimedTarget,
  type SentTarget,
  type TargetWork,
} from "@/db/queries/push-targets";
import { env } from "@/lib/env";
import { checkCapabilities } from "@/lib/zones/config-fits-device";
import type { FleetClient } from "@/lib/fleet/client";
import { normalizeConfig } from "@/lib/fleet/drift";
import { decideOnFailure, defaultRetryPolicy, retryDelayMs, targetStateLabels, type RetryPolicy } from "@/lib/fleet/push-state";
import { createBoss, PGBOSS_SCHEMA, QUEUES, withJobs, type QueueName } from "@/lib/fleet/queue";
import { sendMail } from "@/lib/mail";

// The push worker: takes jobs from the queue with bounded concurrency and moves
// push targets (and firmware updates) through their states. Every step is a
// compare-and-set on the row, so several workers — or a restarted one — can
// work side by side: a job that runs twice finds its target already moved on,
// and a send repeated after a crash carries the same Idempotency-Key, which the
// fleet answers with the first result instead of storing a second version.

export interface PushWorkerOptions {
  fleet: FleetClient;
  /** Push targets handled at once by this worker. */
  concurrency?: number;
  firmwareConcurrency?: number;
  /** How often an idle worker asks the queue for work. */
  pollIntervalMs?: number;
  /** A target (or firmware update) left in `sending` longer than this belonged to a worker that died; another takes it over. */
  leaseMs?: number;
  /** A sent target that has no report after this long fails (with what the fleet says about the device). */
  reportTimeoutMs?: number;
  /** Until then, how often a sent target asks the fleet itself (finds reports whose webhook was lost). */
  reportCheckIntervalMs?: number;
  /** After a maintenance window ends, how long to wait for the device's word before asking the fleet. */
  firmwareGraceMs?: number;
  retry?: Partial<RetryPolicy>;
  /** How often orphaned work is looked for (dead workers, crashes between two steps). */
  sweepIntervalMs?: number;
  random?: () => number;
  log?: (line: string) => void;
  /** Identifies this worker in logs. */
  name?: string;
}

export interface PushWorkerStats {
  sent: number;
  retried: number;
  failed: number;
  checked: number;
  mails: number;
  jobs: number;
  inFlight: number;
}

export interface PushWorker {
  readonly name: string;
  stats(): PushWorkerStats;
  /** Looks for orphaned work now (also runs on a timer). */
  sweep(): Promise<void>;
  /**
   * graceful: finish what is in flight, then stop. abort: drop everything at once,
   * as a crash would (jobs stay active, targets stay in `sending` until their lease runs out).
   */
  stop(options?: { abort?: boolean }): Promise<void>;
}

interface Settings {
  concurrency: number;
  firmwareConcurrency: number;
  pollIntervalMs: number;
  leaseMs: number;
  reportTimeoutMs: number;
  reportCheckIntervalMs: number;
  firmwareGraceMs: number;
  retry: RetryPolicy;
  sweepIntervalMs: number;
  random: () => number;
}

const sleep = (ms: number, signal?: AbortSignal) =>
  new Promise<void>((resolve) => {
    if (signal?.aborted) return resolve();
    const onAbort = () => {
      clearTimeout(timer);
      resolve();
    };
    const timer = setTimeout(() => {
      signal?.removeEventListener("abort", onAbort);
      resolve();
    }, ms);
    signal?.addEventListener("abort", onAbort, { once: true });
  });

function seconds(ms: number): string {
  return ms < 10_000 ? `${(ms / 1000).toFixed(1)} s` : `${Math.round(ms / 1000)} s`;
}

function minutes(ms: number): string {
  return ms < 120_000 ? `${Math.round(ms / 1000)} s` : `${Math.round(ms / 60_000)} min`;
}

export async function startPushWorker(options: PushWorkerOptions): Promise<PushWorker> {
  const settings: Settings = {
    concurrency: options.concurrency ?? 20,
    firmwareConcurrency: options.firmwareConcurrency ?? 4,
    pollIntervalMs: options.pollIntervalMs ?? 500,
    leaseMs: options.leaseMs ?? 60_000,
    reportTimeoutMs: options.reportTimeoutMs ?? 10 * 60_000,
    reportCheckIntervalMs: options.reportCheckIntervalMs ?? 30_000,
    firmwareGraceMs: options.firmwareGraceMs ?? 10 * 60_000,
    retry: { ...defaultRetryPolicy, ...options.retry },
    sweepIntervalMs: options.sweepIntervalMs ?? 5000,
    random: options.random ?? Math.random,
  };
  const name = options.name ?? `worker-${process.pid}`;
  const log = options.log ?? ((line: string) => console.log(`[${name}] ${line}`));
  const fleet = options.fleet;
  const stats: PushWorkerStats = { sent: 0, retried: 0, failed: 0, checked: 0, mails: 0, jobs: 0, inFlight: 0 };

  const boss = await createBoss({ supervise: true, max: 4 });
  // Everything this worker does listens to `abort`; `stopping` only stops taking new jobs.
  const abort = new AbortController();
  // Every call in flight listens to it (and AbortSignal.any adds more): not a leak.
  setMaxListeners(0, abort.signal);
  let stopping = false;
  // Idle loops wait on these; a sweep that found work, or stop(), wakes them.
  const wakers = new Set<() => void>();
  const wakeAll = () => {
    for (const w of [...wakers]) w();
  };

  // ── push targets ─────────────────────────────────────────────────────────

  // Accepted sends are written down in batches (one transaction for many targets): at a
  // thousand targets that is most of the database work of a push. A send whose batch fails
  // stays in `sending`; its job fails and runs again, and the repeated send with the same
  // Idempotency-Key gets the fleet's first answer back.
  const sentBatch: { item: SentTarget; done: (error?: unknown) => void }[] = [];
  let sentTimer: ReturnType<typeof setTimeout> | null = null;
  async function flushSent() {
    if (sentTimer) clearTimeout(sentTimer);
    sentTimer = null;
    const batch = sentBatch.splice(0, 500);
    if (batch.length === 0) return;
    try {
      await withJobs(async (tx, jobs) => {
        const firstCheck = new Date(Date.now() + Math.min(settings.reportCheckIntervalMs, settings.reportTimeoutMs));
        const settledPushes = await markSent(
          tx,
          batch.map((b) => b.item),
          { firstCheck, jobs },
        );
        for (const pushId of settledPushes) await finishPushIfDone(tx, pushId, jobs);
      });
      for (const b of batch) b.done();
    } catch (error) {
      for (const b of batch) b.done(error);
    }
    if (sentBatch.length) void flushSent();
  }
  function recordSent(item: SentTarget): Promise<void> {
    return new Promise((resolve, reject) => {
      sentBatch.push({ item, done: (error) => (error ? reject(error) : resolve()) });
      if (sentBatch.length >= 100) void flushSent();
      else sentTimer ??= setTimeout(() => void flushSent(), 15);
    });
  }

  async function settle(pushIds: string[]) {
    if (pushIds.length === 0) return;
    await withJobs(async (tx, jobs) => {
      for (const pushId of new Set(pushIds)) await finishPushIfDone(tx, pushId, jobs);
    });
  }

  async function fail(work: Pick<TargetWork, "id">, from: ("queued" | "sending" | "awaiting_report")[], reason: string) {
    stats.failed += 1;
    const pushId = await finishTarget(db, work.id, from, { state: "failed", reason });
    if (pushId) await settle([pushId]);
  }

  async function sendTarget(work: ClaimedTarget, signal: AbortSignal) {
    if (work.overtaken) {
      const pushId = await finishTarget(db, work.id, ["sending"], {
        state: "superseded",
        reason: "A later push to this device took over before this one was sent.",
      });
      if (pushId) await settle([pushId]);
      return;
    }
    const config = normalizeConfig(work.config);
    if (!config) return fail(work, ["sending"], `Revision ${work.revisionNumber} is stored in a format this version cannot send.`);
    if (work.profile) {
      const problems = checkCapabilities(config, work.profile);
      if (problems.length) return fail(work, ["sending"], problems.map((p) => p.message).join(" "));
    }

    let expectedVersion = work.deviceDesiredVersion;
    for (let conflicts = 0; ; conflicts++) {
      try {
        const accepted = await fleet.putDesired(
          work.fleetDeviceId,
          { expectedVersion, config, reference: `zonewright push ${work.pushId} target ${work.id}` },
          { idempotencyKey: work.idempotencyKey, signal },
        );
        stats.sent += 1;
        await recordSent({ targetId: work.id, deviceId: work.deviceId, version: accepted.version });
        return;
      } catch (error) {
        if (signal.aborted) throw error;
        const decision = decideOnFailure(error);
        if (decision.kind === "conflict" && decision.currentVersion !== null && conflicts < 3) {
          // Someone wrote the desired state since we last looked: send on top of it.
          expectedVersion = decision.currentVersion;
          await db
            .update(devices)
            .set({ desiredVersion: sql`greatest(${devices.desiredVersion}, ${decision.currentVersion})` })
            .where(eq(devices.id, work.deviceId));
          await noteTargetProblem(work.id, `The fleet had desired version ${decision.currentVersion}; sent again on top of it.`);
          continue;
        }
        if (decision.kind === "retry" && work.attempts < settings.retry.maxAttempts) {
          const delay = retryDelayMs(work.attempts, decision.retryAfterMs, settings.retry, settings.random);
          stats.retried += 1;
          await withJobs((tx, jobs) =>
            rescheduleTarget(tx, {
              targetId: work.id,
              reason: `Attempt ${work.attempts} of ${settings.retry.maxAttempts}: ${decision.reason} Next attempt in ${seconds(delay)}.`,
              delayMs: delay,
              jobs,
            }),
          );
          return;
        }
        const reason =
          decision.kind === "retry"
            ? `Gave up after ${work.attempts} attempts. Last problem: ${decision.reason}`
            : decision.reason;
        return fail(work, ["sending"], reason);
      }
    }
  }

  /**
   * A sent target asks the fleet itself every `reportCheckIntervalMs` until its report is
   * due: a report whose webhook was lost (or is stuck) is found this way. When the report
   * is overdue, the target fails with what the fleet says about the device.
   */
  async function checkTarget(work: TargetWork, signal: AbortSignal) {
    const sentAt = work.sentAt?.getTime() ?? Date.now();
    const due = sentAt + settings.reportTimeoutMs;
    const checkAgain = async (at: number, note?: string) => {
      await withJobs(async (_tx, jobs) => {
        jobs.push({ queue: QUEUES.pushTarget, data: { targetId: work.id }, startAfter: new Date(Math.min(due, at)) });
      });
      if (note) {
        await db
          .update(pushTargets)
          .set({ lastError: note })
          .where(and(eq(pushTargets.id, work.id), eq(pushTargets.state, "awaiting_report")));
      }
    };
    stats.checked += 1;
    let polled;
    try {
      polled = await fleet.getDevice(work.fleetDeviceId, { signal });
    } catch (error) {
      if (signal.aborted) throw error;
      const decision = decideOnFailure(error);
      if (decision.kind === "retry" && Date.now() < due + settings.reportTimeoutMs) {
        const delay = retryDelayMs(2, decision.retryAfterMs, settings.retry, settings.random);
        await withJobs(async (_tx, jobs) => {
          jobs.push({ queue: QUEUES.pushTarget, data: { targetId: work.id }, startAfter: new Date(Date.now() + delay) });
        });
        await db
          .update(pushTargets)
          .set({ lastError: `No report yet, and the fleet could not be asked: ${decision.reason}` })
          .where(and(eq(pushTargets.id, work.id), eq(pushTargets.state, "awaiting_report")));
        return;
      }
      return fail(work, ["awaiting_report"], `No report came, and the fleet could not be asked about the device: ${decision.reason}`);
    }
    const reported = polled.reported;
    await withJobs(async (tx, jobs) => {
      // A report whose webhook has not arrived is taken from the poll (forward only).
      if (reported.status !== null) {
        await tx
          .update(devices)
          .set({
            reportedVersion: reported.version,
            reportedConfig: reported.config,
            reportedStatus: reported.status,
            reportedError: reported.error,
            lastReportAt: reported.reportedAt ? new Date(reported.reportedAt) : undefined,
            online: polled.device.online,
            updatedAt: sql`now()`,
          })
          .where(and(eq(devices.id, work.deviceId), sql`${devices.reportedVersion} < ${reported.version}`));
      }
      const settled = await resolveTargetsForDevice(tx, work.deviceId, {
        reportedVersion: reported.version,
        status: reported.status,
        error: reported.error,
      });
      for (const pushId of settled) await finishPushIfDone(tx, pushId, jobs);
    });
    const still = await loadTargetWork(work.id);
    if (still?.state !== "awaiting_report") return;
    if (Date.now() < due - 250) {
      return checkAgain(
        Date.now() + settings.reportCheckIntervalMs,
        polled.device.online ? undefined : "The device is offline; the fleet keeps the configuration until it reconnects.",
      );
    }
    const reason = polled.device.online
      ? `The device did not report within ${minutes(settings.reportTimeoutMs)} (it reports desired version ${reported.version}; we sent ${work.desiredVersion}).`
      : `The device is offline and did not report within ${minutes(settings.reportTimeoutMs)}. The fleet keeps the configuration; the device takes it when it reconnects, and the board will show it then.`;
    return fail(work, ["awaiting_report"], reason);
  }

  /** Most jobs are sends: the batch just fetched is claimed in one statement before the jobs run. */
  async function claimBatch(jobs: PgBoss.Job<Record<string, unknown>>[]): Promise<Map<string, ClaimedTarget>> {
    const ids = jobs.map((j) => j.data?.targetId).filter((id): id is string => typeof id === "string" && /^[0-9a-f-]{36}$/i.test(id));
    return claimTargets(ids, settings.leaseMs);
  }

  async function handleTarget(data: { targetId?: unknown }, signal: AbortSignal, claimed?: Map<string, ClaimedTarget>) {
    if (typeof data.targetId !== "string") return;
    const mine = claimed?.get(data.targetId);
    if (mine) {
      claimed!.delete(data.targetId); // a second job for the same target in this batch finds it taken
      return sendTarget(mine, signal);
    }
    // No batch claim (it could not be made): claim this one alone.
    const single = claimed ? null : await claimTarget(data.targetId, settings.leaseMs);
    if (single) return sendTarget(single, signal);
    const work = await loadTargetWork(data.targetId);
    // Awaiting its report: this is the check when the report is due. Anything else: another
    // worker has it, or it is already final and a repeated job has nothing to do.
    if (work?.state === "awaiting_report") return checkTarget(work, signal);
  }

  // ── firmware updates ─────────────────────────────────────────────────────

  async function handleFirmware(data: { updateId?: unknown }, signal: AbortSignal) {
    if (typeof data.updateId !== "string") return;
    const [row] = await db
      .select({
        id: firmwareUpdates.id,
        state: firmwareUpdates.state,
        attempts: firmwareUpdates.attempts,
        targetVersion: firmwareUpdates.targetVersion,
        windowStart: firmwareUpdates.windowStart,
        windowEnd: firmwareUpdates.windowEnd,
        fleetDeviceId: devices.fleetDeviceId,
        deviceId: devices.id,
      })
      .from(firmwareUpdates)
      .innerJoin(devices, eq(devices.id, firmwareUpdates.deviceId))
      .where(eq(firmwareUpdates.id, data.updateId));
    if (!row) return;
    const failFirmware = async (from: ("sending" | "awaiting_report")[], reason: string) => {
      stats.failed += 1;
      await db
        .update(firmwareUpdates)
        .set({ state: "failed", lastError: reason, updatedAt: sql`now()` })
        .where(and(eq(firmwareUpdates.id, row.id), sql`${firmwareUpdates.state} in ${sql.raw(`(${from.map((s) => `'${s}'`).join(",")})`)}`));
    };

    if (row.state === "queued" || row.state === "sending") {
      const claimed = await db
        .update(firmwareUpdates)
        .set({ state: "sending", attempts: sql`${firmwareUpdates.attempts} + 1`, updatedAt: sql`now()` })
        .where(
          and(
            eq(firmwareUpdates.id, row.id),
            sql`(${firmwareUpdates.state} = 'queued' or (${firmwareUpdates.state} = 'sending' and ${firmwareUpdates.updatedAt} < now() - ${settings.leaseMs} * interval '1 millisecond'))`,
          ),
        )
        .returning({ attempts: firmwareUpdates.attempts });
      if (claimed.length === 0) return;
      const attempts = claimed[0].attempts;
      try {
        const accepted = await fleet.scheduleFirmwareUpdate(
          row.fleetDeviceId,
          { version: row.targetVersion, windowStart: row.windowStart.toISOString(), windowEnd: row.windowEnd.toISOString() },
          { idempotencyKey: `firmware:${row.id}`, signal },
        );
        stats.sent += 1;
        await withJobs(async (tx, jobs) => {
          const moved = await tx
            .update(firmwareUpdates)
            .set({ state: "awaiting_report", fleetUpdateId: accepted.updateId, lastError: null, updatedAt: sql`now()` })
            .where(and(eq(firmwareUpdates.id, row.id), eq(firmwareUpdates.state, "sending")))
            .returning({ id: firmwareUpdates.id });
          if (moved.length === 0) return;
          // The device may have installed it (and said so) before we wrote down the fleet's update id.
          const [device] = await tx.select({ firmwareVersion: devices.firmwareVersion }).from(devices).where(eq(devices.id, row.deviceId));
          if (device?.firmwareVersion === row.targetVersion) {
            await tx.update(firmwareUpdates).set({ state: "applied", updatedAt: sql`now()` }).where(eq(firmwareUpdates.id, row.id));
            return;
          }
          jobs.push({ queue: QUEUES.firmware, data: { updateId: row.id }, startAfter: new Date(row.windowEnd.getTime() + settings.firmwareGraceMs) });
        });
      } catch (error) {
        if (signal.aborted) throw error;
        const decision = decideOnFailure(error);
        if (decision.kind === "retry" && attempts < settings.retry.maxAttempts) {
          const delay = retryDelayMs(attempts, decision.retryAfterMs, settings.retry, settings.random);
          stats.retried += 1;
          await withJobs(async (tx, jobs) => {
            const moved = await tx
              .update(firmwareUpdates)
              .set({
                state: "queued",
                lastError: `Attempt ${attempts} of ${settings.retry.maxAttempts}: ${decision.reason} Next attempt in ${seconds(delay)}.`,
                updatedAt: sql`now()`,
              })
              .where(and(eq(firmwareUpdates.id, row.id), eq(firmwareUpdates.state, "sending")))
              .returning({ id: firmwareUpdates.id });
            if (moved.length) jobs.push({ queue: QUEUES.firmware, data: { updateId: row.id }, startAfter: new Date(Date.now() + delay) });
          });
          return;
        }
        await failFirmware(["sending"], decision.kind === "retry" ? `Gave up after ${attempts} attempts. Last problem: ${decision.reason}` : decision.reason);
      }
      return;
    }

    if (row.state === "awaiting_report") {
      const due = row.windowEnd.getTime() + settings.firmwareGraceMs;
      if (Date.now() < due - 250) {
        await withJobs(async (_tx, jobs) => {
          jobs.push({ queue: QUEUES.firmware, data: { updateId: row.id }, startAfter: new Date(due) });
        });
        return;
      }
      stats.checked += 1;
      try {
        const firmware = await fleet.getFirmware(row.fleetDeviceId, { signal });
        if (firmware.current === row.targetVersion) {
          await db
            .update(firmwareUpdates)
            .set({ state: "applied", lastError: null, updatedAt: sql`now()` })
            .where(and(eq(firmwareUpdates.id, row.id), eq(firmwareUpdates.state, "awaiting_report")));
          await db
            .update(devices)
            .set({ firmwareVersion: firmware.current, updatedAt: sql`now()` })
            .where(eq(devices.id, row.deviceId));
          return;
        }
        await failFirmware(["awaiting_report"], `The maintenance window ended and the device still runs ${firmware.current}.`);
      } catch (error) {
        if (signal.aborted) throw error;
        await failFirmware(["awaiting_report"], `The maintenance window ended without word from the device, and the fleet could not be asked: ${decideOnFailure(error).reason}`);
      }
    }
  }

  // ── push summary e-mail ──────────────────────────────────────────────────

  async function handleMail(data: { pushId?: unknown }) {
    if (typeof data.pushId !== "string") return;
    const [push] = await db
      .select({ id: pushes.id, scopeLabel: pushes.scopeLabel, createdAt: pushes.createdAt, finishedAt: pushes.finishedAt, name: user.name, email: user.email })
      .from(pushes)
      .leftJoin(user, eq(user.id, pushes.createdBy))
      .where(eq(pushes.id, data.pushId));
    if (!push?.email) return;
    const counts = await db
      .select({ state: pushTargets.state, n: sql<number>`count(*)::int` })
      .from(pushTargets)
      .where(eq(pushTargets.pushId, push.id))
      .groupBy(pushTargets.state);
    const failed = await db
      .select({ zoneName: zones.name, homeName: sql<string>`(select h.name from homes h where h.id = "zones"."home_id")`, reason: pushTargets.lastError })
      .from(pushTargets)
      .innerJoin(zones, eq(zones.id, pushTargets.zoneId))
      .where(and(eq(pushTargets.pushId, push.id), eq(pushTargets.state, "failed")))
      .limit(50);
    const total = counts.reduce((sum, c) => sum + c.n, 0);
    const failedCount = counts.find((c) => c.state === "failed")?.n ?? 0;
    if (failedCount === 0) return; // retried and fixed before the mail went out
    const link = `${env().APP_URL.replace(/\/$/, "")}/pushes/${push.id}`;
    const text = [
      `Hello ${push.name ?? ""},`.trim(),
      "",
      `Your push “${push.scopeLabel}” (started ${push.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC) has finished: ${failedCount} of ${total} zone${total === 1 ? "" : "s"} failed.`,
      "",
      ...counts.map((c) => `  ${targetStateLabels[c.state].padEnd(16)} ${c.n}`),
      "",
      "What failed:",
      ...failed.map((f) => `  • ${f.zoneName} (${f.homeName}): ${f.reason ?? "no reason recorded"}`),
      ...(failedCount > failed.length ? [`  … and ${failedCount - failed.length} more.`] : []),
      "",
      `See the push and retry the failed zones: ${link}`,
      "",
      "— Zonewright",
    ].join("\n");
    await sendMail({ to: push.email, subject: `Push “${push.scopeLabel}”: ${failedCount} of ${total} failed`, text });
    stats.mails += 1;
  }

  // ── sweeping ─────────────────────────────────────────────────────────────

  async function sweep() {
    const orphans = await findOrphanedTargets({ leaseMs: settings.leaseMs, limit: 2000 });
    const firmwareOrphans = await db.execute<{ id: string }>(sql`
      select f.id from firmware_updates f
      where f.state in ('queued', 'sending', 'awaiting_report')
        and f.updated_at < now() - ${settings.leaseMs} * interval '1 millisecond'
        and not exists (
          select 1 from ${sql.raw(PGBOSS_SCHEMA)}.job j
          where j.name = ${QUEUES.firmware} and j.data->>'updateId' = f.id::text
            and (j.state in ('created', 'retry') or (j.state = 'active' and j.started_on > now() - ${settings.leaseMs} * interval '1 millisecond'))
        )
      limit 500`);
    if (orphans.length || firmwareOrphans.rows.length) {
      log(`sweep: picking up ${orphans.length} push target(s) and ${firmwareOrphans.rows.length} firmware update(s) left without a live job`);
      await withJobs(async (_tx, jobs) => {
        for (const targetId of orphans) jobs.push({ queue: QUEUES.pushTarget, data: { targetId } });
        for (const { id } of firmwareOrphans.rows) jobs.push({ queue: QUEUES.firmware, data: { updateId: id } });
      });
      wakeAll();
    }
    await settle(await findUnfinishedPushes());
  }

  // ── the loops ────────────────────────────────────────────────────────────

  type Handler<P> = (data: Record<string, unknown>, signal: AbortSignal, prepared?: P) => Promise<void>;

  async function runQueue<P = undefined>(
    queue: QueueName,
    concurrency: number,
    handler: Handler<P>,
    prepare?: (jobs: PgBoss.Job<Record<string, unknown>>[]) => Promise<P>,
  ) {
    const inFlight = new Set<Promise<void>>();
    // Completed jobs are marked in batches: one statement for many jobs. A crash before a batch
    // is written only makes those jobs run again later, and a repeated job finds nothing to do.
    const done: string[] = [];
    let flushTimer: ReturnType<typeof setTimeout> | null = null;
    const flush = async () => {
      if (flushTimer) clearTimeout(flushTimer);
      flushTimer = null;
      const ids = done.splice(0);
      if (ids.length) await boss.complete(queue, ids).catch((error: Error) => log(`could not mark ${ids.length} ${queue} job(s) done: ${error.message}`));
    };
    const complete = (id: string) => {
      done.push(id);
      if (done.length >= 100) void flush();
      else flushTimer ??= setTimeout(() => void flush(), 25);
    };
    while (!stopping) {
      if (inFlight.size >= concurrency) {
        await Promise.race(inFlight);
        continue;
      }
      let jobs: PgBoss.Job<Record<string, unknown>>[];
      try {
        jobs = await boss.fetch<Record<string, unknown>>(queue, { batchSize: concurrency - inFlight.size });
      } catch (error) {
        if (stopping) break;
        log(`could not fetch from ${queue}: ${(error as Error).message}`);
        await sleep(settings.pollIntervalMs * 4, abort.signal);
        continue;
      }
      if (jobs.length === 0) {
        let waker: (() => void) | null = null;
        await Promise.race([
          sleep(settings.pollIntervalMs, abort.signal),
          new Promise<void>((resolve) => {
            waker = resolve;
            wakers.add(resolve);
          }),
          ...(inFlight.size ? [Promise.race(inFlight)] : []),
        ]);
        if (waker) wakers.delete(waker);
        continue;
      }
      let prepared: P | undefined;
      if (prepare) {
        try {
          prepared = await prepare(jobs);
        } catch (error) {
          // The jobs run one by one instead (each handler claims for itself).
          log(`could not prepare ${jobs.length} ${queue} job(s): ${(error as Error).message}`);
        }
      }
      for (const job of jobs) {
        stats.jobs += 1;
        const run: Promise<void> = (async () => {
          try {
            await handler(job.data ?? {}, abort.signal, prepared);
            if (!abort.signal.aborted) complete(job.id);
          } catch (error) {
            if (abort.signal.aborted) return; // like a crash: the job stays active, the lease and the sweep recover it
            log(`${queue} job ${job.id} failed: ${(error as Error).message}`);
            await boss.fail(queue, job.id, { message: (error as Error).message }).catch(() => undefined);
          }
        })().finally(() => {
          inFlight.delete(run);
          stats.inFlight -= 1;
        });
        stats.inFlight += 1;
        inFlight.add(run);
      }
    }
    if (!abort.signal.aborted) await Promise.allSettled(inFlight);
    if (!abort.signal.aborted) await flush();
    else if (flushTimer) clearTimeout(flushTimer);
  }

  const loops = Promise.all([
    runQueue(QUEUES.pushTarget, settings.concurrency, (data, signal, claimed) => handleTarget(data, signal, claimed), claimBatch),
    runQueue(QUEUES.firmware, settings.firmwareConcurrency, (data, signal) => handleFirmware(data, signal)),
    runQueue(QUEUES.pushMail, 2, (data) => handleMail(data)),
  ]);

  let sweeping: Promise<void> | null = null;
  const runSweep = () => {
    sweeping ??= sweep()
      .catch((error: unknown) => log(`sweep failed: ${(error as Error).message}`))
      .finally(() => {
        sweeping = null;
      });
    return sweeping;
  };
  const sweepTimer = setInterval(() => void runSweep(), settings.sweepIntervalMs);
  void runSweep();

  log(`started: ${settings.concurrency} push targets at once, lease ${seconds(settings.leaseMs)}, report timeout ${minutes(settings.reportTimeoutMs)}`);

  return {
    name,
    stats: () => ({ ...stats }),
    sweep: () => runSweep(),
    async stop({ abort: hard = false } = {}) {
      stopping = true;
      clearInterval(sweepTimer);
      if (hard) abort.abort(new Error("worker stopped"));
      wakeAll();
      await loops;
      await sweeping;
      await boss.stop({ graceful: !hard, close: true, wait: true, timeout: 5000 });
      log(hard ? "stopped at once (work in flight left for another worker)" : "stopped");
    },
  };
}
