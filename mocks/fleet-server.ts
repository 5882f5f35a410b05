import { createServer as createHttpServer, type RequestListener, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import { createServer as createMswServer } from "@mswjs/http-middleware";
import { z } from "zod";
import { createFleetHandlers } from "./fleet/handlers";
import { createFleetStore, type FleetSimulationConfig, type FleetStore } from "./fleet/store";

// The local fleet fake as a real HTTP server: the same msw handlers the unit tests
// use, served by @mswjs/http-middleware. `npm start`/`npm run dev` and Playwright run it.

const fleetFakeEnvSchema = z.object({
  FLEET_FAKE_PORT: z.coerce.number().int().min(0).max(65535).default(4010),
  FLEET_WEBHOOK_URL: z.url().default("http://127.0.0.1:3000/api/fleet/webhook"),
  FLEET_WEBHOOK_SECRET: z.string().min(1).default("dev-fleet-webhook-secret"),
  FLEET_API_KEY: z.string().min(1).default("dev-fleet-api-key"),
  FLEET_APPLY_DELAY_MS: z.coerce.number().int().min(0).default(1500),
});

// Empty strings count as unset so `FLEET_FAKE_PORT= npm start` keeps the default.
function readFleetFakeEnv(env: Record<string, string | undefined> = process.env) {
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = fleetFakeEnvSchema.safeParse(present);
  if (!parsed.success) throw new Error(`Invalid fleet fake environment:\n${z.prettifyError(parsed.error)}`);
  return parsed.data;
}

export interface StartFleetServerOptions {
  /** 0 picks a free port. Defaults to FLEET_FAKE_PORT or 4010. */
  port?: number;
  host?: string;
  webhookUrl?: string;
  webhookSecret?: string;
  apiKey?: string;
  applyDelayMs?: number;
  /** Bring your own store to drive or inspect it from a test. */
  store?: FleetStore;
  deliver?: FleetSimulationConfig["deliver"];
}

export interface RunningFleetServer {
  url: string;
  port: number;
  store: FleetStore;
  close(): Promise<void>;
}

export async function startFleetServer(opts: StartFleetServerOptions = {}): Promise<RunningFleetServer> {
  const env = readFleetFakeEnv();
  const host = opts.host ?? "127.0.0.1";
  const store = opts.store ?? createFleetStore();
  const handlers = createFleetHandlers({
    store,
    webhookUrl: opts.webhookUrl ?? env.FLEET_WEBHOOK_URL,
    webhookSecret: opts.webhookSecret ?? env.FLEET_WEBHOOK_SECRET,
    apiKey: opts.apiKey ?? env.FLEET_API_KEY,
    applyDelayMs: opts.applyDelayMs ?? env.FLEET_APPLY_DELAY_MS,
    fetch: opts.deliver,
  });
  // The middleware's express app is a plain request listener; @types/express is not installed.
  const app = createMswServer(...handlers) as unknown as RequestListener;
  const server: Server = createHttpServer(app);
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port ?? env.FLEET_FAKE_PORT, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://${host}:${port}`,
    port,
    store,
    close: () =>
      new Promise<void>((resolve, reject) => {
        store.dispose();
        server.close((err) => (err ? reject(err) : resolve()));
        // Hung requests (timeout fault) and keep-alive sockets would hold close() open.
        server.closeAllConnections();
      }),
  };
}

const isMain = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  const env = readFleetFakeEnv();
  startFleetServer().then(
    (running) => {
      const count = running.store.listDevices(undefined, 1000)?.devices.length ?? 0;
      console.log(
        `[fleet fake] ${running.url}  webhooks → ${env.FLEET_WEBHOOK_URL}  apply delay ${env.FLEET_APPLY_DELAY_MS} ms  (${count} devices)`,
      );
      const stop = () => {
        running.close().then(
          () => process.exit(0),
          () => process.exit(1),
        );
      };
      process.once("SIGINT", stop);
      process.once("SIGTERM", stop);
    },
    (error: unknown) => {
      console.error("[fleet fake] could not start:", error);
      process.exit(1);
    },
  );
}
