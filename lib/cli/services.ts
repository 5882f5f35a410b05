// The local fakes of hosted services, plus the app itself, as child processes.
import { bin, startChild, waitForHttp, type ChildEnv } from "./processes";

export interface LocalServicePorts {
  app: number;
  fleet: number;
  stations: number;
  smtp: number;
  smtpHttp: number;
}

export const demoPorts: LocalServicePorts = { app: 3000, fleet: 4010, stations: 4020, smtp: 2525, smtpHttp: 2526 };
// ZW_TEST_INSTANCE=N shifts every port so several suites can run side by side.
const instance = Number(process.env.ZW_TEST_INSTANCE ?? 0);
export const testPorts: LocalServicePorts = {
  app: 3100 + instance * 10,
  fleet: 4110 + instance * 10,
  stations: 4610 + instance * 10,
  smtp: 2625 + instance * 10,
  smtpHttp: 2626 + instance * 10,
};

export function serviceEnv(ports: LocalServicePorts, databaseUrl: string, zwEnv: "local" | "test"): ChildEnv {
  const appUrl = `http://localhost:${ports.app}`;
  return {
    ZW_ENV: zwEnv,
    DATABASE_URL: databaseUrl,
    APP_URL: appUrl,
    BETTER_AUTH_URL: appUrl,
    FLEET_BASE_URL: `http://127.0.0.1:${ports.fleet}`,
    FLEET_FAKE_PORT: String(ports.fleet),
    FLEET_WEBHOOK_URL: `http://127.0.0.1:${ports.app}/api/fleet/webhook`,
    STATIONS_BASE_URL: `http://127.0.0.1:${ports.stations}`,
    STATIONS_FAKE_PORT: String(ports.stations),
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(ports.smtp),
    SMTP_SINK_PORT: String(ports.smtp),
    SMTP_SINK_HTTP_PORT: String(ports.smtpHttp),
  };
}

/** Start the fakes (fleet, station directory, SMTP sink) and wait until they answer. */
export async function startFakes(ports: LocalServicePorts, env: ChildEnv, quiet = false) {
  startChild("fleet", bin("tsx"), ["mocks/fleet-server.ts"], env, quiet);
  startChild("stations", bin("tsx"), ["mocks/stations-server.ts"], env, quiet);
  startChild("mail", bin("tsx"), ["mocks/smtp-sink.ts"], env, quiet);
  await Promise.all([
    waitForHttp(`http://127.0.0.1:${ports.fleet}/__fleet/state`, 30_000, () => true),
    waitForHttp(`http://127.0.0.1:${ports.stations}/v1/stations?q=a`, 30_000, () => true),
    waitForHttp(`http://127.0.0.1:${ports.smtpHttp}/messages`, 30_000, () => true),
  ]);
}

export async function startApp(ports: LocalServicePorts, env: ChildEnv, mode: "production" | "dev", quiet = false) {
  const args = mode === "dev" ? ["dev", "-p", String(ports.app)] : ["start", "-p", String(ports.app)];
  startChild("app", bin("next"), args, env, quiet);
  await waitForHttp(`http://127.0.0.1:${ports.app}/sign-in`, 120_000, (s) => s === 200);
}

/** The push worker as its own process (see lib/cli/worker.ts); more can run side by side. */
export function startWorker(env: ChildEnv, quiet = false) {
  // The react-server condition makes the data-access modules' `server-only` marker an empty module.
  startChild("worker", process.execPath, ["--conditions=react-server", "--import", "tsx", "lib/cli/worker.ts"], env, quiet);
}
