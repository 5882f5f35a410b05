/**
 * Cross-check against Debian's ffmpeg `ebur128` filter, a general-purpose
 * reference implementation of BS.1770 / EBU R 128, on the same generated WAV
 * files: integrated loudness within 0.1 LU, true peak within 0.2 dB, loudness
 * range within 1 LU (Tech 3342's tolerance). ffmpeg prints its summary to one
 * decimal, which takes up to 0.05 of each tolerance.
 *
 * ffmpeg is required: when it is missing this file fails with the install hint.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { decodeWav } from "@/lib/audio/decode";
import { measureLoudness } from "@/lib/audio/loudness";
import { encodeWav, fractionalTone, programmeLikeNoise, tone, toneSequence, type WavBitDepthCode } from "./signals";

const INSTALL_HINT = "ffmpeg is required for this cross-check: apt-get install -y ffmpeg";

function requireFfmpeg(): void {
  const probe = spawnSync("ffmpeg", ["-hide_banner", "-version"], { encoding: "utf8" });
  if (probe.error || probe.status !== 0) throw new Error(INSTALL_HINT);
}

interface FfmpegSummary {
  integratedLufs: number;
  loudnessRangeLu: number;
  truePeakDbtp: number;
}

function ffmpegEbur128(file: string): FfmpegSummary {
  requireFfmpeg();
  const run = spawnSync(
    "ffmpeg",
    ["-hide_banner", "-nostats", "-i", file, "-filter_complex", "ebur128=peak=true:framelog=verbose", "-f", "null", "-"],
    { encoding: "utf8", maxBuffer: 64 * 1024 * 1024 },
  );
  if (run.status !== 0) throw new Error(`ffmpeg failed: ${run.stderr.slice(-2000)}`);
  const summary = run.stderr.slice(run.stderr.lastIndexOf("Summary:"));
  const grab = (re: RegExp): number => {
    const m = re.exec(summary);
    if (!m) throw new Error(`could not parse ffmpeg summary:\n${summary}`);
    return m[1] === "-inf" ? -Infinity : Number(m[1]);
  };
  return {
    integratedLufs: grab(/I:\s+(-?[\d.]+|-inf) LUFS/),
    loudnessRangeLu: grab(/LRA:\s+(-?[\d.]+) LU/),
    truePeakDbtp: grab(/True peak:\s+Peak:\s+(-?[\d.]+|-inf) dBFS/),
  };
}

const dir = mkdtempSync(path.join(tmpdir(), "zw-ffmpeg-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function compare(name: string, channels: Float32Array[], sampleRate: number, bitDepth: WavBitDepthCode) {
  const file = path.join(dir, `${name}.wav`);
  const bytes = encodeWav(channels, sampleRate, bitDepth);
  writeFileSync(file, bytes);
  // Ours reads the same bytes ffmpeg reads (same quantisation).
  const wav = decodeWav(bytes);
  return { ours: measureLoudness(wav.channels, wav.sampleRate), ffmpeg: ffmpegEbur128(file) };
}

describe("ffmpeg ebur128 cross-check", () => {
  it("ffmpeg is installed", () => {
    requireFfmpeg();
  });

  const cases: Array<{ name: string; make: () => Float32Array[]; rate: number; bits: WavBitDepthCode }> = [
    { name: "tech3341-case1-48k-24bit", rate: 48_000, bits: "24", make: () => [tone(-23, 20, 48_000), tone(-23, 20, 48_000)] },
    {
      name: "tech3341-case5-steps-48k",
      rate: 48_000,
      bits: "24",
      make: () => {
        const x = toneSequence([{ levelDbfs: -26, seconds: 20 }, { levelDbfs: -20, seconds: 20.1 }, { levelDbfs: -26, seconds: 20 }], 48_000);
        return [x, x];
      },
    },
    {
      name: "programme-noise-44k1-16bit",
      rate: 44_100,
      bits: "16",
      make: () => [programmeLikeNoise(30, 44_100, 11), programmeLikeNoise(30, 44_100, 12)],
    },
    { name: "sine-997-96k-24bit", rate: 96_000, bits: "24", make: () => [tone(-18, 15, 96_000, 997), tone(-21, 15, 96_000, 997)] },
    {
      name: "tech3341-case16-intersample-48k",
      rate: 48_000,
      bits: "32f",
      make: () => [fractionalTone(0.5, 1 / 4, 45, 10, 48_000, 0.02), fractionalTone(0.5, 1 / 4, 45, 10, 48_000, 0.02)],
    },
    {
      name: "tech3342-case1-lra-48k",
      rate: 48_000,
      bits: "24",
      make: () => {
        const x = toneSequence([{ levelDbfs: -20, seconds: 20 }, { levelDbfs: -30, seconds: 20 }], 48_000);
        return [x, x];
      },
    },
  ];

  for (const c of cases) {
    it(`${c.name}: integrated ±0.1 LU, true peak ±0.2 dB, LRA ±1 LU`, () => {
      const { ours, ffmpeg } = compare(c.name, c.make(), c.rate, c.bits);
      if (process.env.ZW_AUDIO_VERBOSE) {
        console.log(c.name, { ours: [ours.integratedLufs, ours.truePeakDbtp, ours.loudnessRangeLu], ffmpeg });
      }
      expect(Math.abs(ours.integratedLufs - ffmpeg.integratedLufs), `ours ${ours.integratedLufs} vs ffmpeg ${ffmpeg.integratedLufs}`).toBeLessThanOrEqual(0.1);
      expect(Math.abs(ours.truePeakDbtp - ffmpeg.truePeakDbtp), `ours ${ours.truePeakDbtp} vs ffmpeg ${ffmpeg.truePeakDbtp}`).toBeLessThanOrEqual(0.2);
      expect(Math.abs(ours.loudnessRangeLu - ffmpeg.loudnessRangeLu), `ours ${ours.loudnessRangeLu} vs ffmpeg ${ffmpeg.loudnessRangeLu}`).toBeLessThanOrEqual(1);
    });
  }
});
