// WAV files are written by the `wavefile` package (an independent encoder) and read back by
// lib/audio/decode.ts. Expected sample values follow the usual integer-to-float convention
// full scale = 2^(bits-1) (e.g. int16 / 32768), which is our documented choice.
import { describe, expect, it } from "vitest";
import { AudioDecodeError, decodeWav, readWavHeader } from "@/lib/audio/decode";
import { WaveFile } from "./signals";

function intSamples(count: number, bits: number, seed: number): number[] {
  const max = 2 ** (bits - 1);
  const out: number[] = [];
  let s = seed;
  for (let i = 0; i < count; i++) {
    s = (s * 1103515245 + 12345) % 2147483648;
    out.push(Math.floor((s / 2147483648) * 2 * max) - max); // -max … max-1, extremes included over time
  }
  out[0] = -max;
  out[1] = max - 1;
  return out;
}

function writeWav(channels: number[][], rate: number, code: string): Uint8Array {
  const w = new WaveFile();
  w.fromScratch(channels.length, rate, code, channels);
  return w.toBuffer();
}

/**
 * Rewrites a PCM file written by wavefile with a 40-byte
 * WAVE_FORMAT_EXTENSIBLE fmt chunk: tag 0xFFFE, cbSize 22, valid bits, channel
 * mask and the KSDATAFORMAT_SUBTYPE_PCM GUID 00000001-0000-0010-8000-00AA00389B71
 * (Microsoft WAVEFORMATEXTENSIBLE layout, recalled from memory).
 */
function toExtensible(pcm: Uint8Array, channelMask: number): Uint8Array {
  const src = new DataView(pcm.buffer, pcm.byteOffset, pcm.byteLength);
  // wavefile writes RIFF, then `fmt ` (16 or 40 bytes), then `data`: find the data chunk.
  let dataAt = 12;
  while (String.fromCharCode(...pcm.subarray(dataAt, dataAt + 4)) !== "data") dataAt += 8 + src.getUint32(dataAt + 4, true);
  const dataBytes = src.getUint32(dataAt + 4, true);
  const out = new Uint8Array(12 + 8 + 40 + 8 + dataBytes);
  const v = new DataView(out.buffer);
  const ascii = (at: number, s: string) => [...s].forEach((ch, i) => v.setUint8(at + i, ch.charCodeAt(0)));
  ascii(0, "RIFF");
  v.setUint32(4, out.length - 8, true);
  ascii(8, "WAVE");
  ascii(12, "fmt ");
  v.setUint32(16, 40, true);
  v.setUint16(20, 0xfffe, true);
  for (const off of [22, 24, 28, 32, 34]) {
    // channels, rate, byte rate, block align, bits: same values as the PCM header
    if (off === 24 || off === 28) v.setUint32(off, src.getUint32(off, true), true);
    else v.setUint16(off, src.getUint16(off, true), true);
  }
  v.setUint16(36, 22, true);
  v.setUint16(38, src.getUint16(34, true), true);
  v.setUint32(40, channelMask, true);
  [0x01, 0x00, 0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71].forEach((b, i) => v.setUint8(44 + i, b));
  ascii(60, "data");
  v.setUint32(64, dataBytes, true);
  out.set(pcm.subarray(dataAt + 8, dataAt + 8 + dataBytes), 68);
  return out;
}

function expectCode(fn: () => unknown, code: string): void {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(AudioDecodeError);
    expect((error as AudioDecodeError).code).toBe(code);
    return;
  }
  throw new Error(`expected ${code}`);
}

