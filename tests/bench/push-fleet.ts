/**
 * The fleet fake for the push benchmark, in its own process as `npm start` runs
 * it: N synthetic devices (bench-00001…), served over HTTP by the same msw
 * handlers as mocks/fleet-server.ts. Run by tests/bench/push.ts:
 *   tsx tests/bench/push-fleet.ts <devices> <webhookUrl> <applyDelayMs>
 * Prints "ready <url>" once it listens; SIGTERM stops it.
 */
import { startFleetServer } from "../../mocks/fleet-server";
import { createFleetStore } from "../../mocks/fleet/store";

async function main() {
  const [count, webhookUrl, applyDelay] = process.argv.slice(2);
  const n = Number(count);
  const devices = Array.from({ length: n }, (_, i) => ({
    fleetDeviceId: `bench-${String(i + 1).padStart(5, "0")}`,
    modelProfileId: "amp-2x60",
    serial: `BN-${String(i + 1).padStart(5, "0")}`,
    firmwareVersion: "3.4.2",
    online: true,
  }));
  const store = createFleetStore({ devices, applyDelayMs: Number(applyDelay), webhookTimeoutMs: 30_000 });
  const server = await startFleetServer({
    port: 0,
    store,
    webhookUrl,
    webhookSecret: process.env.BENCH_WEBHOOK_SECRET!,
    apiKey: process.env.BENCH_API_KEY!,
    applyDelayMs: Number(applyDelay),
  });
  console.log(`ready ${server.url}`);
  process.once("SIGTERM", () => {
    const applies = store.snapshot().applies;
    const twice = applies.length - new Set(applies.map((a) => `${a.deviceId}|${a.idempotencyKey}`)).size;
    const gaveUp = store.deliveries().filter((d) => d.outcome === "gave-up").length;
    console.log(`stats ${JSON.stringify({ applies: applies.length, appliedTwice: twice, webhooksGivenUp: gaveUp })}`);
    void server.close().then(() => process.exit(0));
  });
}

main().catch((error: Error) => {
  console.error(error.stack ?? error.message);
  process.exit(1);
});
