// Local PostgreSQL lifecycle for the start and test commands: find (or install)
// Debian's server binaries, initialise a cluster in a git-ignored folder, start
// it on 127.0.0.1, wait until it accepts connections, stop it cleanly.
// postgres refuses to run as root, so as root every server command runs as the
// postgres user; as an ordinary user it runs directly.
import { execFileSync, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";

export interface LocalPostgresOptions {
  /** Cluster folder (created on first run). */
  dataDir: string;
  port: number;
  /** Database to create if missing. */
  database: string;
  /** Drop and re-create the database (tests). */
  reset?: boolean;
  log?: (line: string) => void;
}

export interface LocalPostgres {
  url: string;
  stop(): void;
}

const SUPERUSER = "zonewright";
const isRoot = typeof process.getuid === "function" && process.getuid() === 0;

function findBinDir(): string | null {
  const base = "/usr/lib/postgresql";
  if (fs.existsSync(base)) {
    const versions = fs
      .readdirSync(base)
      .filter((v) => fs.existsSync(path.join(base, v, "bin", "postgres")))
      .sort((a, b) => Number(b) - Number(a));
    if (versions.length > 0) return path.join(base, versions[0], "bin");
  }
  const which = spawnSync("sh", ["-c", "command -v postgres"], { encoding: "utf8" });
  if (which.status === 0 && which.stdout.trim()) return path.dirname(which.stdout.trim());
  return null;
}

function sleepMs(ms: number) {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

function installPostgres(log: (l: string) => void) {
  const hasApt = spawnSync("sh", ["-c", "command -v apt-get"]).status === 0;
  if (!isRoot || !hasApt) {
    throw new Error(
      "PostgreSQL server binaries were not found.\n" +
        "Install Debian's server package and run the command again:\n" +
        "  sudo apt-get update && sudo apt-get install -y postgresql",
    );
  }
  log("PostgreSQL server not found: installing Debian's postgresql package…");
  // Another install may hold the dpkg lock for a while: retry after a pause.
  for (let attempt = 1; attempt <= 6; attempt++) {
    const update = spawnSync("apt-get", ["update", "-qq"], { stdio: "inherit" });
    const install = spawnSync("apt-get", ["install", "-y", "-qq", "postgresql"], {
      stdio: "inherit",
      env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
    });
    if (update.status === 0 && install.status === 0 && findBinDir()) return;
    log(`apt-get did not finish (attempt ${attempt}); retrying in 10 s…`);
    sleepMs(10_000);
  }
  throw new Error("Could not install PostgreSQL. Run: apt-get install -y postgresql");
}

/** Run a server binary, as the postgres user when we are root. */
function runAsServerUser(bin: string, args: string[], cwd: string) {
  const [cmd, argv] = isRoot ? ["runuser", ["-u", "postgres", "--", bin, ...args]] : [bin, args];
  const res = spawnSync(cmd, argv, { cwd, encoding: "utf8" });
  return { status: res.status ?? 1, output: `${res.stdout ?? ""}${res.stderr ?? ""}` };
}

function ensureServerUserOwns(dir: string) {
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  if (isRoot) execFileSync("chown", ["-R", "postgres:postgres", dir]);
}

/** Every folder above the cluster must be traversable by the postgres user. */
function ensureTraversable(dir: string) {
  if (!isRoot) return;
  let current = path.dirname(dir);
  while (current !== path.dirname(current)) {
    const mode = fs.statSync(current).mode;
    if ((mode & 0o001) === 0) fs.chmodSync(current, mode | 0o001);
    current = path.dirname(current);
  }
}

function isRunning(binDir: string, dataDir: string, cwd: string) {
  if (!fs.existsSync(path.join(dataDir, "PG_VERSION"))) return false;
  return runAsServerUser(path.join(binDir, "pg_ctl"), ["-D", dataDir, "status"], cwd).status === 0;
}

async function waitForConnections(url: string, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs;
  let lastError: unknown;
  while (Date.now() < deadline) {
    const client = new pg.Client({ connectionString: url });
    try {
      await client.connect();
      await client.query("select 1");
      await client.end();
      return;
    } catch (error) {
      lastError = error;
      await client.end().catch(() => {});
      await new Promise((r) => setTimeout(r, 150));
    }
  }
  throw new Error(`PostgreSQL did not accept connections within ${timeoutMs} ms: ${String(lastError)}`);
}

export function serverUrl(port: number, database: string) {
  return `postgres://${SUPERUSER}@127.0.0.1:${port}/${database}`;
}

export async function startLocalPostgres(options: LocalPostgresOptions): Promise<LocalPostgres> {
  const log = options.log ?? ((l: string) => console.log(`[postgres] ${l}`));
  const dataDir = path.resolve(options.dataDir);
  const parent = path.dirname(dataDir);
  fs.mkdirSync(parent, { recursive: true });
  let binDir = findBinDir();
  if (!binDir) {
    installPostgres(log);
    binDir = findBinDir();
    if (!binDir) throw new Error("PostgreSQL binaries still missing after install.");
  }
  ensureTraversable(dataDir);
  const socketDir = path.join(parent, `pg-socket-${options.port}`);
  ensureServerUserOwns(socketDir);
  const logFile = path.join(parent, `postgres-${options.port}.log`);
  if (isRoot && !fs.existsSync(logFile)) {
    fs.writeFileSync(logFile, "");
    execFileSync("chown", ["postgres:postgres", logFile]);
  }

  if (!fs.existsSync(path.join(dataDir, "PG_VERSION"))) {
    log(`initialising a new cluster in ${path.relative(process.cwd(), dataDir) || dataDir}`);
    ensureServerUserOwns(dataDir);
    const init = runAsServerUser(
      path.join(binDir, "initdb"),
      ["-D", dataDir, "-U", SUPERUSER, "--auth=trust", "-E", "UTF8", "--locale=C.UTF-8"],
      parent,
    );
    if (init.status !== 0) throw new Error(`initdb failed:\n${init.output}`);
  }

  const url = serverUrl(options.port, options.database);
  if (!isRunning(binDir, dataDir, parent)) {
    const serverOptions = [
      `-p ${options.port}`,
      `-k ${socketDir}`,
      "-c listen_addresses=127.0.0.1",
      "-c max_connections=200",
      process.env.ZW_PG_FAST === "1" ? "-c fsync=off -c synchronous_commit=off -c full_page_writes=off" : "",
    ].join(" ");
    const start = runAsServerUser(
      path.join(binDir, "pg_ctl"),
      ["-D", dataDir, "-l", logFile, "-o", serverOptions, "-w", "-t", "60", "start"],
      parent,
    );
    if (start.status !== 0) {
      const tail = fs.existsSync(logFile) ? fs.readFileSync(logFile, "utf8").split("\n").slice(-15).join("\n") : "";
      throw new Error(`PostgreSQL did not start on 127.0.0.1:${options.port}:\n${start.output}\n${tail}`);
    }
    log(`started on 127.0.0.1:${options.port}`);
  } else {
    log(`already running on 127.0.0.1:${options.port}`);
  }

  await waitForConnections(serverUrl(options.port, "postgres"), 30_000);
  await ensureDatabase(options.port, options.database, options.reset ?? false);

  const bin = binDir;
  return {
    url,
    stop() {
      runAsServerUser(path.join(bin, "pg_ctl"), ["-D", dataDir, "-m", "fast", "-w", "stop"], parent);
      log("stopped");
    },
  };
}

async function ensureDatabase(port: number, database: string, reset: boolean) {
  if (!/^[a-z_][a-z0-9_]*$/.test(database)) throw new Error(`Unsafe database name: ${database}`);
  const client = new pg.Client({ connectionString: serverUrl(port, "postgres") });
  await client.connect();
  try {
    if (reset) await client.query(`drop database if exists ${database} with (force)`);
    const found = await client.query("select 1 from pg_database where datname = $1", [database]);
    if (found.rowCount === 0) await client.query(`create database ${database}`);
  } finally {
    await client.end();
  }
}

export function stopLocalPostgres(dataDir: string) {
  const binDir = findBinDir();
  const dir = path.resolve(dataDir);
  if (!binDir || !fs.existsSync(path.join(dir, "PG_VERSION"))) return;
  runAsServerUser(path.join(binDir, "pg_ctl"), ["-D", dir, "-m", "fast", "-w", "stop"], path.dirname(dir));
}

export const demoCluster = {
  dataDir: path.resolve(".data/pg"),
  port: Number(process.env.ZW_PG_PORT ?? 54329),
  database: "zonewright",
};

export const testCluster = {
  dataDir: path.resolve(".data/pg-test"),
  port: Number(process.env.ZW_TEST_PG_PORT ?? 54339),
  database: "zonewright_test",
};

// Command line: tsx db/local-postgres.ts start|stop [--test]
if (import.meta.url === `file://${process.argv[1]}`) {
  const [command] = process.argv.slice(2);
  const cluster = process.argv.includes("--test") ? testCluster : demoCluster;
  if (command === "start") {
    startLocalPostgres(cluster)
      .then((pgInfo) => console.log(`DATABASE_URL=${pgInfo.url}`))
      .catch((error: Error) => {
        console.error(error.message);
        process.exit(1);
      });
  } else if (command === "stop") {
    stopLocalPostgres(cluster.dataDir);
  } else {
    console.error("usage: tsx db/local-postgres.ts start|stop [--test]");
    process.exit(2);
  }
}
