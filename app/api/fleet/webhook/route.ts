import { receiveFleetWebhook } from "@/lib/fleet/webhook-receiver";

// POST from the device fleet: signed events about what devices report
// (see lib/fleet/webhook-receiver.ts). Authenticated by signature, not by session.
export const dynamic = "force-dynamic";

export const POST = (request: Request) => receiveFleetWebhook(request);
