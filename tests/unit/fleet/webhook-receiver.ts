import { fleetWebhookEventSchema, type FleetWebhookEvent } from "@/lib/fleet/api-schema";
import { verifyWebhook } from "@/lib/fleet/webhook-signature";

export interface ReceivedWebhook {
  event: FleetWebhookEvent;
  rawBody: string;
  timestampHeader: string | null;
  signatureHeader: string | null;
}

/**
 * Stands in for our app's webhook route inside one process: verifies the signature
 * and the body the way the route will, and records what arrived, in order.
 * `failNext` makes it answer 5xx (or refuse the connection) to exercise the fake's retries.
 */
export function createWebhookReceiver(secret: string, now: () => number = Date.now) {
  const received: ReceivedWebhook[] = [];
  const refused: string[] = [];
  let failures: ("503" | "refuse")[] = [];

  async function deliver(url: string, init: RequestInit): Promise<Response> {
    const request = new Request(url, init);
    const next = failures.shift();
    if (next === "refuse") throw new TypeError("fetch failed: connect ECONNREFUSED");
    if (next === "503") return new Response("busy", { status: 503 });
    const rawBody = await request.text();
    const timestampHeader = request.headers.get("x-fleet-timestamp");
    const signatureHeader = request.headers.get("x-fleet-signature");
    const verdict = verifyWebhook({ secret, timestampHeader, signatureHeader, rawBody, now: now() });
    if (!verdict.ok) {
      refused.push(verdict.reason);
      return Response.json({ error: verdict.reason }, { status: 401 });
    }
    const parsed = fleetWebhookEventSchema.safeParse(JSON.parse(rawBody));
    if (!parsed.success) {
      refused.push("invalid-body");
      return Response.json({ error: "invalid_body" }, { status: 400 });
    }
    received.push({ event: parsed.data, rawBody, timestampHeader, signatureHeader });
    return new Response(null, { status: 204 });
  }

  return {
    deliver,
    received,
    refused,
    failNext(...next: ("503" | "refuse")[]) {
      failures = next;
    },
    reset() {
      received.length = 0;
      refused.length = 0;
      failures = [];
    },
  };
}
