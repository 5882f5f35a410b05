// `npm run -s loudness -- FILE.wav`: runs the precompiled one-file bundle of
// lib/cli/loudness.ts (rebuilt when a source changes), so start-up does not pay
// for transpiling TypeScript on every run.
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";

const root = path.resolve(import.meta.dirname, "../..");
const bundle = path.join(root, ".data/cache/loudness-cli.mjs");
const stamp = path.join(root, ".data/cache/loudness-cli.json");

function fresh() {
  try {
    if (!existsSync(bundle)) return false;
    const inputs = JSON.parse(readFileSync(stamp, "utf8")).inputs;
    return Object.entries(inputs).every(([file, seen]) => {
      const now = statSync(path.resolve(root, file));
      return now.mtimeMs === seen.mtimeMs && now.size === seen.size;
    });
  } catch {
    return false;
  }
}

if (!fresh()) {
  const built = spawnSync(process.execPath, ["--import", "tsx", path.join(root, "lib/cli/loudness.ts"), "--bundle"], {
    cwd: root,
    stdio: ["ignore", "ignore", "inherit"],
  });
  if (built.status !== 0) process.exit(1);
}
await import(pathToFileURL(bundle).href);
