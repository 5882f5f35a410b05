/**
 * Push benchmark:
 *   node --conditions=react-server --import tsx tests/bench/push.ts [--sizes=100,1000,5000] [--latency=100] [--concurrency=100]
 *
 * For each size N: a fresh database on the test cluster (`zonewright_bench`),
 * synthetic data (one company, N/5 homes of 5 zones, N devices, all zones made
 * from one template), the local fleet fake over real HTTP with `latency` ms
 * added to every API call and the same delay before a device applies, our
 * webhook route behind a small HTTP server (the app's part), and the push
 * worker as its own process (lib/cli/worker.ts, as `npm start` runs it). It
 * starts one push of every zone made from the template and waits until every
 * target is final. Prints per size: time to start the push (preview, targets
 * and jobs in one transaction), time until all applied, throughput, and the
 * worker's peak resident memory (VmHWM from /proc) next to its memory before
 * the push. Prints figures only; it asserts nothing about speed.
 *
 * Target (issue 6): 1,000 zones at 100 ms per call all applied in under 15 s on
 * a 2-core machine, with the worker's memory flat as N grows.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { cpus, loadavg, totalmem } from "node:os";
import path from "node:path";
import { performance } from "node:perf_hooks";
import { startLocalPostgres, testCluster } from "../../db/local-postgres";
import { runMigrations } from "../../db/migrate";

const root = path.resolve(import.meta.dirname, "../..");
const arg = (name: string, fallback: string) => process.argv.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3) ?? fallback;
const sizes = arg("sizes", "100,1000,5000").split(",").map(Number).filter((n) => n > 0);
const latencyMs = Number(arg("latency", "100"));
const concurrency = Number(arg("concurrency", "100"));
const apiKey = "bench-fleet-key";
const webhookSecret = "bench-webhook-secret-0123456789";

function procStatus(pid: number): { rssKb: number; hwmKb: number } | null {
  try {
    const text = readFileSync(`/proc/${pid}/status`, "utf8");
    const kb = (key: string) => Number(new RegExp(`^${key}:\\s+(\\d+) kB`, "m").exec(text)?.[1] ?? NaN);
    return { rssKb: kb("VmRSS"), hwmKb: kb("VmHWM") };
  } catch {
    return null;
  }
}

const mb = (kb: number) => `${(kb / 1024).toFixed(0)} MB`;

interface Row {
  n: number;
  startMs: number;
  totalMs: number;
  applied: number;
  failed: number;
  other: number;
  throughput: number;
  idleRssKb: number;
  peakRssKb: number;
  appPeakRssKb: number;
  workerJobs: string;
  phases: string;
  fake: string;
  rssByProgressKb: (number | null)[];
}

async function runSize(n: number): Promise<Row> {
  const suffix = process.env.ZW_TEST_INSTANCE ? `_${process.env.ZW_TEST_INSTANCE}` : "";
  const pgInfo = await startLocalPostgres({ ...testCluster, database: `zonewright_bench${suffix}`, reset: true, log: () => {} });
  await runMigrations(pgInfo.url);

  // The app's modules read the environment once: set it before importing them.
  process.env.DATABASE_URL = pgInfo.url;
  process.env.DATABASE_POOL_MAX = "24";
  process.env.FLEET_API_KEY = apiKey;
  process.env.FLEET_WEBHOOK_SECRET = webhookSecret;
  process.env.ZW_ENV = "test";

  const [{ db, pool }, schema, { modelProfiles: profiles }, { buildZoneConfig }, { contentHash }, { startPush }, { loadActor }, { receiveFleetWebhook: webhook }, { stopBoss }] =
    await Promise.all([
      import("../../db/client"),
      import("../../db/schema"),
      import("../../lib/devices/model-profiles"),
      import("../../lib/zones/build-config"),
      import("../../lib/zones/content-hash"),
      import("../../lib/fleet/push-service"),
      import("../../db/queries/actors"),
      import("../../lib/fleet/webhook-receiver"),
      import("../../lib/fleet/queue"),
    ]);

  // ── synthetic data ────────────────────────────────────────────────────────
  const orgId = randomUUID();
  const userId = randomUUID();
  await db.insert(schema.modelProfiles).values(profiles).onConflictDoNothing();
  await db.insert(schema.organization).values({ id: orgId, name: "Bench Audio (synthetic)", slug: `bench-${orgId.slice(0, 8)}` });
  await db.insert(schema.user).values({ id: userId, name: "Bench Integrator", email: `bench-${orgId.slice(0, 8)}@bench.example`, emailVerified: true });
  await db.insert(schema.member).values({ id: randomUUID(), organizationId: orgId, userId, role: "integrator" });
  const [template] = await db
    .insert(schema.zoneTemplates)
    .values({ organizationId: orgId, name: "Bench two-channel zone", config: {} as never, createdBy: userId })
    .returning({ id: schema.zoneTemplates.id });

  const homeCount = Math.ceil(n / 5);
  const homeIds: string[] = [];
  for (let i = 0; i < homeCount; i += 1000) {
    const rows = await db
      .insert(schema.homes)
      .values(Array.from({ length: Math.min(1000, homeCount - i) }, (_, k) => ({ organizationId: orgId, name: `Bench home ${i + k + 1}`, householdName: `Household ${i + k + 1}` })))
      .returning({ id: schema.homes.id });
    homeIds.push(...rows.map((r) => r.id));
  }
  const fleetDevices = Array.from({ length: n }, (_, i) => ({
    fleetDeviceId: `bench-${String(i + 1).padStart(5, "0")}`,
    modelProfileId: "amp-2x60",
    serial: `BN-${String(i + 1).padStart(5, "0")}`,
    firmwareVersion: "3.4.2",
    online: true,
  }));
  const deviceIds: string[] = [];
  for (let i = 0; i < n; i += 1000) {
    const rows = await db
      .insert(schema.devices)
      .values(
        fleetDevices.slice(i, i + 1000).map((d, k) => ({
          organizationId: orgId,
          homeId: homeIds[Math.floor((i + k) / 5)],
          modelProfileId: d.modelProfileId,
          fleetDeviceId: d.fleetDeviceId,
          serial: d.serial,
          firmwareVersion: d.firmwareVersion,
        })),
      )
      .returning({ id: schema.devices.id });
    deviceIds.push(...rows.map((r) => r.id));
  }
  const curve = {
    id: null,
    name: "Bench room",
    bands: [
      { type: "lowshelf" as const, frequencyHz: 120, gainDb: 2, q: 0.7, enabled: true },
      { type: "peaking" as const, frequencyHz: 2500, gainDb: -1.5, q: 1.2, enabled: true },
    ],
  };
  for (let i = 0; i < n; i += 1000) {
    const chunk = Array.from({ length: Math.min(1000, n - i) }, (_, k) => i + k);
    const zoneRows = await db
      .insert(schema.zones)
      .values(
        chunk.map((j) => ({
          organizationId: orgId,
          homeId: homeIds[Math.floor(j / 5)],
          deviceId: deviceIds[j],
          name: `Zone ${(j % 5) + 1}`,
          position: j % 5,
          deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
          outputLayout: { crossover: null, outputs: [] },
          templateId: template.id,
          templateVersion: 1,
        })),
      )
      .returning({ id: schema.zones.id, name: schema.zones.name });
    const revisions = zoneRows.map((z, k) => {
      const config = buildZoneConfig({
        zone: {
          name: z.name,
          volumeCeiling: 60 + ((i + k) % 20),
          turnOnVolume: 25,
          guestVolume: true,
          guestSource: true,
          guestWake: true,
          guestLocked: false,
          toneCurveId: null,
          deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: false, cecVolume: false, trigger12v: false },
          outputLayout: { crossover: null, outputs: [] },
        },
        sources: [
          { id: `s1-${z.id}`, position: 0, label: "TV", kind: "optical", enabled: true, loudnessOffsetDb: -3, subsonic: false, toneCurveId: null },
          { id: `s2-${z.id}`, position: 1, label: "Turntable", kind: "analog", enabled: true, loudnessOffsetDb: 2, subsonic: true, toneCurveId: null },
          { id: `s3-${z.id}`, position: 2, label: "Streaming", kind: "network_stream", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurveId: null },
        ],
        presets: Array.from({ length: 6 }, (_, p) => ({
          id: `p${p}-${z.id}`,
          position: p,
          name: `Station ${p + 1}`,
          streamUrl: `https://streams.example.net/bench-${p + 1}.mp3`,
          genre: "Jazz",
          loudnessOffsetDb: 0,
          toneCurveId: null,
        })),
        curves: new Map(),
      });
      const withCurve = { ...config, zoneCurve: curve };
      return { organizationId: orgId, zoneId: z.id, number: 1, contentHash: contentHash(withCurve), config: withCurve, authorId: userId, message: "Synthetic" };
    });
    const revRows = await db.insert(schema.zoneRevisions).values(revisions).returning({ id: schema.zoneRevisions.id, zoneId: schema.zoneRevisions.zoneId });
    await pool.query("update zones z set current_revision_id = v.rev from unnest($1::uuid[], $2::uuid[]) as v(zone, rev) where z.id = v.zone", [
      revRows.map((r) => r.zoneId),
      revRows.map((r) => r.id),
    ]);
  }

  // ── the app's webhook endpoint, the fleet fake, the worker ────────────────
  const webhookServer: Server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", async () => {
      const headers = new Headers();
      for (const [k, v] of Object.entries(req.headers)) if (typeof v === "string") headers.set(k, v);
      const response = await webhook(new Request("http://app.bench/api/fleet/webhook", { method: "POST", headers, body: Buffer.concat(chunks) }));
      res.writeHead(response.status, { "content-type": "application/json" });
      res.end(await response.text());
    });
  });
  await new Promise<void>((resolve) => webhookServer.listen(0, "127.0.0.1", resolve));
  const webhookUrl = `http://127.0.0.1:${(webhookServer.address() as AddressInfo).port}/api/fleet/webhook`;

  const fake = spawn(process.execPath, ["--import", "tsx", "tests/bench/push-fleet.ts", String(n), webhookUrl, String(latencyMs)], {
    cwd: root,
    env: { ...process.env, BENCH_WEBHOOK_SECRET: webhookSecret, BENCH_API_KEY: apiKey },
    stdio: ["ignore", "pipe", "inherit"],
  });
  let fakeOut = "";
  fake.stdout!.on("data", (c: Buffer) => (fakeOut += c.toString()));
  for (let i = 0; i < 300 && !/ready (\S+)/.test(fakeOut); i++) await new Promise((r) => setTimeout(r, 100));
  const fleetUrl = /ready (\S+)/.exec(fakeOut)?.[1];
  if (!fleetUrl) throw new Error(`the fleet fake did not start:\n${fakeOut}`);
  // 100 ms on every API call, as a slow hosted fleet would answer.
  const faults = await fetch(`${fleetUrl}/__fleet/faults`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ latencyMs }) });
  if (!faults.ok) throw new Error(`could not set the fake's latency: ${faults.status}`);
  const fleet = { url: fleetUrl };

  const extraNodeArgs = (process.env.BENCH_WORKER_NODE_ARGS ?? "").split(" ").filter(Boolean);
  const worker: ChildProcess = spawn(process.execPath, [...extraNodeArgs, "--conditions=react-server", "--import", "tsx", "lib/cli/worker.ts"], {
    cwd: root,
    env: {
      ...process.env,
      DATABASE_URL: pgInfo.url,
      DATABASE_POOL_MAX: String(Math.min(40, Math.ceil(concurrency / 3) + 4)),
      FLEET_BASE_URL: fleet.url,
      FLEET_API_KEY: apiKey,
      PUSH_CONCURRENCY: String(concurrency),
      PUSH_POLL_MS: "50",
      PUSH_ATTEMPT_TIMEOUT_MS: "10000",
      PUSH_REPORT_TIMEOUT_MS: "120000",
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let workerLog = "";
  worker.stdout?.on("data", (c: Buffer) => (workerLog += c.toString()));
  worker.stderr?.on("data", (c: Buffer) => (workerLog += c.toString()));
  for (let i = 0; i < 200 && !workerLog.includes("started:"); i++) await new Promise((r) => setTimeout(r, 100));
  if (!workerLog.includes("started:")) throw new Error(`the worker did not start:\n${workerLog}`);
  await new Promise((r) => setTimeout(r, 500));
  const idle = procStatus(worker.pid!)!;

  // ── the push ──────────────────────────────────────────────────────────────
  const actor = (await loadActor({ userId, activeOrganizationId: orgId }))!;
  let appPeak = process.memoryUsage().rss;
  const t0 = performance.now();
  const started = await startPush({ actor, scope: { kind: "template", templateId: template.id } });
  const t1 = performance.now();
  let counts: Record<string, number> = {};
  // The worker's resident memory as the push progresses: flat means it does not grow with the work done.
  const rssAt: (number | null)[] = [null, null, null, null];
  for (;;) {
    appPeak = Math.max(appPeak, process.memoryUsage().rss);
    const { rows } = await pool.query<{ state: string; n: number }>("select state, count(*)::int as n from push_targets where push_id = $1 group by state", [started.pushId]);
    counts = Object.fromEntries(rows.map((r) => [r.state, r.n]));
    const active = (counts.queued ?? 0) + (counts.sending ?? 0) + (counts.awaiting_report ?? 0);
    const doneShare = (started.targetCount - active) / started.targetCount;
    const rss = procStatus(worker.pid!)?.rssKb ?? null;
    for (let q = 0; q < 4; q++) if (rssAt[q] === null && doneShare >= (q + 1) / 4) rssAt[q] = rss;
    if (active === 0) break;
    if (performance.now() - t0 > 600_000) throw new Error(`not finished after 10 min: ${JSON.stringify(counts)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  const t2 = performance.now();
  const peak = procStatus(worker.pid!)!;
  // Where the time went: when the sends and the reports happened, relative to the push's creation.
  const { rows: phases } = await pool.query<{ first_sent: number; last_sent: number; median_report: number; last_report: number; max_attempts: number }>(
    `select extract(epoch from min(t.sent_at) - p.created_at) * 1000 as first_sent,
            extract(epoch from max(t.sent_at) - p.created_at) * 1000 as last_sent,
            extract(epoch from percentile_cont(0.5) within group (order by t.updated_at - t.sent_at)) * 1000 as median_report,
            extract(epoch from max(t.updated_at) - p.created_at) * 1000 as last_report,
            max(t.attempts) as max_attempts
     from push_targets t join pushes p on p.id = t.push_id where p.id = $1 group by p.created_at`,
    [started.pushId],
  );

  await new Promise<void>((resolve) => {
    worker.once("exit", () => resolve());
    worker.kill("SIGTERM");
  });
  await new Promise<void>((resolve) => {
    fake.once("exit", () => resolve());
    fake.kill("SIGTERM");
  });
  const fakeStats = JSON.parse(/stats (.+)/.exec(fakeOut)?.[1] ?? "{}") as { applies?: number; appliedTwice?: number; webhooksGivenUp?: number };
  await new Promise<void>((resolve) => webhookServer.close(() => resolve()));
  await stopBoss();
  await pool.end();

  const applied = counts.applied ?? 0;
  const failed = counts.failed ?? 0;
  return {
    n,
    startMs: t1 - t0,
    totalMs: t2 - t0,
    applied,
    failed,
    other: started.targetCount - applied - failed,
    throughput: started.targetCount / ((t2 - t0) / 1000),
    idleRssKb: idle.rssKb,
    peakRssKb: peak.hwmKb,
    appPeakRssKb: appPeak / 1024,
    workerJobs: /stopped/.test(workerLog) ? "stopped cleanly" : "no clean stop",
    rssByProgressKb: rssAt,
    fake: `fleet fake: ${fakeStats.applies ?? "?"} applies, ${fakeStats.appliedTwice ?? "?"} applied twice, ${fakeStats.webhooksGivenUp ?? "?"} webhooks given up`,
    phases: phases[0]
      ? `sends ${Number(phases[0].first_sent).toFixed(0)}–${Number(phases[0].last_sent).toFixed(0)} ms, report median ${Number(phases[0].median_report).toFixed(0)} ms after its send, last report ${Number(phases[0].last_report).toFixed(0)} ms, most attempts ${phases[0].max_attempts}`
      : "",
  };
}

async function main() {
  const one = process.argv.find((a) => a.startsWith("--one="));
  if (one) {
    // A child run for one size: its own process, so every size starts with fresh modules and pools.
    const row = await runSize(Number(one.slice(6)));
    console.log(`RESULT ${JSON.stringify(row)}`);
    process.exit(0);
  }
  console.log(`Push benchmark: ${sizes.join(", ")} zones · fleet fake with ${latencyMs} ms per call and ${latencyMs} ms apply delay · worker concurrency ${concurrency}`);
  console.log(`Machine: ${cpus().length} cores (${cpus()[0]?.model ?? "?"}), ${(totalmem() / 2 ** 30).toFixed(1)} GB, load ${loadavg().map((l) => l.toFixed(2)).join(" ")}`);
  const rows: Row[] = [];
  for (const n of sizes) {
    const output = await new Promise<string>((resolve, reject) => {
      const child = spawn(process.execPath, [...process.execArgv, import.meta.filename, `--one=${n}`, `--latency=${latencyMs}`, `--concurrency=${concurrency}`], {
        cwd: root,
        env: process.env,
        stdio: ["ignore", "pipe", "inherit"],
      });
      let out = "";
      child.stdout.on("data", (c: Buffer) => (out += c.toString()));
      child.on("exit", (code) => (code === 0 ? resolve(out) : reject(new Error(`size ${n} failed (exit ${code}):\n${out}`))));
    });
    const line = output.split("\n").find((l) => l.startsWith("RESULT "));
    if (!line) throw new Error(`size ${n} printed no result:\n${output}`);
    const row = JSON.parse(line.slice(7)) as Row;
    rows.push(row);
    console.log(
      `  ${String(n).padStart(5)} zones: start ${row.startMs.toFixed(0)} ms, all final after ${(row.totalMs / 1000).toFixed(2)} s (${row.throughput.toFixed(0)} targets/s), ` +
        `${row.applied} applied, ${row.failed} failed, ${row.other} other; worker memory ${mb(row.idleRssKb)} idle → ${mb(row.peakRssKb)} peak; app side peak ${mb(row.appPeakRssKb)}`,
    );
    console.log(`         ${row.phases}`);
    console.log(`         ${row.fake}; worker ${row.workerJobs}`);
    console.log(`         worker RSS when 25 / 50 / 75 / 100 % of targets were final: ${row.rssByProgressKb.map((k) => (k === null ? "?" : mb(k))).join(" / ")}`);
  }
  console.log("\n| zones | start push | all applied | throughput | applied / failed | worker RSS idle | worker RSS at 25/50/75/100 % | worker RSS peak | app side RSS peak |");
  console.log("|---:|---:|---:|---:|---:|---:|---:|---:|---:|");
  for (const r of rows) {
    console.log(
      `| ${r.n} | ${r.startMs.toFixed(0)} ms | ${(r.totalMs / 1000).toFixed(2)} s | ${r.throughput.toFixed(0)}/s | ${r.applied} / ${r.failed} | ${mb(r.idleRssKb)} | ${r.rssByProgressKb
        .map((k) => (k === null ? "?" : (k / 1024).toFixed(0)))
        .join(" / ")} MB | ${mb(r.peakRssKb)} | ${mb(r.appPeakRssKb)} |`,
    );
  }
  process.exit(0);
}

main().catch((error: Error) => {
  console.error(error.stack ?? error.message);
  process.exit(1);
});
