// Child-process helpers shared by the start and test commands.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

export type ChildEnv = Record<string, string | undefined>;

const root = path.resolve(import.meta.dirname, "../..");
export const bin = (name: string) => path.join(root, "node_modules", ".bin", name);

export interface Managed {
  name: string;
  child: ChildProcess;
}

const children: Managed[] = [];

/** Start a long-running child with prefixed output; remembered for shutdown. */
export function startChild(name: string, command: string, args: string[], env: ChildEnv, quiet = false): Managed {
  const child = spawn(command, args, {
    cwd: root,
    env: { ...process.env, ...env },
    stdio: ["ignore", "pipe", "pipe"],
    detached: false,
  });
  const prefix = `[${name}] `;
  const forward = (stream: NodeJS.WritableStream) => (chunk: Buffer) => {
    if (quiet) return;
    for (const line of chunk.toString().split("\n")) if (line.trim()) stream.write(prefix + line + "\n");
  };
  child.stdout?.on("data", forward(process.stdout));
  child.stderr?.on("data", forward(process.stderr));
  const managed = { name, child };
  children.push(managed);
  return managed;
}

export function stopChildren() {
  for (const { child } of children.reverse()) {
    if (child.exitCode === null && !child.killed) child.kill("SIGTERM");
  }
  children.length = 0;
}

/**
 * `next build`. With NEXT_DIST_DIR set (side-by-side suites, the benchmark),
 * Next.js adds that folder's type paths to tsconfig.json; the file is put back
 * as it was, so a build never leaves the working tree changed.
 */
export async function buildNext(env: ChildEnv = {}): Promise<number> {
  const tsconfig = path.join(root, "tsconfig.json");
  const before = fs.readFileSync(tsconfig, "utf8");
  try {
    return await runStep(bin("next"), ["build"], env);
  } finally {
    if (fs.readFileSync(tsconfig, "utf8") !== before) fs.writeFileSync(tsconfig, before);
  }
}

/** Run to completion, output inherited; returns the exit code. */
export function runStep(command: string, args: string[], env: ChildEnv = {}): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(command, args, { cwd: root, env: { ...process.env, ...env }, stdio: "inherit" });
    child.on("exit", (code, signal) => resolve(code ?? (signal ? 1 : 0)));
  });
}

export async function waitForHttp(url: string, timeoutMs: number, isUp: (status: number) => boolean = (s) => s < 500) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url, { redirect: "manual" });
      if (isUp(res.status)) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`${url} did not answer within ${timeoutMs} ms`);
}

/** Is the production build older than any source it was built from? */
export function buildIsStale(): boolean {
  const buildId = path.join(root, ".next", "BUILD_ID");
  if (!fs.existsSync(buildId)) return true;
  const builtAt = fs.statSync(buildId).mtimeMs;
  const newest = (p: string): number => {
    if (!fs.existsSync(p)) return 0;
    const stat = fs.statSync(p);
    if (!stat.isDirectory()) return stat.mtimeMs;
    return Math.max(0, ...fs.readdirSync(p).map((e) => newest(path.join(p, e))));
  };
  const inputs = ["app", "components", "lib", "db", "public", "fonts", "mocks", "next.config.ts", "tailwind.config.ts", "package-lock.json"];
  return inputs.some((i) => newest(path.join(root, i)) > builtAt);
}

/** Install Debian packages when missing (as root), or say exactly what to install. */
export function ensureDebianPackages(needs: { command: string; pkg: string }[]) {
  const missing = needs.filter((n) => spawnSync("sh", ["-c", `command -v ${n.command}`]).status !== 0);
  if (missing.length === 0) return;
  const pkgs = missing.map((m) => m.pkg);
  const isRoot = process.getuid?.() === 0;
  const hasApt = spawnSync("sh", ["-c", "command -v apt-get"]).status === 0;
  if (!isRoot || !hasApt) {
    throw new Error(`Missing system packages. Install them and run again:\n  sudo apt-get update && sudo apt-get install -y ${pkgs.join(" ")}`);
  }
  console.log(`Installing Debian packages: ${pkgs.join(" ")}…`);
  for (let attempt = 1; attempt <= 6; attempt++) {
    const update = spawnSync("apt-get", ["update", "-qq"], { stdio: "inherit" });
    const install = spawnSync("apt-get", ["install", "-y", "-qq", ...pkgs], {
      stdio: "inherit",
      env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
    });
    if (update.status === 0 && install.status === 0) return;
    console.log(`apt-get did not finish (attempt ${attempt}); retrying in 10 s…`);
    spawnSync("sleep", ["10"]);
  }
  throw new Error(`Could not install ${pkgs.join(" ")}. Run: apt-get install -y ${pkgs.join(" ")}`);
}

export { root };
