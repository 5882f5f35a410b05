// The `npm run -s loudness -- FILE.wav` command (lib/cli/loudness.ts), run as a real process.
// Expected reading: EBU Tech 3341 case 1 (stereo 1 kHz at -23 dBFS → -23.0 LUFS ±0.1).
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { encodeWav, tone } from "./signals";

const root = path.resolve(import.meta.dirname, "../../..");
const dir = mkdtempSync(path.join(tmpdir(), "zw-cli-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function runCli(file: string) {
  return spawnSync(process.execPath, ["--import", "tsx", path.join(root, "lib/cli/loudness.ts"), file], {
    cwd: root,
    encoding: "utf8",
  });
}

describe("loudness CLI", () => {
  it("prints the measurement as JSON", () => {
    const file = path.join(dir, "case1.wav");
    writeFileSync(file, encodeWav([tone(-23, 10, 48_000), tone(-23, 10, 48_000)], 48_000, "24"));
    const r = runCli(file);
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout) as Record<string, unknown>;
    expect(Math.abs((out.integratedLufs as number) + 23)).toBeLessThan(0.1);
    expect(out).toMatchObject({ sampleRate: 48_000, channelCount: 2, bitDepth: 24, format: "pcm-int", durationSeconds: 10 });
    expect(typeof out.truePeakDbtp).toBe("number");
  });

  it("prints null for a reading that does not exist (silence) rather than -Infinity", () => {
    const file = path.join(dir, "silence.wav");
    writeFileSync(file, encodeWav([new Float32Array(48_000)], 48_000, "16"));
    const r = runCli(file);
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ integratedLufs: null, truePeakDbtp: null });
  });

  it("exits 1 with a clear message on bad input", () => {
    const file = path.join(dir, "notes.txt");
    writeFileSync(file, "not audio at all");
    const r = runCli(file);
    expect(r.status).toBe(1);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/not a WAV file.*audio:not-wav/);
    const missing = runCli(path.join(dir, "missing.wav"));
    expect(missing.status).toBe(1);
    expect(missing.stderr).toMatch(/no such file/);
  });
});
