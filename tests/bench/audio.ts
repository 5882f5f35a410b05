/**
 * Audio benchmark: `npx tsx tests/bench/audio.ts [runs]`
 *
 * Writes two 3-minute 48 kHz stereo 24-bit WAV files into the OS temp folder
 * (programme-like noise with a slow swell, and a steady -1 dBFS tone — the
 * worst case for the true-peak scan, which cannot skip any block), then
 * prints medians of:
 *  - whole-process time (wall clock, and CPU time user + system when GNU
 *    time is at /usr/bin/time) of our CLI three ways — the precompiled
 *    bundle (`node .data/cache/loudness-cli.mjs`, see lib/cli/loudness.ts),
 *    `node --import tsx lib/cli/loudness.ts`, and `npm run -s loudness --`
 *    — and of ffmpeg's ebur128 filter with true peak when ffmpeg exists,
 *    run interleaved so a busy machine slows all of them alike;
 *  - in-process decode and analysis time, and × real time;
 *  - a 10-band tone-curve response on the 24-per-octave grid, and the
 *    largest-boost search on its 96-per-octave grid.
 * Prints figures only; it asserts nothing about speed.
 */

import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { cpus, loadavg, tmpdir } from "node:os";
import path from "node:path";
import { performance } from "node:perf_hooks";
import { ensureLoudnessBundle } from "../../lib/cli/loudness";
import { decodeWav } from "../../lib/audio/decode";
import { measureLoudness } from "../../lib/audio/loudness";
import { curveResponse, largestBoostDb, logFrequencyGrid, type ToneBand } from "../../lib/audio/tone-curve";

const SAMPLE_RATE = 48_000;
const SECONDS = 180;
const runs = Math.max(1, Number(process.argv.slice(2).find((a) => /^\d+$/.test(a)) ?? 5));

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}

function time(fn: () => void, n: number): number {
  const samples: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    fn();
    samples.push(performance.now() - t0);
  }
  return median(samples);
}

/** Canonical 44-byte PCM header + interleaved 24-bit little-endian samples. */
function writeWav24(file: string, left: Float32Array, right: Float32Array): void {
  const frames = left.length;
  const dataBytes = frames * 6;
  const buf = Buffer.alloc(44 + dataBytes);
  buf.write("RIFF", 0, "ascii");
  buf.writeUInt32LE(36 + dataBytes, 4);
  buf.write("WAVE", 8, "ascii");
  buf.write("fmt ", 12, "ascii");
  buf.writeUInt32LE(16, 16);
  buf.writeUInt16LE(1, 20); // PCM
  buf.writeUInt16LE(2, 22);
  buf.writeUInt32LE(SAMPLE_RATE, 24);
  buf.writeUInt32LE(SAMPLE_RATE * 6, 28);
  buf.writeUInt16LE(6, 32);
  buf.writeUInt16LE(24, 34);
  buf.write("data", 36, "ascii");
  buf.writeUInt32LE(dataBytes, 40);
  let pos = 44;
  for (let i = 0; i < frames; i++) {
    for (const v of [left[i]!, right[i]!]) {
      buf.writeIntLE(Math.max(-8388608, Math.min(8388607, Math.round(v * 8388607))), pos, 3);
      pos += 3;
    }
  }
  writeFileSync(file, buf);
}

function programme(seed: number): Float32Array {
  // Deterministic LCG noise, one-pole tilt, slow swell: a stand-in for music.
  const n = SAMPLE_RATE * SECONDS;
  const out = new Float32Array(n);
  let s = seed;
  let lp = 0;
  for (let i = 0; i < n; i++) {
    s = (s * 1664525 + 1013904223) >>> 0;
    lp += 0.35 * (s / 2147483648 - 1 - lp);
    const swell = 0.55 + 0.45 * Math.sin((2 * Math.PI * i) / (SAMPLE_RATE * 7.3));
    out[i] = 0.5 * swell * lp;
  }
  return out;
}

function steadyTone(): Float32Array {
  const n = SAMPLE_RATE * SECONDS;
  const out = new Float32Array(n);
  const amp = Math.pow(10, -1 / 20);
  for (let i = 0; i < n; i++) out[i] = amp * Math.sin((2 * Math.PI * 997 * i) / SAMPLE_RATE);
  return out;
}

interface ProcessTiming {
  wallMs: number;
  /** user + system CPU time of the process and its children; undefined without GNU time. */
  cpuMs: number | undefined;
}

