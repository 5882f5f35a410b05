import { drizzle } from "drizzle-orm/node-postgres";
import type { PoolClient } from "pg";
import PgBoss from "pg-boss";
import { pool, type Transaction } from "@/db/client";
import * as schema from "@/db/schema";
import { env } from "@/lib/env";

// The durable job queue (pg-boss on our PostgreSQL, in its own `pgboss` schema).
// Jobs are only wake-up calls ("look at push target X"); the truth is in
// push_targets / firmware_updates, changed with compare-and-set, so a job that
// runs twice or late does no harm. Jobs are inserted in the same transaction as
// the rows they point at (`withJobs`), so a push is never created without its
// jobs, nor a job without its push.

export const QUEUES = {
  /** { targetId }: send a push target, or check on one awaiting its report. */
  pushTarget: "push-target",
  /** { updateId }: schedule a firmware update, or check on one. */
  firmware: "firmware-update",
  /** { pushId }: e-mail the push summary to whoever started it. */
  pushMail: "push-mail",
} as const;
export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

export const PGBOSS_SCHEMA = "pgboss";

// pg-boss's own retries only cover a worker that died or threw unexpectedly;
// fleet errors are retried by the worker with its own backoff (see worker.ts).
const queueOptions: Record<QueueName, Omit<PgBoss.Queue, "name">> = {
  [QUEUES.pushTarget]: { retryLimit: 20, retryDelay: 2, retryBackoff: true, expireInSeconds: 300 },
  [QUEUES.firmware]: { retryLimit: 20, retryDelay: 2, retryBackoff: true, expireInSeconds: 300 },
  [QUEUES.pushMail]: { retryLimit: 8, retryDelay: 5, retryBackoff: true, expireInSeconds: 120 },
};

export interface JobRequest {
  queue: QueueName;
  data: Record<string, unknown>;
  /** Not before this moment. */
  startAfter?: Date;
  /** A fixed id makes the insert idempotent (pg-boss ignores a second job with the same id). */
  id?: string;
}

export interface BossOptions {
  /** Expire jobs of dead workers and archive old ones (worker processes do this). */
  supervise: boolean;
  /** Connections pg-boss keeps for itself. */
  max: number;
}

/** A started pg-boss with every queue created. Workers make their own; app code uses getBoss(). */
export async function createBoss(options: BossOptions): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: env().DATABASE_URL,
    schema: PGBOSS_SCHEMA,
    max: options.max,
    application_name: "zonewright-queue",
    migrate: true,
    supervise: options.supervise,
    schedule: false,
    maintenanceIntervalSeconds: 30,
    archiveCompletedAfterSeconds: 3600,
  });
  boss.on("error", (error) => console.error("[queue]", error.message));
  await boss.start();
  // createQueue is idempotent; send() into a queue that does not exist silently does nothing.
  for (const [name, queueOpts] of Object.entries(queueOptions)) await boss.createQueue(name, { name, ...queueOpts });
  return boss;
}

const holder = ((globalThis as unknown as { __zonewrightBoss?: { boss: Promise<PgBoss> | null } }).__zonewrightBoss ??= { boss: null });

/** The process's sending pg-boss (no polling, no maintenance), started on first use. */
export function getBoss(): Promise<PgBoss> {
  if (!holder.boss) {
    holder.boss = createBoss({ supervise: false, max: 2 }).catch((error: unknown) => {
      holder.boss = null;
      throw error;
    });
  }
  return holder.boss;
}

/** Stops the process's pg-boss (tests and graceful shutdown). */
export async function stopBoss(options: { graceful?: boolean } = {}) {
  const pending = holder.boss;
  holder.boss = null;
  if (!pending) return;
  const boss = await pending.catch(() => null);
  await boss?.stop({ graceful: options.graceful ?? true, close: true, wait: true, timeout: 5000 });
}

function toInsert(job: JobRequest): PgBoss.JobInsert {
  return {
    ...(job.id ? { id: job.id } : {}),
    name: job.queue,
    data: job.data,
    ...(job.startAfter ? { startAfter: job.startAfter.toISOString() } : {}),
  };
}

const perConnection = new WeakMap<PoolClient, ReturnType<typeof drizzle<typeof schema, PoolClient>>>();

/**
 * A transaction whose jobs are inserted in it too: `fn` adds to `jobs`, and they
 * are written on the same connection just before COMMIT.
 */
export async function withJobs<T>(fn: (tx: Transaction, jobs: JobRequest[]) => Promise<T>): Promise<T> {
  const boss = await getBoss();
  const client = await pool.connect();
  try {
    // Building drizzle's relational config costs milliseconds: once per pooled connection, not per transaction.
    let clientDb = perConnection.get(client);
    if (!clientDb) {
      clientDb = drizzle(client, { schema, casing: "snake_case" });
      perConnection.set(client, clientDb);
    }
    return await clientDb.transaction(async (tx) => {
      const jobs: JobRequest[] = [];
      const result = await fn(tx as unknown as Transaction, jobs);
      // json_to_recordset in one statement per chunk: thousands of targets stay one round trip each.
      for (let i = 0; i < jobs.length; i += 2000) {
        await boss.insert(jobs.slice(i, i + 2000).map(toInsert), {
          db: { executeSql: (text: string, values: unknown[]) => client.query(text, values) },
        });
      }
      return result;
    });
  } finally {
    client.release();
  }
}
