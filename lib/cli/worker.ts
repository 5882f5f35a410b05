// `tsx lib/cli/worker.ts` (started by `npm start` and the browser tests): the push
// worker as its own process. Run several for more throughput; they share the
// queue in PostgreSQL. SIGTERM/SIGINT finish the work in flight, then exit.
//
// Run it with the react-server condition so the data-access modules' `server-only`
// marker resolves to its empty export:
//   node --conditions=react-server --import tsx lib/cli/worker.ts
import { z } from "zod";

const workerEnvSchema = z.object({
  PUSH_CONCURRENCY: z.coerce.number().int().min(1).max(1000).default(20),
  PUSH_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(50).default(6),
  PUSH_RETRY_BASE_MS: z.coerce.number().int().min(10).default(1000),
  PUSH_RETRY_MAX_MS: z.coerce.number().int().min(100).default(60_000),
  PUSH_ATTEMPT_TIMEOUT_MS: z.coerce.number().int().min(100).default(10_000),
  PUSH_LEASE_MS: z.coerce.number().int().min(1000).default(60_000),
  PUSH_REPORT_TIMEOUT_MS: z.coerce.number().int().min(1000).default(10 * 60_000),
  PUSH_REPORT_CHECK_MS: z.coerce.number().int().min(500).default(30_000),
  PUSH_POLL_MS: z.coerce.number().int().min(50).default(500),
  PUSH_SWEEP_MS: z.coerce.number().int().min(200).default(5000),
  FIRMWARE_GRACE_MS: z.coerce.number().int().min(0).default(10 * 60_000),
});

async function main() {
  const present = Object.fromEntries(Object.entries(process.env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = workerEnvSchema.safeParse(present);
  if (!parsed.success) throw new Error(`Invalid worker environment:\n${z.prettifyError(parsed.error)}`);
  const cfg = parsed.data;
  // Enough connections for every target in flight to write its result without queueing for one.
  process.env.DATABASE_POOL_MAX ??= String(Math.min(50, Math.ceil(cfg.PUSH_CONCURRENCY / 2) + 4));

  const [{ env }, { createFleetClient }, { startPushWorker }, { pool }] = await Promise.all([
    import("@/lib/env"),
    import("@/lib/fleet/client"),
    import("@/lib/fleet/worker"),
    import("@/db/client"),
  ]);
  const fleet = createFleetClient({
    baseUrl: env().FLEET_BASE_URL,
    apiKey: env().FLEET_API_KEY,
    timeoutMs: cfg.PUSH_ATTEMPT_TIMEOUT_MS,
    // Short waits inside a call; longer Retry-After and backoff go back to the queue.
    maxRetries: 1,
    maxRetryAfterMs: 2000,
  });
  const worker = await startPushWorker({
    fleet,
    concurrency: cfg.PUSH_CONCURRENCY,
    pollIntervalMs: cfg.PUSH_POLL_MS,
    leaseMs: cfg.PUSH_LEASE_MS,
    reportTimeoutMs: cfg.PUSH_REPORT_TIMEOUT_MS,
    reportCheckIntervalMs: cfg.PUSH_REPORT_CHECK_MS,
    firmwareGraceMs: cfg.FIRMWARE_GRACE_MS,
    sweepIntervalMs: cfg.PUSH_SWEEP_MS,
    retry: { maxAttempts: cfg.PUSH_MAX_ATTEMPTS, baseDelayMs: cfg.PUSH_RETRY_BASE_MS, maxDelayMs: cfg.PUSH_RETRY_MAX_MS },
  });

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[${worker.name}] ${signal}: finishing the work in flight…`);
    worker
      .stop()
      .then(() => pool.end())
      .then(
        () => process.exit(0),
        (error: unknown) => {
          console.error(`[${worker.name}] stop failed:`, error);
          process.exit(1);
        },
      );
  };
  process.once("SIGTERM", () => stop("SIGTERM"));
  process.once("SIGINT", () => stop("SIGINT"));
}

main().catch((error: Error) => {
  console.error(`The push worker could not start: ${error.message}`);
  process.exit(1);
});