const gnuTime = spawnSync("/usr/bin/time", ["-f", "%U", "true"], { encoding: "utf8" }).status === 0;

function processOnce(cmd: string, args: string[], timesFile: string): ProcessTiming | undefined {
  const t0 = performance.now();
  const r = gnuTime
    ? spawnSync("/usr/bin/time", ["-o", timesFile, "-f", "%U %S", cmd, ...args], { encoding: "utf8", maxBuffer: 64 * 1024 * 1024 })
    : spawnSync(cmd, args, { encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });
  const wallMs = performance.now() - t0;
  if (r.error || r.status !== 0) return undefined;
  let cpuMs: number | undefined;
  if (gnuTime) {
    const [user, system] = readFileSync(timesFile, "utf8").trim().split(/\s+/).slice(-2).map(Number);
    cpuMs = ((user ?? NaN) + (system ?? NaN)) * 1000;
  }
  return { wallMs, cpuMs };
}

/** Runs every command `n` times, round-robin, and returns the medians per command. */
function interleaved(commands: Array<[string, string[]]>, n: number, timesFile: string): Array<ProcessTiming | undefined> {
  const samples = commands.map(() => [] as ProcessTiming[]);
  const failed = commands.map(() => false);
  for (let i = 0; i < n; i++) {
    commands.forEach(([cmd, args], k) => {
      if (failed[k]) return;
      const t = processOnce(cmd, args, timesFile);
      if (t) samples[k]!.push(t);
      else failed[k] = true;
    });
  }
  return samples.map((list, k) => {
    if (failed[k] || list.length === 0) return undefined;
    const cpu = list.map((t) => t.cpuMs);
    return {
      wallMs: median(list.map((t) => t.wallMs)),
      cpuMs: cpu.every((c): c is number => c !== undefined) ? median(cpu) : undefined,
    };
  });
}

