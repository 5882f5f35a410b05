/**
 * `npm run -s loudness -- FILE.wav` prints the BS.1770-4 / EBU R 128
 * measurement of a WAV file as JSON on stdout. Values that have no finite
 * reading (e.g. the integrated loudness of silence, -Infinity) print as null.
 * Bad input: a one-line message on stderr and exit code 1.
 */

import { readFile, stat } from "node:fs/promises";
import { AudioDecodeError, decodeWav, DEFAULT_MAX_BYTES } from "../audio/decode";
import { measureLoudness } from "../audio/loudness";

const USAGE = "usage: npm run -s loudness -- FILE.wav";

async function main(argv: string[]): Promise<number> {
  const args = argv.filter((a) => a !== "--");
  if (args.length !== 1 || args[0] === "-h" || args[0] === "--help") {
    process.stderr.write(`${USAGE}\n`);
    return args[0] === "-h" || args[0] === "--help" ? 0 : 1;
  }
  const file = args[0]!;
  try {
    // Refuse an oversized file before reading it into memory.
    const info = await stat(file);
    if (!info.isFile()) throw new Error(`${file} is not a file`);
    if (info.size > DEFAULT_MAX_BYTES) {
      throw new AudioDecodeError("audio:too-large", `The file is ${info.size} bytes; the limit is ${DEFAULT_MAX_BYTES} bytes.`);
    }
    const bytes = new Uint8Array(await readFile(file));
    const wav = decodeWav(bytes);
    const m = measureLoudness(wav.channels, wav.sampleRate);
    const output = {
      file,
      integratedLufs: m.integratedLufs,
      loudnessRangeLu: m.loudnessRangeLu,
      maxMomentaryLufs: m.maxMomentaryLufs,
      maxShortTermLufs: m.maxShortTermLufs,
      samplePeakDbfs: m.samplePeakDbfs,
      truePeakDbtp: m.truePeakDbtp,
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
  }
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (error: unknown) => {
    process.stderr.write(`loudness: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exitCode = 1;
  },
);
