import type { PushTargetState } from "@/db/schema/pushes";
import type { ReportStatus } from "@/lib/fleet/api-schema";
import { FleetError } from "@/lib/fleet/client";

// Pure rules of a push target's life: queued → sending → awaiting_report →
// applied | failed (with the reason) | superseded; queued → cancelled. The worker
// and the webhook apply them with compare-and-set updates; these functions only decide.

export const terminalTargetStates: readonly PushTargetState[] = ["applied", "failed", "superseded", "cancelled"];
export const activeTargetStates: readonly PushTargetState[] = ["queued", "sending", "awaiting_report"];

export function isTerminal(state: PushTargetState): boolean {
  return terminalTargetStates.includes(state);
}

export const targetStateLabels: Record<PushTargetState, string> = {
  queued: "Queued",
  sending: "Sending",
  awaiting_report: "Awaiting report",
  applied: "Applied",
  failed: "Failed",
  superseded: "Superseded",
  cancelled: "Cancelled",
};

// ── Idempotency keys ────────────────────────────────────────────────────────
// The key is zone revision + device, so however often a send is retried (or a
// restarted worker sends again) the fleet stores that revision for that device
// once. Pushing the same revision again on purpose (push again after drift, a
// rollback to a revision the device had before, retrying a target the device
// itself refused) needs a new desired version, so those get a generation suffix:
// `${revisionId}:${deviceId}`, then `${revisionId}:${deviceId}:2`, `:3`, …

export function idempotencyKey(revisionId: string, deviceId: string, generation = 1): string {
  return generation <= 1 ? `${revisionId}:${deviceId}` : `${revisionId}:${deviceId}:${generation}`;
}

export function keyGeneration(key: string): number {
  const parts = key.split(":");
  const last = Number(parts[2]);
  return parts.length >= 3 && Number.isInteger(last) && last > 1 ? last : 1;
}

/** The next generation after every key already used for this revision and device. */
export function nextGeneration(usedKeys: string[]): number {
  return usedKeys.length === 0 ? 1 : Math.max(...usedKeys.map(keyGeneration)) + 1;
}

// ── Reports ─────────────────────────────────────────────────────────────────

export interface ReportFacts {
  /** The desired version the device's reported state answers. */
  reportedVersion: number;
  status: ReportStatus | null;
  error: string | null;
}

export type Resolution =
  | { state: "applied" }
  | { state: "failed"; reason: string }
  | { state: "superseded"; reason: string };

/**
 * What a report means for a target that sent desired version `sentVersion`.
 * The device applies only its newest desired version, so a report for a higher
 * version means ours was overtaken and will never be reported: superseded.
 */
export function resolveFromReport(sentVersion: number, report: ReportFacts): Resolution | null {
  if (report.reportedVersion < sentVersion || report.status === null) return null;
  if (report.reportedVersion > sentVersion) {
    return { state: "superseded", reason: `A newer desired version (v${report.reportedVersion}) reached the device first.` };
  }
  switch (report.status) {
    case "applied":
      return { state: "applied" };
    case "partial":
      return { state: "failed", reason: `The device applied only part of the configuration: ${report.error ?? "no detail given"}.` };
    case "rejected":
      return { state: "failed", reason: `The device refused the configuration: ${report.error ?? "no detail given"}.` };
  }
}

// ── Retries ─────────────────────────────────────────────────────────────────

export interface RetryPolicy {
  /** Send attempts per target before it fails (the first one included). */
  maxAttempts: number;
  baseDelayMs: number;
  maxDelayMs: number;
}

export const defaultRetryPolicy: RetryPolicy = { maxAttempts: 6, baseDelayMs: 1000, maxDelayMs: 60_000 };

/**
 * Delay before send attempt `attempt + 1` after attempt `attempt` (1-based) failed.
 * Without Retry-After: exponential backoff with "equal jitter" — half the capped
 * exponential step plus a random part of the other half — so retries of many
 * targets spread out but never come back at once (common practice, no source;
 * the variants are described in M. Brooker, "Exponential Backoff And Jitter",
 * AWS Architecture Blog, 2015 — recalled from memory). With Retry-After: never
 * earlier than the fleet asked, plus up to 10 % (at most 1 s) so targets told the
 * same wait do not all return in the same instant.
 */
export function retryDelayMs(
  attempt: number,
  retryAfterMs: number | null,
  policy: Pick<RetryPolicy, "baseDelayMs" | "maxDelayMs"> = defaultRetryPolicy,
  random: () => number = Math.random,
): number {
  if (retryAfterMs !== null && retryAfterMs >= 0) {
    return Math.ceil(retryAfterMs + random() * Math.min(1000, retryAfterMs * 0.1));
  }
  const step = Math.min(policy.maxDelayMs, policy.baseDelayMs * 2 ** Math.max(0, attempt - 1));
  return Math.ceil(step / 2 + random() * (step / 2));
}

export type FailureDecision =
  | { kind: "retry"; reason: string; retryAfterMs: number | null }
  | { kind: "fail"; reason: string }
  | { kind: "conflict"; currentVersion: number | null; reason: string };

/**
 * What to do after a send failed. Timeouts, 5xx, 429 and answers that break the
 * contract are retried: the Idempotency-Key makes a repeat harmless even when the
 * first request did land and only its answer was lost. Refusals are final.
 */
export function decideOnFailure(error: unknown): FailureDecision {
  if (!(error instanceof FleetError)) {
    return { kind: "retry", reason: `Unexpected error: ${error instanceof Error ? error.message : String(error)}`, retryAfterMs: null };
  }
  switch (error.code) {
    case "fleet:timeout":
    case "fleet:unavailable":
      return { kind: "retry", reason: error.message, retryAfterMs: error.retryAfterMs };
    case "fleet:rate-limited":
      return {
        kind: "retry",
        reason: `The fleet asked us to slow down${error.retryAfterMs === null ? "" : ` (Retry-After ${Math.ceil(error.retryAfterMs / 1000)} s)`}.`,
        retryAfterMs: error.retryAfterMs,
      };
    case "fleet:bad-response":
      return { kind: "retry", reason: error.message, retryAfterMs: null };
    case "fleet:conflict":
      return { kind: "conflict", currentVersion: error.currentVersion, reason: error.message };
    case "fleet:unsupported":
      return { kind: "fail", reason: `The fleet says the device cannot take this configuration: ${error.reasons.join("; ")}.` };
    case "fleet:not-found":
      return { kind: "fail", reason: "The fleet does not know this device (was it removed from the fleet?)." };
    case "fleet:unauthorized":
      return { kind: "fail", reason: "The fleet refused our API key; check FLEET_API_KEY." };
    case "fleet:bad-request":
      return { kind: "fail", reason: error.message };
  }
}