const root = path.resolve(import.meta.dirname, "../..");
const dir = mkdtempSync(path.join(tmpdir(), "zw-bench-"));
try {
  const files = {
    programme: path.join(dir, "programme-3min-48k-24bit.wav"),
    tone: path.join(dir, "tone-3min-48k-24bit.wav"),
  };
  writeWav24(files.programme, programme(1), programme(2));
  const tone = steadyTone();
  writeWav24(files.tone, tone, tone);

  const rows: Array<[string, string, string]> = [];
  const fmt = (ms: number | undefined) => (ms === undefined ? "n/a" : `${ms.toFixed(1)} ms`);
  const xrt = (ms: number) => `${((SECONDS * 1000) / ms).toFixed(0)}× real time`;

  const ffmpegPresent = !spawnSync("ffmpeg", ["-hide_banner", "-version"]).error;
  const processRuns = Math.min(Math.max(runs, 3), 7);
  const bundle = await ensureLoudnessBundle(root);
  const timesFile = path.join(dir, "time.txt");
  const timing = (t: ProcessTiming | undefined) =>
    t === undefined ? "n/a" : `${t.wallMs.toFixed(1)} ms${t.cpuMs === undefined ? "" : ` (CPU ${t.cpuMs.toFixed(0)} ms)`}`;
  const verdicts: string[] = [];
  for (const [name, file] of Object.entries(files)) {
    const commands: Array<[string, string[]]> = [
      [process.execPath, [bundle, file]],
      [process.execPath, ["--import", "tsx", path.join(root, "lib/cli/loudness.ts"), file]],
      ["npm", ["run", "-s", "--prefix", root, "loudness", "--", file]],
    ];
    if (ffmpegPresent) {
      commands.push(["ffmpeg", ["-hide_banner", "-nostats", "-i", file, "-filter_complex", "ebur128=peak=true", "-f", "null", "-"]]);
    }
    const [viaBundle, viaTsx, viaNpm, viaFfmpeg] = interleaved(commands, processRuns, timesFile);
    rows.push([`CLI whole process, precompiled (node ${path.relative(root, bundle)}), ${name}`, timing(viaBundle), viaBundle ? xrt(viaBundle.wallMs) : ""]);
    rows.push([`CLI whole process (node --import tsx lib/cli/loudness.ts), ${name}`, timing(viaTsx), viaTsx ? xrt(viaTsx.wallMs) : ""]);
    rows.push([`CLI whole process (npm run -s loudness --), ${name}`, timing(viaNpm), viaNpm ? xrt(viaNpm.wallMs) : ""]);
    if (ffmpegPresent) {
      rows.push([`ffmpeg ebur128=peak=true whole process, ${name}`, timing(viaFfmpeg), viaFfmpeg ? xrt(viaFfmpeg.wallMs) : ""]);
      if (viaBundle && viaFfmpeg) {
        const ratio = viaFfmpeg.wallMs / viaBundle.wallMs;
        const cpuRatio = viaBundle.cpuMs !== undefined && viaFfmpeg.cpuMs !== undefined ? viaFfmpeg.cpuMs / viaBundle.cpuMs : undefined;
        verdicts.push(
          `${name}: precompiled CLI vs ffmpeg ebur128 — ${ratio.toFixed(2)}× (wall)${cpuRatio === undefined ? "" : `, ${cpuRatio.toFixed(2)}× (CPU)`}: ` +
            (ratio > 1 ? "faster, target met" : "NOT faster, target missed"),
        );
      }
    } else {
      rows.push([`ffmpeg ebur128 (not installed: apt-get install -y ffmpeg)`, "n/a", ""]);
    }

    const bytes = new Uint8Array(readFileSync(file));
    let decoded = decodeWav(bytes);
    const decodeMs = time(() => {
      decoded = decodeWav(bytes);
    }, runs);
    const fullMs = time(() => measureLoudness(decoded.channels, decoded.sampleRate), runs);
    const noTpMs = time(() => measureLoudness(decoded.channels, decoded.sampleRate, { truePeak: false }), runs);
    const jsTpMs = time(() => measureLoudness(decoded.channels, decoded.sampleRate, { truePeak: { simd: false } }), runs);
    rows.push([`decodeWav in process, ${name}`, fmt(decodeMs), xrt(decodeMs)]);
    rows.push([`measureLoudness incl. true peak, ${name}`, fmt(fullMs), xrt(fullMs)]);
    rows.push([`measureLoudness without true peak, ${name}`, fmt(noTpMs), xrt(noTpMs)]);
    rows.push([`measureLoudness, true peak without SIMD kernel, ${name}`, fmt(jsTpMs), xrt(jsTpMs)]);
  }

  const bands: ToneBand[] = [
    { type: "highpass", frequencyHz: 25, gainDb: 0, q: 0.707 },
    { type: "lowshelf", frequencyHz: 90, gainDb: 3, q: 1 },
    { type: "peaking", frequencyHz: 160, gainDb: -4, q: 2 },
    { type: "peaking", frequencyHz: 320, gainDb: 2, q: 1.4 },
    { type: "peaking", frequencyHz: 700, gainDb: -2.5, q: 1 },
    { type: "peaking", frequencyHz: 1500, gainDb: 1.5, q: 0.9 },
    { type: "peaking", frequencyHz: 3200, gainDb: -3, q: 3 },
    { type: "notch", frequencyHz: 5000, gainDb: 0, q: 10 },
    { type: "highshelf", frequencyHz: 9000, gainDb: 2, q: 1 },
    { type: "lowpass", frequencyHz: 19_000, gainDb: 0, q: 0.707 },
  ];
  const grid = logFrequencyGrid(20, 20_000, 24);
  const curveRuns = Math.max(runs * 20, 50);
  time(() => curveResponse(bands, SAMPLE_RATE, grid), 20); // warm-up
  const curveMs = time(() => curveResponse(bands, SAMPLE_RATE, grid), curveRuns);
  const boostMs = time(() => largestBoostDb(bands, SAMPLE_RATE), curveRuns);
  rows.push([`curveResponse, 10 bands × ${grid.length} points`, `${(curveMs * 1000).toFixed(0)} µs`, ""]);
  rows.push(["largestBoostDb, 10 bands × ~960 points", `${(boostMs * 1000).toFixed(0)} µs`, ""]);

  const w0 = Math.max(...rows.map((r) => r[0].length));
  const w1 = Math.max(...rows.map((r) => r[1].length));
  console.log(
    `Audio benchmark — 3 min, 48 kHz, stereo, 24-bit; median of ${runs} in-process runs, ${processRuns} interleaved process runs; load average ${loadavg()[0]!.toFixed(2)} on ${cpus().length} CPUs`,
  );
  console.log(`${"what".padEnd(w0)}  ${"time".padStart(w1)}  rate`);
  console.log(`${"-".repeat(w0)}  ${"-".repeat(w1)}  ${"-".repeat(18)}`);
  for (const [a, b, c] of rows) console.log(`${a.padEnd(w0)}  ${b.padStart(w1)}  ${c}`);
  for (const v of verdicts) console.log(v);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
