// Zone-board benchmark: `npx tsx tests/bench/board-api.ts [--no-build] [--duration=10] [--keep] [--no-browser] [--profile] [--only=board]`
//
// Seeds a synthetic company into its own database on the test cluster (2,000
// homes with 5 zones each, plus one home of 12 zones × 40 cards), builds and
// starts the production app, signs in, and measures with autocannon at 20
// concurrent connections:
//   - GET /api/health                     (no session, no database: the floor)
//   - GET /api/homes (2,000 homes)        (by name, and sorted by zone count)
//   - GET /api/homes/:id/board            (12 zones × 40 cards)
//   - the same board revalidated with If-None-Match (304, what SWR's refresh costs)
// It prints p50/p95/p99 latency, requests per second and the CPU time the app
// and PostgreSQL spent per request for each, and checks the
// targets: board p95 < 50 ms and within 3× the floor's p95. Then (unless
// --no-browser) it opens that board in Chromium and reports how long it takes
// to show, the long tasks while it loads, and the frame gaps while a preset is
// dragged down and up its column.
// Synthetic data is generated here; it is not the demo scenario.
import { spawnSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { chromium } from "@playwright/test";
import autocannon from "autocannon";
import { hashPassword } from "better-auth/crypto";
import pg from "pg";
import { startLocalPostgres, testCluster } from "@/db/local-postgres";
import { runMigrations } from "@/db/migrate";
import { buildNext, root, startChild, stopChildren, waitForHttp } from "@/lib/cli/processes";
import { serviceEnv, startApp, testPorts } from "@/lib/cli/services";
import { modelProfiles } from "@/lib/devices/model-profiles";
import { defaultDeviceSettings } from "@/lib/validation/zone-config";

const args = process.argv.slice(2);
const flag = (name: string) => args.includes(`--${name}`);
const option = (name: string, fallback: number) => {
  const found = args.find((a) => a.startsWith(`--${name}=`));
  return found ? Number(found.split("=")[1]) : fallback;
};

const CONNECTIONS = 20;
const DURATION_S = option("duration", 10);
const HOMES = 2000;
const ZONES_PER_HOME = 5;
const BIG_ZONES = 12;
const BIG_SOURCES = 20;
const BIG_PRESETS = 20;
const PASSWORD = "bench-password-not-secret";
const EMAIL = "bench.integrator@bench.invalid";
const distDir = process.env.NEXT_DIST_DIR ?? ".next-bench";

async function seed(url: string) {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    await client.query("begin");
    for (const p of modelProfiles) {
      await client.query(
        `insert into model_profiles (id, name, preset_slots, eq_bands, inputs, subwoofer_outputs, has_line_out, latest_firmware)
         values ($1, $2, $3, $4, $5, $6, $7, $8) on conflict do nothing`,
        [p.id, p.name, p.presetSlots, p.eqBands, JSON.stringify(p.inputs), p.subwooferOutputs, p.hasLineOut, p.latestFirmware],
      );
    }
    const orgId = randomUUID();
    const userId = randomUUID();
    await client.query("insert into organization (id, name, slug, created_at) values ($1, 'Bench Integrations', 'bench-integrations', now())", [orgId]);
    await client.query(
      "insert into \"user\" (id, name, email, email_verified, created_at, updated_at) values ($1, 'Bench Integrator', $2, true, now(), now())",
      [userId, EMAIL],
    );
    await client.query(
      "insert into account (id, account_id, provider_id, user_id, password, created_at, updated_at) values ($1, $2, 'credential', $2, $3, now(), now())",
      [randomUUID(), userId, await hashPassword(PASSWORD)],
    );
    await client.query("insert into member (id, organization_id, user_id, role, created_at) values ($1, $2, $3, 'integrator', now())", [randomUUID(), orgId, userId]);

    // Twelve library curves of three bands each.
    await client.query(
      `insert into tone_curves (organization_id, name, description)
       select $1, 'Bench curve ' || lpad(g::text, 2, '0'), 'synthetic' from generate_series(1, 12) g`,
      [orgId],
    );
    await client.query(
      `insert into tone_curve_bands (curve_id, position, type, frequency_hz, gain_db, q, enabled)
       select c.id, b.pos, b.type, b.freq, b.gain, 0.9, true
       from tone_curves c cross join (values (0, 'lowshelf', 100.0, 2.0), (1, 'peaking', 1000.0, -1.5), (2, 'highshelf', 8000.0, 1.0)) as b(pos, type, freq, gain)
       where c.organization_id = $1`,
      [orgId],
    );

    // 2,000 homes × 5 zones (10,000 zones), each with a device, 2 sources and 2 presets.
    await client.query(
      `insert into homes (organization_id, name, household_name, city, service_plan)
       select $1, 'Bench home ' || lpad(g::text, 4, '0'), 'Household ' || g, 'City ' || (g % 37), (array['essential','standard','priority'])[1 + g % 3]
       from generate_series(1, $2::int) g`,
      [orgId, HOMES],
    );
    await client.query(
      `insert into devices (organization_id, home_id, model_profile_id, fleet_device_id, serial, firmware_version, online, last_report_at)
       select h.organization_id, h.id, 'amp-2x60', 'bench-' || h.id || '-' || z, 'BN-' || h.id || '-' || z, '3.4.2', (z <> 3 or right(h.id::text, 1) < 'e'), now() - interval '5 minutes'
       from homes h cross join generate_series(1, $2::int) z where h.organization_id = $1`,
      [orgId, ZONES_PER_HOME],
    );
    await client.query(
      `insert into zones (organization_id, home_id, device_id, name, position, volume_ceiling, turn_on_volume, device_settings, output_layout)
       select d.organization_id, d.home_id, d.id, 'Zone ' || split_part(d.fleet_device_id, '-', 7), split_part(d.fleet_device_id, '-', 7)::int, 70, 25, $2::jsonb, '{"crossover":null,"outputs":[]}'::jsonb
       from devices d where d.organization_id = $1`,
      [orgId, JSON.stringify(defaultDeviceSettings)],
    );
    await client.query(
      `insert into sources (zone_id, position, label, kind, loudness_offset_db)
       select z.id, s, 'Input ' || s, (array['network_stream','analog'])[s + 1], 0 from zones z cross join generate_series(0, 1) s where z.organization_id = $1`,
      [orgId],
    );
    await client.query(
      `insert into stream_presets (zone_id, position, name, stream_url, genre)
       select z.id, s, 'Station ' || s, 'https://stream.example.net/bench-' || s, 'ambient' from zones z cross join generate_series(0, 1) s where z.organization_id = $1`,
      [orgId],
    );

    // The big home: 12 zones × (20 sources + 20 presets), curves on every third card.
    const { rows: [big] } = await client.query<{ id: string }>(
      "insert into homes (organization_id, name, household_name, city) values ($1, 'Bench big home', 'Big household', 'Bench City') returning id",
      [orgId],
    );
    await client.query(
      `insert into devices (organization_id, home_id, model_profile_id, fleet_device_id, serial, firmware_version, online, last_report_at)
       select $1, $2, 'amp-4x100-sub', 'bench-big-' || z, 'BB-' || z, '5.1.0', true, now() from generate_series(1, $3::int) z`,
      [orgId, big.id, BIG_ZONES],
    );
    await client.query(
      `insert into zones (organization_id, home_id, device_id, name, position, volume_ceiling, turn_on_volume, device_settings, output_layout,
                          guest_locked, locked_by, locked_at, lock_reason)
       select d.organization_id, d.home_id, d.id, 'Big zone ' || substr(d.fleet_device_id, 11), substr(d.fleet_device_id, 11)::int, 85, 25, $2::jsonb,
              '{"crossover":null,"outputs":[]}'::jsonb,
              substr(d.fleet_device_id, 11)::int % 4 = 0, case when substr(d.fleet_device_id, 11)::int % 4 = 0 then $3 end,
              case when substr(d.fleet_device_id, 11)::int % 4 = 0 then now() end, case when substr(d.fleet_device_id, 11)::int % 4 = 0 then 'bench lock' end
       from devices d where d.home_id = $1`,
      [big.id, JSON.stringify(defaultDeviceSettings), userId],
    );
    await client.query(
      `insert into sources (zone_id, position, label, kind, loudness_offset_db, tone_curve_id)
       select z.id, s, 'Big input ' || s, (array['analog','optical','coaxial','hdmi_arc','usb','network_stream','bluetooth'])[1 + s % 7], (s % 7 - 3) * 0.5,
              case when s % 3 = 0 then (select id from tone_curves where organization_id = $1 order by name offset (s % 12) limit 1) end
       from zones z cross join generate_series(0, $3::int - 1) s where z.home_id = $2`,
      [orgId, big.id, BIG_SOURCES],
    );
    await client.query(
      `insert into stream_presets (zone_id, position, name, stream_url, genre, loudness_offset_db, tone_curve_id)
       select z.id, s, 'Big station ' || s, 'https://stream.example.net/big-' || s, 'jazz', (s % 5 - 2) * 0.5,
              case when s % 3 = 1 then (select id from tone_curves where organization_id = $1 order by name offset (s % 12) limit 1) end
       from zones z cross join generate_series(0, $3::int - 1) s where z.home_id = $2`,
      [orgId, big.id, BIG_PRESETS],
    );
    await client.query("commit");
    await client.query("analyze");
    const { rows: counts } = await client.query<{ homes: number; zones: number; cards: number }>(
      `select (select count(*)::int from homes) homes, (select count(*)::int from zones) zones,
              (select count(*)::int from sources) + (select count(*)::int from stream_presets) cards`,
    );
    return { bigHomeId: big.id, ...counts[0] };
  } finally {
    await client.end();
  }
}

