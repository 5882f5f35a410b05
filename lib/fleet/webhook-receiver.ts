import "server-only";
import { ingestFleetEvent } from "@/db/queries/devices";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { WEBHOOK_SIGNATURE_HEADER, WEBHOOK_TIMESTAMP_HEADER, fleetWebhookEventSchema } from "@/lib/fleet/api-schema";
import { verifyWebhook } from "@/lib/fleet/webhook-signature";

// The fleet's webhook, as a plain Request → Response function (the route in
// app/api/fleet/webhook wraps it; the push benchmark serves it directly). Not
// behind a session: the signature over the raw body is the authentication.
// Idempotent (eventId) and ordered per device (sequence), so redeliveries,
// duplicates and late events are safe to acknowledge; any non-2xx makes the
// fleet deliver again.

const MAX_BODY_BYTES = 1_000_000;

function errorJson(error: AppError): Response {
  return Response.json(error.toJSON(), { status: error.status });
}

export async function receiveFleetWebhook(request: Request): Promise<Response> {
  try {
    const rawBody = await request.text();
    if (rawBody.length > MAX_BODY_BYTES) throw new AppError("request:too-large");
    const verdict = verifyWebhook({
      secret: env().FLEET_WEBHOOK_SECRET,
      timestampHeader: request.headers.get(WEBHOOK_TIMESTAMP_HEADER),
      signatureHeader: request.headers.get(WEBHOOK_SIGNATURE_HEADER),
      rawBody,
    });
    if (!verdict.ok) throw new AppError("webhook:unsigned", { details: { reason: verdict.reason } });
    let json: unknown;
    try {
      json = JSON.parse(rawBody);
    } catch {
      throw new AppError("webhook:invalid", { message: "The webhook body is not JSON." });
    }
    const parsed = fleetWebhookEventSchema.safeParse(json);
    if (!parsed.success) {
      throw new AppError("webhook:invalid", {
        details: { issues: parsed.error.issues.slice(0, 5).map((i) => `${i.path.join(".") || "(root)"}: ${i.message}`) },
      });
    }
    const result = await ingestFleetEvent(parsed.data);
    return Response.json({ ok: true, eventId: parsed.data.eventId, outcome: result.outcome, settled: result.settledPushes });
  } catch (error) {
    if (error instanceof AppError) return errorJson(error);
    console.error("[fleet webhook] unexpected error", error);
    return errorJson(new AppError("server:unexpected"));
  }
}
