// `npm test`: its own PostgreSQL cluster on loopback (never the demo one), fresh
// databases, vitest (unit, component, integration) and Playwright against the
// production build in Debian's Chromium. Ends with a plain pass/fail summary.
import fs from "node:fs";
import path from "node:path";
import { startLocalPostgres, testCluster } from "@/db/local-postgres";
import { runMigrations } from "@/db/migrate";
import { resetAndSeed } from "@/db/reset";
import { seedDemo } from "@/db/seed";
import { bin, buildNext, ensureDebianPackages, root, runStep, stopChildren } from "./processes";
import { serviceEnv, startApp, startFakes, startWorker, testPorts } from "./services";

interface Tally {
  passed: number;
  failed: number;
  skipped: number;
}

function readVitest(file: string): Tally | null {
  if (!fs.existsSync(file)) return null;
  const r = JSON.parse(fs.readFileSync(file, "utf8")) as { numPassedTests: number; numFailedTests: number; numPendingTests: number; numTodoTests: number };
  return { passed: r.numPassedTests, failed: r.numFailedTests, skipped: r.numPendingTests + r.numTodoTests };
}

function readPlaywright(file: string): Tally | null {
  if (!fs.existsSync(file)) return null;
  const r = JSON.parse(fs.readFileSync(file, "utf8")) as { stats: { expected: number; unexpected: number; flaky: number; skipped: number } };
  return { passed: r.stats.expected + r.stats.flaky, failed: r.stats.unexpected, skipped: r.stats.skipped };
}

async function main() {
  const only = process.argv.slice(2).find((a) => a.startsWith("--only="))?.slice(7);
  const out = path.join(root, ".data", `test-results${process.env.ZW_TEST_INSTANCE ? `-${process.env.ZW_TEST_INSTANCE}` : ""}`);
  fs.rmSync(out, { recursive: true, force: true });
  fs.mkdirSync(out, { recursive: true });

  ensureDebianPackages([
    { command: "chromium", pkg: "chromium" },
    { command: "ffmpeg", pkg: "ffmpeg" },
  ]);

  process.env.ZW_PG_FAST = "1";
  console.log("Tests: starting the test PostgreSQL cluster…");
  // ZW_TEST_INSTANCE=N: own databases and ports on the shared test cluster,
  // which is then left running for the other instances.
  const instance = process.env.ZW_TEST_INSTANCE;
  const suffix = instance ? `_${instance}` : "";
  const integrationDb = await startLocalPostgres({ ...testCluster, database: `zonewright_test${suffix}`, reset: true });
  const e2eDb = await startLocalPostgres({ ...testCluster, database: `zonewright_e2e${suffix}`, reset: true, log: () => {} });
  const cleanup = () => {
    stopChildren();
    if (!instance) integrationDb.stop();
  };
  process.on("SIGINT", () => {
    cleanup();
    process.exit(130);
  });

  await runMigrations(integrationDb.url);
  await runMigrations(e2eDb.url);
  await seedDemo(e2eDb.url);

  const results: Record<string, Tally | null> = {};
  let failedSteps: string[] = [];

  if (!only || only === "vitest") {
    const vitestJson = path.join(out, "vitest.json");
    const filters = process.argv.slice(2).filter((a) => !a.startsWith("--"));
    const code = await runStep(bin("vitest"), ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${vitestJson}`, ...filters], {
      ...serviceEnv(testPorts, integrationDb.url, "test"),
      NODE_ENV: "test",
    });
    results.vitest = readVitest(vitestJson);
    if (code !== 0) failedSteps.push("vitest");
  }

  if (!only || only === "e2e") {
    const env = { ...serviceEnv(testPorts, e2eDb.url, "test") };
    console.log("Tests: building the app for the browser tests…");
    const buildCode = await buildNext({ ...env, NEXT_TELEMETRY_DISABLED: "1" });
    if (buildCode !== 0) {
      failedSteps.push("build");
    } else {
      await startFakes(testPorts, env, true);
      startWorker(env, true);
      await startApp(testPorts, env, "production", true);
      // Each spec file starts from a freshly seeded database and a reset fleet
      // fake, so no spec depends on what an earlier one changed.
      const filters = process.argv.slice(2).filter((a) => !a.startsWith("--"));
      const specs = fs
        .readdirSync(path.join(root, "tests", "e2e"))
        .filter((f) => f.endsWith(".spec.ts"))
        .map((f) => `tests/e2e/${f}`)
        .filter((f) => filters.length === 0 || filters.some((flt) => f.includes(flt)))
        .sort();
      const tally: Tally = { passed: 0, failed: 0, skipped: 0 };
      let ran = 0;
      for (const spec of specs) {
        await resetAndSeed(e2eDb.url);
        await fetch(`http://127.0.0.1:${testPorts.fleet}/__fleet/reset`, { method: "POST" }).catch(() => undefined);
        const pwJson = path.join(out, `playwright-${path.basename(spec, ".spec.ts")}.json`);
        const code = await runStep(bin("playwright"), ["test", "--reporter=list,json", spec], {
          ...env,
          PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson,
          E2E_BASE_URL: `http://localhost:${testPorts.app}`,
        });
        const result = readPlaywright(pwJson);
        if (result) {
          ran++;
          tally.passed += result.passed;
          tally.failed += result.failed;
          tally.skipped += result.skipped;
        }
        if (code !== 0) failedSteps.push("playwright");
      }
      results.playwright = ran > 0 ? tally : null;
      stopChildren();
    }
  }

  cleanup();

  const total: Tally = { passed: 0, failed: 0, skipped: 0 };
  console.log("\n──────── Zonewright test summary ────────");
  for (const [name, tally] of Object.entries(results)) {
    if (!tally) {
      console.log(`${name.padEnd(11)} no results (the runner did not finish)`);
      continue;
    }
    total.passed += tally.passed;
    total.failed += tally.failed;
    total.skipped += tally.skipped;
    console.log(`${name.padEnd(11)} ${tally.passed} passed, ${tally.failed} failed, ${tally.skipped} skipped`);
  }
  failedSteps = [...new Set(failedSteps)];
  if (failedSteps.length) console.log(`failed steps: ${failedSteps.join(", ")}`);
  console.log(`${total.passed} passed, ${total.failed} failed, ${total.skipped} skipped`);
  process.exit(failedSteps.length > 0 || total.failed > 0 || total.passed === 0 ? 1 : 0);
}

main().catch((error: Error) => {
  console.error(`Tests could not run: ${error.stack ?? error.message}`);
  stopChildren();
  process.exit(1);
});