describe("decodeWav round trips", () => {
  const rates = [44_100, 48_000, 96_000];
  for (const bits of [16, 24, 32]) {
    for (const channelCount of [1, 2]) {
      it(`${bits}-bit PCM, ${channelCount} ch at ${rates.join("/")} Hz`, () => {
        for (const rate of rates) {
          const data = Array.from({ length: channelCount }, (_, c) => intSamples(500, bits, 7 + c + bits));
          const wav = decodeWav(writeWav(data, rate, String(bits)));
          expect(wav).toMatchObject({ sampleRate: rate, bitDepth: bits, format: "pcm-int" });
          expect(wav.channels).toHaveLength(channelCount);
          expect(wav.durationSeconds).toBeCloseTo(500 / rate, 12);
          const fullScale = 2 ** (bits - 1);
          data.forEach((ch, c) => ch.forEach((v, i) => expect(wav.channels[c]![i]).toBe(Math.fround(v / fullScale))));
        }
      });
    }
  }

  it("6 channels (5.1) in WAVE_FORMAT_EXTENSIBLE, 24-bit", () => {
    const data = Array.from({ length: 6 }, (_, c) => intSamples(200, 24, 40 + c));
    const wav = decodeWav(toExtensible(writeWav(data, 48_000, "24"), 0x3f));
    expect(wav).toMatchObject({ bitDepth: 24, format: "pcm-int", sampleRate: 48_000 });
    expect(wav.channels).toHaveLength(6);
    data.forEach((ch, c) => ch.forEach((v, i) => expect(wav.channels[c]![i]).toBe(v / 8388608)));
  });

  it("32-bit float, mono and stereo", () => {
    for (const channelCount of [1, 2]) {
      const data = Array.from({ length: channelCount }, (_, c) => Array.from({ length: 300 }, (_, i) => Math.fround(Math.sin(i * 0.1 + c) * 0.9)));
      const wav = decodeWav(writeWav(data, 48_000, "32f"));
      expect(wav).toMatchObject({ sampleRate: 48_000, bitDepth: 32, format: "float" });
      data.forEach((ch, c) => ch.forEach((v, i) => expect(wav.channels[c]![i]).toBe(v)));
    }
  });
});

describe("decodeWav errors", () => {
  const good = writeWav([intSamples(4800, 16, 1), intSamples(4800, 16, 2)], 48_000, "16");

  it("truncated data chunk → audio:truncated", () => {
    expectCode(() => decodeWav(good.subarray(0, good.length - 1001)), "audio:truncated");
    expectCode(() => decodeWav(good.subarray(0, 30)), "audio:truncated"); // ends inside fmt
    expectCode(() => decodeWav(good.subarray(0, 8)), "audio:truncated"); // ends inside RIFF header
  });

  it("non-WAV bytes → audio:not-wav", () => {
    expectCode(() => decodeWav(new TextEncoder().encode("ID3\u0004 this is an mp3, honest")), "audio:not-wav");
    expectCode(() => decodeWav(new Uint8Array(0)), "audio:not-wav");
  });

  it("unsupported encodings, bit depths, rates and channel counts → audio:unsupported-format", () => {
    expectCode(() => decodeWav(writeWav([intSamples(100, 8, 3).map((v) => v + 128)], 48_000, "8")), "audio:unsupported-format");
    const alaw = new WaveFile();
    alaw.fromScratch(1, 48_000, "16", intSamples(100, 16, 4));
    alaw.toALaw();
    expectCode(() => decodeWav(alaw.toBuffer()), "audio:unsupported-format");
    expectCode(() => decodeWav(writeWav([intSamples(100, 16, 5)], 22_050, "16")), "audio:unsupported-format");
    const nine = Array.from({ length: 9 }, (_, c) => intSamples(10, 16, c));
    expectCode(() => decodeWav(writeWav(nine, 48_000, "16")), "audio:unsupported-format");
    expectCode(() => decodeWav(writeWav([Array.from({ length: 10 }, () => 0.1)], 48_000, "64")), "audio:unsupported-format");
  });

  it("over-long clips → audio:too-long, from the header alone", () => {
    expectCode(() => decodeWav(good, { maxDurationSeconds: 0.05 }), "audio:too-long");
    // A 44-byte prefix is enough: the header declares 4800 frames = 0.1 s.
    expectCode(() => readWavHeader(good.subarray(0, 44), { maxDurationSeconds: 0.05 }, { partial: true }), "audio:too-long");
    expect(readWavHeader(good.subarray(0, 44), {}, { partial: true })).toMatchObject({ frameCount: 4800, sampleRate: 48_000 });
  });

  it("oversized files → audio:too-large (default 64 MiB)", () => {
    expectCode(() => decodeWav(good, { maxBytes: 1024 }), "audio:too-large");
    expectCode(() => decodeWav(new Uint8Array(64 * 1024 * 1024 + 1)), "audio:too-large");
  });
});
