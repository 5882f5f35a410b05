/**
 * `npm run -s loudness -- FILE.wav` prints the BS.1770-4 / EBU R 128
 * measurement of a WAV file as JSON on stdout. Values that have no finite
 * reading (e.g. the integrated loudness of silence, -Infinity) print as null.
 * Bad input: a one-line message on stderr and exit code 1.
 *
 * Start-up: under tsx every run pays for the TypeScript loader. For
 * integrators' scripts and the benchmark, `npx tsx lib/cli/loudness.ts
 * --bundle` writes this command as one plain JavaScript file,
 * `.data/cache/loudness-cli.mjs` (esbuild, which tsx already depends on),
 * and prints its path; `node .data/cache/loudness-cli.mjs FILE.wav` then
 * starts as fast as node itself. The bundle is rebuilt only when one of the
 * sources it was built from has a different modification time or size.
 *
 * Two threads: while the main thread decodes and K-weights (the integrated
 * loudness, range and momentary/short-term maxima), a worker thread started
 * at launch computes the true peak over the same samples, which the decoder
 * writes into shared memory so nothing is copied. Same numbers as
 * measureLoudness in one thread (the true peak is never below the sample
 * peak, as there); if the worker cannot start, the main thread does it all.
 */

import { readFile, stat } from "node:fs/promises";
import { existsSync, mkdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { isMainThread, parentPort, Worker } from "node:worker_threads";
import { AudioDecodeError, decodeWav, DEFAULT_MAX_BYTES } from "../audio/decode";
import { measureLoudness } from "../audio/loudness";
import { truePeakLinear } from "../audio/true-peak";

const USAGE = "usage: npm run -s loudness -- FILE.wav";

/** Set by esbuild in the bundle; the TypeScript source runs with it undefined. */
declare const ZW_LOUDNESS_BUNDLED: boolean | undefined;

interface TruePeakJob {
  channels: Float32Array[];
  sampleRate: number;
}

/** The true-peak thread: started at once, so its start-up overlaps reading and decoding. */
function startTruePeakWorker(): { run: (job: TruePeakJob) => Promise<number>; stop: () => void } | null {
  let worker: Worker;
  try {
    worker = new Worker(new URL(import.meta.url));
  } catch {
    return null;
  }
  return {
    run: (job) =>
      new Promise<number>((resolve, reject) => {
        worker.once("message", (peak: number) => resolve(peak));
        worker.once("error", reject);
        worker.postMessage(job);
      }),
    // Always called when main() ends, so the thread never keeps the process alive.
    stop: () => void worker.terminate(),
  };
}

async function main(argv: string[]): Promise<number> {
  const args = argv.filter((a) => a !== "--");
  if (args.length !== 1 || args[0] === "-h" || args[0] === "--help") {
    process.stderr.write(`${USAGE}\n`);
    return args[0] === "-h" || args[0] === "--help" ? 0 : 1;
  }
  const file = args[0]!;
  const truePeakWorker = startTruePeakWorker();
  try {
    // Refuse an oversized file before reading it into memory.
    const info = await stat(file);
    if (!info.isFile()) throw new Error(`${file} is not a file`);
    if (info.size > DEFAULT_MAX_BYTES) {
      throw new AudioDecodeError("audio:too-large", `The file is ${info.size} bytes; the limit is ${DEFAULT_MAX_BYTES} bytes.`);
    }
    const bytes = new Uint8Array(await readFile(file));
    const shared = truePeakWorker ? { allocate: (n: number) => new Float32Array(new SharedArrayBuffer(n * 4)) } : {};
    const wav = decodeWav(bytes, {}, shared);
    let m;
    let truePeakDbtp: number;
    if (truePeakWorker) {
      const peak = truePeakWorker.run({ channels: wav.channels, sampleRate: wav.sampleRate });
      m = measureLoudness(wav.channels, wav.sampleRate, { truePeak: false });
      const linear = await peak.catch(() => truePeakLinear(wav.channels, wav.sampleRate));
      // As in measureLoudness: the true peak is never below the sample peak.
      truePeakDbtp = Math.max(m.samplePeakDbfs, linear > 0 ? 20 * Math.log10(linear) : -Infinity);
    } else {
      m = measureLoudness(wav.channels, wav.sampleRate);
      truePeakDbtp = m.truePeakDbtp;
    }
    const output = {
      file,
      integratedLufs: m.integratedLufs,
      loudnessRangeLu: m.loudnessRangeLu,
      maxMomentaryLufs: m.maxMomentaryLufs,
      maxShortTermLufs: m.maxShortTermLufs,
      samplePeakDbfs: m.samplePeakDbfs,
      truePeakDbtp,
      durationSeconds: m.durationSeconds,
      sampleRate: m.sampleRate,
      channelCount: m.channelCount,
      bitDepth: wav.bitDepth,
      format: wav.format,
    };
    process.stdout.write(
      `${JSON.stringify(output, (_key, value: unknown) => (typeof value === "number" && !Number.isFinite(value) ? null : value), 2)}\n`,
    );
    return 0;
  } catch (error) {
    if (error instanceof AudioDecodeError) {
      process.stderr.write(`loudness: ${file}: ${error.message} (${error.code})\n`);
    } else if (error instanceof Error && "code" in error && error.code === "ENOENT") {
      process.stderr.write(`loudness: ${file}: no such file\n`);
    } else {
      process.stderr.write(`loudness: ${file}: ${error instanceof Error ? error.message : String(error)}\n`);
    }
    return 1;
  } finally {
    truePeakWorker?.stop();
  }
}

interface BundleStamp {
  inputs: Record<string, { mtimeMs: number; size: number }>;
}

function stampOf(root: string, files: string[]): BundleStamp {
  const inputs: BundleStamp["inputs"] = {};
  for (const f of files) {
    const s = statSync(path.resolve(root, f));
    inputs[f] = { mtimeMs: s.mtimeMs, size: s.size };
  }
  return { inputs };
}

function stampIsCurrent(root: string, stampFile: string): boolean {
  if (!existsSync(stampFile)) return false;
  try {
    const saved = JSON.parse(readFileSync(stampFile, "utf8")) as BundleStamp;
    const files = Object.keys(saved.inputs);
    if (files.length === 0) return false;
    const now = stampOf(root, files);
    return files.every((f) => now.inputs[f]!.mtimeMs === saved.inputs[f]!.mtimeMs && now.inputs[f]!.size === saved.inputs[f]!.size);
  } catch {
    return false; // a source was removed or the stamp is unreadable: rebuild
  }
}

/**
 * Builds (when stale) and returns the path of the plain-JavaScript bundle of
 * this command. `root` is the repository root.
 */
export async function ensureLoudnessBundle(root: string): Promise<string> {
  const dir = path.join(root, ".data", "cache");
  const out = path.join(dir, "loudness-cli.mjs");
  const stampFile = path.join(dir, "loudness-cli.json");
  if (existsSync(out) && stampIsCurrent(root, stampFile)) return out;
  mkdirSync(dir, { recursive: true });
  const esbuild = await import("esbuild");
  const result = await esbuild.build({
    absWorkingDir: root,
    entryPoints: ["lib/cli/loudness.ts"],
    outfile: out,
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    metafile: true,
    logLevel: "silent",
    external: ["esbuild"],
    define: { ZW_LOUDNESS_BUNDLED: "true" },
    // wavefile is CommonJS; give the ES module bundle a require() for it.
    banner: { js: 'import { createRequire as __zwRequire } from "node:module"; const require = __zwRequire(import.meta.url);' },
  });
  writeFileSync(stampFile, JSON.stringify(stampOf(root, Object.keys(result.metafile.inputs))));
  return out;
}

if (!isMainThread && parentPort) {
  // The true-peak thread (see startTruePeakWorker).
  const port = parentPort;
  port.once("message", (job: TruePeakJob) => {
    port.postMessage(truePeakLinear(job.channels, job.sampleRate));
    port.close();
  });
}

const invokedDirectly = (() => {
  if (!isMainThread) return false;
  if (typeof ZW_LOUDNESS_BUNDLED !== "undefined") return true;
  const entry = process.argv[1];
  return entry !== undefined && path.resolve(entry) === fileURLToPath(import.meta.url);
})();

if (invokedDirectly) {
  const argv = process.argv.slice(2);
  const run =
    argv[0] === "--bundle"
      ? ensureLoudnessBundle(path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..")).then((file) => {
          process.stdout.write(`${file}\n`);
          return 0;
        })
      : main(argv);
  run.then(
    (code) => {
      process.exitCode = code;
    },
    (error: unknown) => {
      process.stderr.write(`loudness: ${error instanceof Error ? error.message : String(error)}\n`);
      process.exitCode = 1;
    },
  );
}
