import { createHmac } from "node:crypto";
import { describe, expect, it } from "vitest";
import { hmacSha256Hex, signWebhook, verifyWebhook } from "@/lib/fleet/webhook-signature";

const secret = "whsec-test-7f3a";
const rawBody = JSON.stringify({ eventId: "evt-1", kind: "reported", deviceId: "fd-spare-01" });
const nowMs = 1_750_000_000_000;
const timestamp = Math.floor(nowMs / 1000);

function verify(overrides: Partial<Parameters<typeof verifyWebhook>[0]> = {}) {
  return verifyWebhook({
    secret,
    timestampHeader: String(timestamp),
    signatureHeader: signWebhook(secret, timestamp, rawBody),
    rawBody,
    now: nowMs,
    ...overrides,
  });
}

describe("HMAC-SHA256", () => {
  it("matches RFC 4231 test case 2 (key \"Jefe\")", () => {
    // RFC 4231 §4.3, Test Case 2, HMAC-SHA-256.
    expect(hmacSha256Hex("Jefe", "what do ya want for nothing?")).toBe(
      "5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843",
    );
  });

  it("signs `${timestamp}.${rawBody}` as v1=<hex>", () => {
    // Computed here with node:crypto directly, not through the module under test.
    const expected = createHmac("sha256", secret).update(`${timestamp}.${rawBody}`).digest("hex");
    expect(signWebhook(secret, timestamp, rawBody)).toBe(`v1=${expected}`);
    expect(signWebhook(secret, timestamp, Buffer.from(rawBody))).toBe(`v1=${expected}`);
  });
});

describe("verifyWebhook", () => {
  it("accepts a valid signature", () => {
    expect(verify()).toEqual({ ok: true });
  });

  it("accepts a timestamp just inside the tolerance, both ways", () => {
    expect(verify({ now: nowMs + 300_000 })).toEqual({ ok: true });
    expect(verify({ now: nowMs - 300_000 })).toEqual({ ok: true });
  });

  it("rejects a tampered body", () => {
    expect(verify({ rawBody: rawBody.replace("fd-spare-01", "fd-spare-02") })).toEqual({ ok: false, reason: "mismatch" });
  });

  it("rejects a signature made with another secret", () => {
    expect(verify({ signatureHeader: signWebhook("someone-else", timestamp, rawBody) })).toEqual({
      ok: false,
      reason: "mismatch",
    });
  });

  it("rejects a signature whose timestamp was swapped for a fresh one (replay)", () => {
    const replayed = timestamp + 100;
    expect(verify({ timestampHeader: String(replayed), now: replayed * 1000 })).toEqual({ ok: false, reason: "mismatch" });
  });

  it("rejects a stale timestamp", () => {
    expect(verify({ now: nowMs + 301_000 })).toEqual({ ok: false, reason: "stale" });
  });

  it("rejects a timestamp too far in the future", () => {
    expect(verify({ now: nowMs - 301_000 })).toEqual({ ok: false, reason: "stale" });
  });

  it("honours a custom tolerance", () => {
    expect(verify({ now: nowMs + 61_000, toleranceSeconds: 60 })).toEqual({ ok: false, reason: "stale" });
  });

  it("reports missing headers", () => {
    expect(verify({ signatureHeader: null })).toEqual({ ok: false, reason: "missing" });
    expect(verify({ timestampHeader: undefined })).toEqual({ ok: false, reason: "missing" });
    expect(verify({ signatureHeader: "" })).toEqual({ ok: false, reason: "missing" });
  });

  it("reports malformed headers", () => {
    const hex = signWebhook(secret, timestamp, rawBody).slice(3);
    expect(verify({ signatureHeader: hex })).toEqual({ ok: false, reason: "malformed" });
    expect(verify({ signatureHeader: `v2=${hex}` })).toEqual({ ok: false, reason: "malformed" });
    expect(verify({ signatureHeader: `v1=${hex.slice(2)}` })).toEqual({ ok: false, reason: "malformed" });
    expect(verify({ signatureHeader: `v1=${"z".repeat(64)}` })).toEqual({ ok: false, reason: "malformed" });
    expect(verify({ timestampHeader: "yesterday" })).toEqual({ ok: false, reason: "malformed" });
    expect(verify({ timestampHeader: "1750000000.5" })).toEqual({ ok: false, reason: "malformed" });
  });

  it("accepts any one of several signatures (secret rotation)", () => {
    const header = `${signWebhook("old-secret", timestamp, rawBody)}, ${signWebhook(secret, timestamp, rawBody)}`;
    expect(verify({ signatureHeader: header })).toEqual({ ok: true });
    const bothWrong = `${signWebhook("a", timestamp, rawBody)},${signWebhook("b", timestamp, rawBody)}`;
    expect(verify({ signatureHeader: bothWrong })).toEqual({ ok: false, reason: "mismatch" });
  });
});