async function signIn(base: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in/email`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: base },
    body: JSON.stringify({ email: EMAIL, password: PASSWORD }),
  });
  if (!res.ok) throw new Error(`sign-in failed: ${res.status} ${await res.text()}`);
  return res.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
}

/** The board page in Chromium: load, long tasks, and frames during a pointer drag. */
async function browserFigures(base: string, cookie: string, homeId: string) {
  const browser = await chromium.launch({
    executablePath: "/usr/bin/chromium",
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking"],
  });
  try {
    const context = await browser.newContext({ viewport: { width: 1600, height: 1000 } });
    await context.addCookies(
      cookie.split("; ").map((pair) => {
        const i = pair.indexOf("=");
        return { name: pair.slice(0, i), value: pair.slice(i + 1), url: base };
      }),
    );
    // Scripts for the page are strings: tsx would add helpers to functions that the page does not have.
    await context.addInitScript({
      content: `window.__long = [];
        new PerformanceObserver((list) => list.getEntries().forEach((e) => window.__long.push(e.duration))).observe({ type: "longtask", buffered: true });`,
    });
    const page = await context.newPage();
    const started = Date.now();
    await page.goto(`${base}/homes/${homeId}`);
    await page.getByTestId("zone-board").waitFor();
    // Interactive: the first drag handle answers focus (hydrated).
    await page.getByRole("button", { name: /^Drag preset / }).first().focus();
    const shown = Date.now() - started;
    const cards = (await page.getByTestId("source-card").count()) + (await page.getByTestId("preset-card").count());
    const loadLong = (await page.evaluate("window.__long.splice(0)")) as number[];

    const first = page.getByTestId("preset-card").first();
    // Card about 300 px from the top: below the sticky curve tray, 500 px of room below.
    await first.evaluate("(el) => { el.scrollIntoView({ block: 'start' }); window.scrollBy(0, -300); }");
    await page.waitForTimeout(200);
    const box = (await first.boundingBox())!;
    await page.evaluate(`(() => {
      window.__frames = [];
      window.__stop = false;
      let last = performance.now();
      const tick = (t) => {
        window.__frames.push(t - last);
        last = t;
        if (!window.__stop) requestAnimationFrame(tick);
      };
      requestAnimationFrame(tick);
    })()`);
    // Main-thread work (CPU time of tasks, so less sensitive to a busy machine than frame gaps).
    const cdp = await context.newCDPSession(page);
    await cdp.send("Performance.enable");
    const metrics = async () =>
      Object.fromEntries(((await cdp.send("Performance.getMetrics")) as { metrics: { name: string; value: number }[] }).metrics.map((m) => [m.name, m.value]));
    const x = box.x + 40;
    const y = box.y + box.height / 2;
    const before = await metrics();
    await page.mouse.move(x, y);
    await page.mouse.down();
    await page.mouse.move(x + 10, y + 10, { steps: 5 });
    const picked = ((await page.locator('[id^="DndLiveRegion"]').textContent()) ?? "").startsWith("Picked up");
    if (!picked) throw new Error("the drag did not start; the figures would be meaningless");
    // Down and up within the viewport (auto-scroll near the edges is another matter).
    await page.mouse.move(x + 10, y + 500, { steps: 120 });
    await page.mouse.move(x + 10, y, { steps: 120 });
    await page.keyboard.press("Escape");
    await page.mouse.up();
    const after = await metrics();
    const taskMs = (after.TaskDuration - before.TaskDuration) * 1000;
    const scriptMs = (after.ScriptDuration - before.ScriptDuration) * 1000;
    const pointerMoves = 5 + 120 + 120;
    const frames = (await page.evaluate(`(() => {
      window.__stop = true;
      return { frames: window.__frames.slice(1), long: window.__long.splice(0) };
    })()`)) as { frames: number[]; long: number[] };
    const gaps = [...frames.frames].sort((a, b) => a - b);
    return {
      cards,
      shownMs: shown,
      loadLongTasks: loadLong.length,
      loadLongestMs: Math.max(0, ...loadLong),
      dragFrames: gaps.length,
      dragP95FrameMs: percentile(gaps, 95),
      dragMaxFrameMs: gaps.at(-1) ?? Number.NaN,
      dragLongTasks: frames.long.length,
      dragTaskMsPerMove: taskMs / pointerMoves,
      dragScriptMsPerMove: scriptMs / pointerMoves,
    };
  } finally {
    await browser.close();
  }
}

interface Figures {
  name: string;
  /** CPU time the app process spent per answered request (user + system), less sensitive to a busy machine than latency. */
  cpuMsPerRequest: number;
  /** CPU time PostgreSQL's processes spent per answered request. */
  dbCpuMsPerRequest: number;
  requests: number;
  non2xx: number;
  errors: number;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  bytes: number;
}

function percentile(sorted: number[], p: number) {
  if (sorted.length === 0) return Number.NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i];
}

/** The app's process id, from the socket listening on its port. */
function appPid(port: number): number | null {
  const out = spawnSync("ss", ["-ltnpH", `sport = :${port}`], { encoding: "utf8" }).stdout ?? "";
  const match = /pid=(\d+)/.exec(out);
  return match ? Number(match[1]) : null;
}

/** The PostgreSQL cluster's processes (postmaster and its children: backends, writers). */
function clusterPids(dataDir: string): number[] {
  try {
    const postmaster = Number(fs.readFileSync(path.join(dataDir, "postmaster.pid"), "utf8").split("\n")[0]);
    const children = (spawnSync("pgrep", ["-P", String(postmaster)], { encoding: "utf8" }).stdout ?? "").split("\n").filter(Boolean).map(Number);
    return [postmaster, ...children];
  } catch {
    return [];
  }
}

function cpuMs(pid: number | null): number {
  if (!pid) return Number.NaN;
  try {
    const fields = fs.readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    // utime and stime are fields 14 and 15 of /proc/<pid>/stat, in clock ticks (100 per second on Linux).
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return Number.NaN;
  }
}

async function measure(
  name: string,
  url: string,
  cookie: string | null,
  seconds: number,
  pid: number | null,
  dbPids: () => number[],
  options: { headers?: Record<string, string>; expect?: (status: number) => boolean } = {},
): Promise<Figures> {
  const ok = options.expect ?? ((status: number) => status >= 200 && status < 300);
  const headers: Record<string, string> = { accept: "application/json", ...options.headers };
  if (cookie) headers.cookie = cookie;
  // Warm-up (JIT, pools, caches) without recording.
  await new Promise<void>((resolve, reject) => {
    autocannon({ url, connections: CONNECTIONS, duration: 2, headers }, (err) => (err ? reject(err) : resolve()));
  });
  const latencies: number[] = [];
  let bytes = 0;
  let unexpected = 0;
  const cpuBefore = cpuMs(pid);
  const dbBefore = new Map(dbPids().map((p) => [p, cpuMs(p)]));
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ url, connections: CONNECTIONS, duration: seconds, headers }, (err, res) => (err ? reject(err) : resolve(res)));
    instance.on("response", (_client: unknown, statusCode: number, resBytes: number, responseTime: number) => {
      if (ok(statusCode)) {
        latencies.push(responseTime);
        bytes = resBytes;
      } else unexpected += 1;
    });
  });
  const cpuAfter = cpuMs(pid);
  // Backends that lived through the run (the app's pool keeps its connections).
  let dbMs = 0;
  for (const [p, before] of dbBefore) {
    const after = cpuMs(p);
    if (Number.isFinite(after) && Number.isFinite(before)) dbMs += after - before;
  }
  latencies.sort((a, b) => a - b);
  return {
    name,
    cpuMsPerRequest: (cpuAfter - cpuBefore) / Math.max(1, result.requests.total),
    dbCpuMsPerRequest: dbMs / Math.max(1, result.requests.total),
    requests: result.requests.total,
    non2xx: unexpected,
    errors: result.errors + result.timeouts,
    rps: result.requests.average,
    p50: percentile(latencies, 50),
    p95: percentile(latencies, 95),
    p99: percentile(latencies, 99),
    bytes,
  };
}

function table(rows: Figures[]) {
  const fmt = (n: number) => (Number.isFinite(n) ? n.toFixed(1) : "—");
  console.log(
    `\n${"route".padEnd(34)} ${"p50 ms".padStart(8)} ${"p95 ms".padStart(8)} ${"p99 ms".padStart(8)} ${"req/s".padStart(8)} ${"app CPU/req".padStart(12)} ${"db CPU/req".padStart(11)} ${"size".padStart(9)} ${"failed".padStart(8)}`,
  );
  for (const r of rows) {
    console.log(
      `${r.name.padEnd(34)} ${fmt(r.p50).padStart(8)} ${fmt(r.p95).padStart(8)} ${fmt(r.p99).padStart(8)} ${fmt(r.rps).padStart(8)} ${`${fmt(r.cpuMsPerRequest)} ms`.padStart(12)} ${`${fmt(r.dbCpuMsPerRequest)} ms`.padStart(11)} ${`${(r.bytes / 1024).toFixed(1)} KB`.padStart(9)} ${String(r.non2xx + r.errors).padStart(8)}`,
    );
  }
}

async function main() {
  process.env.ZW_PG_FAST = "1";
  console.log("Bench: starting the test PostgreSQL cluster and a fresh bench database…");
  const database = `zonewright_bench${process.env.ZW_TEST_INSTANCE ? `_${process.env.ZW_TEST_INSTANCE}` : ""}`;
  const db = await startLocalPostgres({ ...testCluster, database, reset: true, log: () => {} });
  await runMigrations(db.url);
  const started = Date.now();
  const data = await seed(db.url);
  console.log(`Bench: seeded ${data.homes} homes, ${data.zones} zones, ${data.cards} cards in ${((Date.now() - started) / 1000).toFixed(1)} s.`);

  const env = { ...serviceEnv(testPorts, db.url, "test"), NEXT_DIST_DIR: distDir, NEXT_TELEMETRY_DISABLED: "1" };
  process.env.NEXT_DIST_DIR = distDir;
  const built = fs.existsSync(path.join(root, distDir, "BUILD_ID"));
  if (!flag("no-build") || !built) {
    console.log(`Bench: building the production app into ${distDir}…`);
    const code = await buildNext(env);
    if (code !== 0) throw new Error("next build failed");
  }
  const base = `http://localhost:${testPorts.app}`;
  console.log(`Bench: starting the production app on ${base}…`);
  // --profile: the app writes a V8 CPU profile when it stops (open it in Chromium's DevTools).
  const profileDir = path.join(root, ".data/profiles");
  if (flag("profile")) {
    startChild("app", process.execPath, [`--cpu-prof`, `--cpu-prof-dir=${profileDir}`, path.join(root, "node_modules/next/dist/bin/next"), "start", "-p", String(testPorts.app)], env, true);
    await waitForHttp(`${base}/sign-in`, 120_000, (s) => s === 200);
  } else {
    await startApp(testPorts, env, "production", true);
  }
  try {
    const cookie = await signIn(base);
    const board = await fetch(`${base}/api/homes/${data.bigHomeId}/board`, { headers: { cookie } });
    const boardJson = (await board.json()) as { zones: { sources: unknown[]; presets: unknown[] }[] };
    const cards = boardJson.zones.reduce((n, z) => n + z.sources.length + z.presets.length, 0);
    console.log(`Bench: board JSON has ${boardJson.zones.length} zones and ${cards} cards.`);
    const homes = await fetch(`${base}/api/homes`, { headers: { cookie } });
    console.log(`Bench: homes list reports ${((await homes.json()) as { total: number }).total} homes.`);

    console.log(`Bench: ${CONNECTIONS} connections, ${DURATION_S} s per route (after a 2 s warm-up)…`);
    const pid = appPid(testPorts.app);
    const dbPids = () => clusterPids(testCluster.dataDir);
    const rows: Figures[] = [];
    // --only=board (with --profile) measures the board alone, for a profile of it and nothing else.
    const onlyBoard = args.includes("--only=board");
    if (!onlyBoard) {
      rows.push(await measure("GET /api/health (floor)", `${base}/api/health`, null, DURATION_S, pid, dbPids));
      rows.push(await measure("GET /api/homes (2,000, by name)", `${base}/api/homes`, cookie, DURATION_S, pid, dbPids));
      rows.push(await measure("GET /api/homes (2,000, by zones)", `${base}/api/homes?sort=zones&dir=desc`, cookie, DURATION_S, pid, dbPids));
    }
    const boardUrl = `${base}/api/homes/${data.bigHomeId}/board`;
    rows.push(await measure("GET board (12 zones × 40 cards)", boardUrl, cookie, DURATION_S, pid, dbPids));
    // What a browser's revalidation of an unchanged board costs (SWR on focus, reload): 304, no body.
    const etag = (await fetch(boardUrl, { headers: { cookie } })).headers.get("etag") ?? "";
    rows.push(
      await measure("GET board, unchanged (304)", boardUrl, cookie, DURATION_S, pid, dbPids, {
        headers: { "if-none-match": etag },
        expect: (status) => status === 304,
      }),
    );
    table(rows);
    if (onlyBoard) return;

    if (!flag("no-browser")) {
      const b = await browserFigures(base, cookie, data.bigHomeId);
      console.log(`\nBoard page in Chromium (${b.cards} cards, production build, 1600×1000):`);
      console.log(`  shown and interactive after ${b.shownMs} ms; ${b.loadLongTasks} long tasks while loading (longest ${b.loadLongestMs.toFixed(0)} ms)`);
      console.log(
        `  pointer drag of a preset across its column: ${b.dragFrames} frames, p95 frame ${b.dragP95FrameMs.toFixed(1)} ms, worst ${b.dragMaxFrameMs.toFixed(1)} ms, ${b.dragLongTasks} long tasks (> 50 ms)`,
      );
      console.log(
        `  main-thread work per pointer move while dragging: ${b.dragTaskMsPerMove.toFixed(1)} ms, of it script ${b.dragScriptMsPerMove.toFixed(1)} ms (a 60 Hz frame is 16.7 ms; software rendering, no GPU)`,
      );
    }

    const floor = rows[0];
    const boardRow = rows[3];
    console.log(`\nTargets (2-core machine, autocannon on the same machine):`);
    console.log(`  board p95 < 50 ms:            ${boardRow.p95.toFixed(1)} ms  ${boardRow.p95 < 50 ? "met" : "NOT met"}`);
    console.log(`  board p95 within 3× floor:    ${(boardRow.p95 / floor.p95).toFixed(2)}× (floor p95 ${floor.p95.toFixed(1)} ms)  ${boardRow.p95 <= 3 * floor.p95 ? "met" : "NOT met"}`);
    const load = fs.readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" ");
    console.log(`  machine load average during the run: ${load} (2 cores; other work on the machine inflates latency, not CPU/req)`);
    if (rows.some((r) => r.non2xx + r.errors > 0)) console.log("  Some requests failed: the figures above count expected answers only (2xx; 304 for the revalidation row).");
  } finally {
    stopChildren();
    if (!flag("keep")) {
      const admin = new pg.Client({ connectionString: db.url.replace(/\/[^/]+$/, "/postgres") });
      await admin.connect();
      await admin.query(`drop database if exists ${database} with (force)`);
      await admin.end();
    }
  }
}

main().then(
  () => process.exit(0),
  (error: Error) => {
    console.error(`Bench could not run: ${error.stack ?? error.message}`);
    stopChildren();
    process.exit(1);
  },
);
