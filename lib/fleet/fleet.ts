import { createFleetClient, type FleetClient } from "@/lib/fleet/client";
import { env } from "@/lib/env";

// The fleet client the app servers use for interactive calls (device page,
// log bundles). Short timeouts: a person is waiting. The push worker builds its
// own client with its own timeouts and retries (lib/fleet/worker.ts).

const holder = globalThis as unknown as { __zonewrightFleet?: FleetClient };

export function appFleetClient(): FleetClient {
  holder.__zonewrightFleet ??= createFleetClient({
    baseUrl: env().FLEET_BASE_URL,
    apiKey: env().FLEET_API_KEY,
    timeoutMs: 8000,
    maxRetries: 1,
    maxRetryAfterMs: 2000,
  });
  return holder.__zonewrightFleet;
}
