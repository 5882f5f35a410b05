import { createServer as createHttpServer, type RequestListener } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import { createServer as createMswServer } from "@mswjs/http-middleware";
import { z } from "zod";
import { createStationHandlers } from "./stations/handlers";
import { createStationDirectoryState, type StationDirectoryState } from "./stations/state";

// The station directory fake as a real local HTTP server (same handlers as the tests).

const stationsFakeEnvSchema = z.object({
  STATIONS_FAKE_PORT: z.coerce.number().int().min(0).max(65535).default(4020),
  STATIONS_API_KEY: z.string().min(1).optional(),
});

function readStationsFakeEnv(env: Record<string, string | undefined> = process.env) {
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = stationsFakeEnvSchema.safeParse(present);
  if (!parsed.success) throw new Error(`Invalid station directory fake environment:\n${z.prettifyError(parsed.error)}`);
  return parsed.data;
}

export interface StartStationsServerOptions {
  /** 0 picks a free port. Defaults to STATIONS_FAKE_PORT or 4020. */
  port?: number;
  host?: string;
  apiKey?: string;
  state?: StationDirectoryState;
}

export interface RunningStationsServer {
  url: string;
  port: number;
  state: StationDirectoryState;
  close(): Promise<void>;
}

export async function startStationsServer(opts: StartStationsServerOptions = {}): Promise<RunningStationsServer> {
  const env = readStationsFakeEnv();
  const host = opts.host ?? "127.0.0.1";
  const state = opts.state ?? createStationDirectoryState();
  const handlers = createStationHandlers({ state, apiKey: opts.apiKey ?? env.STATIONS_API_KEY });
  const server = createHttpServer(createMswServer(...handlers) as unknown as RequestListener);
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port ?? env.STATIONS_FAKE_PORT, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://${host}:${port}`,
    port,
    state,
    close: () =>
      new Promise<void>((resolve, reject) => {
        state.dispose();
        server.close((err) => (err ? reject(err) : resolve()));
        server.closeAllConnections();
      }),
  };
}

const isMain = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  startStationsServer().then(
    (running) => {
      console.log(`[station directory fake] ${running.url}  (${running.state.stations.length} stations)`);
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
      console.error("[station directory fake] could not start:", error);
      process.exit(1);
    },
  );
}
