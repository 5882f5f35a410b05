/**
 * `npm run bench`: runs every benchmark in tests/bench, one after another,
 * printing their output as it comes. A benchmark is a *.ts file here other
 * than this one, a declaration file (*.d.ts), or a helper — a file another
 * benchmark names (imports or starts), such as a fake server it spawns.
 * Each runs as `node --conditions=react-server --import tsx FILE`, so code
 * behind `server-only` loads as it does on the server. Extra arguments are
 * passed to every benchmark (e.g. `npm run bench -- 3`). Prints figures only;
 * a benchmark that fails is reported and the rest still run.
 */
import { spawnSync } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";

const here = import.meta.dirname;
const self = path.basename(import.meta.filename);
const candidates = readdirSync(here)
  .filter((f) => f.endsWith(".ts") && !f.endsWith(".d.ts") && f !== self)
  .sort();
const sources = new Map(candidates.map((f) => [f, readFileSync(path.join(here, f), "utf8")]));
const helpers = new Set(
  candidates.filter((f) => {
    const base = f.replace(/\.ts$/, "");
    return candidates.some((other) => other !== f && new RegExp(`[/"'\`]${base.replace(/[-.]/g, "\\$&")}(\\.ts)?["'\`]`).test(sources.get(other)!));
  }),
);
const files = candidates.filter((f) => !helpers.has(f));
if (helpers.size) console.log(`Helpers (started by other benchmarks, not run alone): ${[...helpers].join(", ")}`);

const failed: string[] = [];
for (const file of files) {
  console.log(`\n━━━ ${file} ━━━`);
  const started = Date.now();
  const r = spawnSync(process.execPath, ["--conditions=react-server", "--import", "tsx", path.join(here, file), ...process.argv.slice(2)], {
    stdio: "inherit",
    cwd: path.resolve(here, "../.."),
  });
  const seconds = ((Date.now() - started) / 1000).toFixed(1);
  if (r.status !== 0) {
    failed.push(file);
    console.log(`${file} failed (exit ${r.status ?? r.signal}) after ${seconds} s`);
  } else {
    console.log(`${file} finished in ${seconds} s`);
  }
}
console.log(`\n${files.length - failed.length} of ${files.length} benchmarks ran${failed.length ? `; failed: ${failed.join(", ")}` : ""}.`);
process.exitCode = failed.length ? 1 : 0;
