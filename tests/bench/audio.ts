/**
 * Audio benchmark: `npx tsx tests/bench/audio.ts [runs]`
 *
 * Writes two 3-minute 48 kHz stereo 24-bit WAV files into the OS temp folder
 * (programme-like noise with a slow swell, and a steady -1 dBFS tone — the
 * worst case for the true-peak scan, which cannot skip any block), then
 * prints medians of:
 *  - whole-process time of our CLI (node + tsx loader, as `npm run loudness`
 *    does) and of ffmpeg's ebur128 filter with true peak, when ffmpeg exists;
 *  - in-process decode and analysis time, and × real time;
 *  - a 10-band tone-curve response on the 24-per-octave grid, and the
 *    largest-boost search on its 96-per-octave grid.
 * Prints figures only; it asserts nothing about speed.
 */

import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { performance } from "node:perf_hooks";
import { decodeWav } from "../../lib/audio/decode";
import { measureLoudness } from "../../lib/audio/loudness";
import { curveResponse, largestBoostDb, logFrequencyGrid, type ToneBand } from "../../lib/audio/tone-curve";

const SAMPLE_RATE = 48_000;
const SECONDS = 180;
const runs = Math.max(1, Number(process.argv[2] ?? 5));

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

function processTime(cmd: string, args: string[], n: number): number | undefined {
  const samples: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    const r = spawnSync(cmd, args, { encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });
    const ms = performance.now() - t0;
    if (r.error || r.status !== 0) return undefined;
    samples.push(ms);
  }
  return median(samples);
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
  const processRuns = Math.min(runs, 3);
  for (const [name, file] of Object.entries(files)) {
    const cli = processTime(process.execPath, ["--import", "tsx", path.join(root, "lib/cli/loudness.ts"), file], processRuns);
    rows.push([`CLI whole process (node --import tsx), ${name}`, fmt(cli), cli ? xrt(cli) : ""]);
    if (ffmpegPresent) {
      const ff = processTime("ffmpeg", ["-hide_banner", "-nostats", "-i", file, "-filter_complex", "ebur128=peak=true", "-f", "null", "-"], processRuns);
      rows.push([`ffmpeg ebur128=peak=true whole process, ${name}`, fmt(ff), ff ? xrt(ff) : ""]);
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
    rows.push([`decodeWav in process, ${name}`, fmt(decodeMs), xrt(decodeMs)]);
    rows.push([`measureLoudness incl. true peak, ${name}`, fmt(fullMs), xrt(fullMs)]);
    rows.push([`measureLoudness without true peak, ${name}`, fmt(noTpMs), xrt(noTpMs)]);
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
  console.log(`Audio benchmark — 3 min, 48 kHz, stereo, 24-bit; median of ${runs} in-process runs, ${processRuns} process runs`);
  console.log(`${"what".padEnd(w0)}  ${"time".padStart(w1)}  rate`);
  console.log(`${"-".repeat(w0)}  ${"-".repeat(w1)}  ${"-".repeat(18)}`);
  for (const [a, b, c] of rows) console.log(`${a.padEnd(w0)}  ${b.padStart(w1)}  ${c}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
