import { createHmac, timingSafeEqual } from "node:crypto";

// Fleet webhooks are signed as
//   x-fleet-timestamp: <unix seconds>
//   x-fleet-signature: v1=<hex HMAC-SHA256(secret, `${timestamp}.${rawBody}`)>
// The timestamp is inside the MAC so a captured request cannot be replayed later
// than the tolerance. Several comma-separated v1 values are accepted so the sender
// can sign with an old and a new secret while a secret is rotated.

export const WEBHOOK_SIGNATURE_SCHEME = "v1";
export const DEFAULT_WEBHOOK_TOLERANCE_SECONDS = 300;

type RawBody = string | Uint8Array;

export function hmacSha256Hex(key: string | Uint8Array, data: RawBody): string {
  return createHmac("sha256", key).update(data).digest("hex");
}

function signedPayload(timestamp: number | string, rawBody: RawBody): Buffer {
  const body = typeof rawBody === "string" ? Buffer.from(rawBody, "utf8") : Buffer.from(rawBody);
  return Buffer.concat([Buffer.from(`${timestamp}.`, "utf8"), body]);
}

/** The x-fleet-signature header value for one body at one timestamp. */
export function signWebhook(secret: string, timestamp: number, rawBody: RawBody): string {
  return `${WEBHOOK_SIGNATURE_SCHEME}=${hmacSha256Hex(secret, signedPayload(timestamp, rawBody))}`;
}

export type VerifyWebhookResult =
  | { ok: true }
  | { ok: false; reason: "missing" | "malformed" | "stale" | "mismatch" };

export interface VerifyWebhookInput {
  secret: string;
  timestampHeader: string | null | undefined;
  signatureHeader: string | null | undefined;
  /** The body exactly as received: re-serialised JSON would not match. */
  rawBody: RawBody;
  /** Current time (Date or epoch milliseconds); defaults to the system clock. */
  now?: Date | number;
  toleranceSeconds?: number;
}

const TIMESTAMP_PATTERN = /^\d{1,12}$/;
const SIGNATURE_PATTERN = /^v1=([0-9a-f]{64})$/;

export function verifyWebhook(input: VerifyWebhookInput): VerifyWebhookResult {
  const { secret, timestampHeader, signatureHeader, rawBody } = input;
  const toleranceSeconds = input.toleranceSeconds ?? DEFAULT_WEBHOOK_TOLERANCE_SECONDS;
  const timestampText = timestampHeader?.trim();
  const signatureText = signatureHeader?.trim();
  if (!timestampText || !signatureText) return { ok: false, reason: "missing" };

  if (!TIMESTAMP_PATTERN.test(timestampText)) return { ok: false, reason: "malformed" };
  const candidates: Buffer[] = [];
  for (const part of signatureText.split(",")) {
    const match = SIGNATURE_PATTERN.exec(part.trim().toLowerCase());
    if (!match) return { ok: false, reason: "malformed" };
    candidates.push(Buffer.from(match[1], "hex"));
  }

  const nowMs = input.now === undefined ? Date.now() : typeof input.now === "number" ? input.now : input.now.getTime();
  const timestamp = Number(timestampText);
  // Both directions: a timestamp far in the future is as suspicious as an old one.
  if (Math.abs(Math.floor(nowMs / 1000) - timestamp) > toleranceSeconds) return { ok: false, reason: "stale" };

  const expected = createHmac("sha256", secret).update(signedPayload(timestampText, rawBody)).digest();
  // Compare every candidate (no early exit) so timing reveals nothing about which one matched.
  let matched = false;
  for (const candidate of candidates) {
    // timingSafeEqual throws on unequal lengths; the pattern fixes 32 bytes, the check keeps it safe anyway.
    if (candidate.length === expected.length && timingSafeEqual(candidate, expected)) matched = true;
  }
  return matched ? { ok: true } : { ok: false, reason: "mismatch" };
}
