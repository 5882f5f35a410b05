// `npm start`: PostgreSQL on loopback, migrations, demo data once, the local
// fakes of hosted services, a production build when needed, and the app.
import { startLocalPostgres, demoCluster } from "@/db/local-postgres";
import { runMigrations } from "@/db/migrate";
import { seedDemo } from "@/db/seed";
import { demoPassword } from "@/db/seed-data";
import { buildIsStale, buildNext, stopChildren } from "./processes";
import { demoPorts, serviceEnv, startApp, startFakes, startWorker } from "./services";

async function main() {
  const dev = process.argv.includes("--dev");
  console.log("Zonewright: starting PostgreSQL…");
  const pgInfo = await startLocalPostgres(demoCluster);
  const shutdown = (code: number) => {
    stopChildren();
    pgInfo.stop();
    process.exit(code);
  };
  process.on("SIGINT", () => shutdown(0));
  process.on("SIGTERM", () => shutdown(0));

  await runMigrations(pgInfo.url);
  const seed = await seedDemo(pgInfo.url);
  const env = serviceEnv(demoPorts, pgInfo.url, "local");

  if (!dev && buildIsStale()) {
    console.log("Zonewright: building the app (first start or sources changed)…");
    const code = await buildNext(env);
    if (code !== 0) {
      console.error("The build failed; see above.");
      shutdown(code);
    }
  }

  await startFakes(demoPorts, env);
  startWorker(env);
  await startApp(demoPorts, env, dev ? "dev" : "production");

  console.log(`
  Zonewright is running on http://localhost:${demoPorts.app}
  ${seed.seeded ? "Demo data was loaded into the new database." : "Using the existing demo database (.data/pg)."}

  Demo sign-ins (password “${demoPassword}”):
${seed.signIns.map((s) => `    ${s.email.padEnd(28)} ${s.role.padEnd(11)} ${s.company}`).join("\n")}

  Local fakes: fleet API http://127.0.0.1:${demoPorts.fleet} · station directory http://127.0.0.1:${demoPorts.stations}
  Mail sink: SMTP 127.0.0.1:${demoPorts.smtp}, messages at http://localhost:${demoPorts.app}/mailbox (or http://127.0.0.1:${demoPorts.smtpHttp}/messages)
  Push worker: running (more: node --conditions=react-server --import tsx lib/cli/worker.ts)
  Press Ctrl+C to stop everything (PostgreSQL included).
`);
}

main().catch((error: Error) => {
  console.error(`Zonewright could not start: ${error.message}`);
  stopChildren();
  process.exit(1);
});
