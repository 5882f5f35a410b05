import { describe, expect, it } from "vitest";
import { FleetError } from "@/lib/fleet/client";
import { decideOnFailure, idempotencyKey, keyGeneration, nextGeneration, resolveFromReport, retryDelayMs } from "@/lib/fleet/push-state";

describe("resolveFromReport (fleet contract, lib/fleet/api-schema.ts: reportedVersion answers a desired version; the device applies only the newest)", () => {
  it("waits while the device reports an older version", () => {
    expect(resolveFromReport(5, { reportedVersion: 4, status: "applied", error: null })).toBeNull();
  });
  it("applied when the report answers our version with 'applied'", () => {
    expect(resolveFromReport(5, { reportedVersion: 5, status: "applied", error: null })).toEqual({ state: "applied" });
  });
  it("failed with the device's words for 'partial' and 'rejected'", () => {
    expect(resolveFromReport(5, { reportedVersion: 5, status: "partial", error: "stored 4 of 8 presets" })).toEqual({
      state: "failed",
      reason: "The device applied only part of the configuration: stored 4 of 8 presets.",
    });
    expect(resolveFromReport(5, { reportedVersion: 5, status: "rejected", error: "DSP busy" })).toEqual({
      state: "failed",
      reason: "The device refused the configuration: DSP busy.",
    });
  });
  it("superseded when a higher version was reported (ours will never be)", () => {
    expect(resolveFromReport(5, { reportedVersion: 6, status: "applied", error: null })?.state).toBe("superseded");
  });
  it("nothing to conclude from a state without a status (no apply yet)", () => {
    expect(resolveFromReport(0, { reportedVersion: 0, status: null, error: null })).toBeNull();
  });
});

describe("idempotency keys (revision + device, a generation only for a deliberate re-send)", () => {
  it("first key is revision:device, then :2, :3 …", () => {
    expect(idempotencyKey("r", "d")).toBe("r:d");
    expect(idempotencyKey("r", "d", 2)).toBe("r:d:2");
    expect(nextGeneration([])).toBe(1);
    expect(nextGeneration(["r:d"])).toBe(2);
    expect(nextGeneration(["r:d", "r:d:3"])).toBe(4);
    expect(keyGeneration("r:d")).toBe(1);
    expect(keyGeneration("r:d:7")).toBe(7);
  });
});

describe("retryDelayMs", () => {
  const policy = { baseDelayMs: 1000, maxDelayMs: 60_000 };
  it("never earlier than Retry-After, at most 10 % (≤ 1 s) later (RFC 9110 §10.2.3: the client ought to wait)", () => {
    expect(retryDelayMs(1, 5000, policy, () => 0)).toBe(5000);
    expect(retryDelayMs(1, 5000, policy, () => 0.999)).toBe(5000 + Math.ceil(0.999 * 500));
    expect(retryDelayMs(1, 30_000, policy, () => 1)).toBe(31_000);
    expect(retryDelayMs(3, 0, policy, () => 0.5)).toBe(0);
  });
  it("exponential backoff with equal jitter: in [step/2, step], step = base·2^(attempt−1) capped (common practice, no source)", () => {
    expect(retryDelayMs(1, null, policy, () => 0)).toBe(500);
    expect(retryDelayMs(1, null, policy, () => 1)).toBe(1000);
    expect(retryDelayMs(3, null, policy, () => 0)).toBe(2000);
    expect(retryDelayMs(3, null, policy, () => 1)).toBe(4000);
    expect(retryDelayMs(20, null, policy, () => 1)).toBe(60_000);
    expect(retryDelayMs(20, null, policy, () => 0)).toBe(30_000);
  });
  it("spreads a crowd: 1,000 targets told to retry at attempt 4 do not all come back in the same 100 ms", () => {
    let seed = 42;
    const random = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    const delays = Array.from({ length: 1000 }, () => retryDelayMs(4, null, policy, random));
    const buckets = new Set(delays.map((d) => Math.floor(d / 100)));
    expect(buckets.size).toBeGreaterThan(30);
    expect(Math.min(...delays)).toBeGreaterThanOrEqual(4000);
    expect(Math.max(...delays)).toBeLessThanOrEqual(8000);
  });
});

describe("decideOnFailure", () => {
  const err = (init: ConstructorParameters<typeof FleetError>[0]) => new FleetError(init);
  it("retries timeouts, 5xx, 429 (keeping Retry-After) and broken answers", () => {
    expect(decideOnFailure(err({ code: "fleet:timeout", message: "t" })).kind).toBe("retry");
    expect(decideOnFailure(err({ code: "fleet:unavailable", message: "503" })).kind).toBe("retry");
    expect(decideOnFailure(err({ code: "fleet:bad-response", message: "x" })).kind).toBe("retry");
    expect(decideOnFailure(err({ code: "fleet:rate-limited", message: "429", retryAfterMs: 12_000 }))).toMatchObject({
      kind: "retry",
      retryAfterMs: 12_000,
      reason: "The fleet asked us to slow down (Retry-After 12 s).",
    });
  });
  it("fails at once on refusals, with a reason a person can act on", () => {
    expect(decideOnFailure(err({ code: "fleet:unsupported", message: "u", reasons: ["7 presets, 6 slots"] }))).toEqual({
      kind: "fail",
      reason: "The fleet says the device cannot take this configuration: 7 presets, 6 slots.",
    });
    expect(decideOnFailure(err({ code: "fleet:unauthorized", message: "401" })).kind).toBe("fail");
    expect(decideOnFailure(err({ code: "fleet:not-found", message: "404" })).kind).toBe("fail");
  });
  it("hands a version conflict back with the fleet's current version", () => {
    expect(decideOnFailure(err({ code: "fleet:conflict", message: "409", currentVersion: 7 }))).toMatchObject({ kind: "conflict", currentVersion: 7 });
  });
});
