/**
 * WAV decoding for uploaded clips. The RIFF/WAVE structure (chunks, `fmt `
 * fields, WAVE_FORMAT_EXTENSIBLE) is parsed by the `wavefile` package; the
 * sample words are then converted with a DataView in one tight loop per
 * format, because wavefile's generic per-sample unpacking is too slow for
 * minutes of audio.
 *
 * Accepted: PCM 16/24/32-bit integer and 32-bit IEEE float, 1–8 channels,
 * 32–192 kHz (any integer rate in that range, so 44.1/48/96 kHz and the
 * usual others). Limits (size, duration) are checked from the header before
 * any sample is converted, so a bad upload costs no sample memory; with
 * `readWavHeader` a caller can check the first few KiB of an upload before
 * reading the rest.
 */

import * as wavefileModule from "wavefile";

type WaveFileClass = typeof wavefileModule.WaveFile;

/**
 * Node loads wavefile's CommonJS build (the class sits on the default export),
 * bundlers its ES module build (a named export); accept both.
 */
function waveFileClass(): WaveFileClass {
  const named: unknown = Reflect.get(wavefileModule, "WaveFile");
  if (typeof named === "function") return named as WaveFileClass;
  const fallback: unknown = Reflect.get(wavefileModule, "default");
  const viaDefault: unknown = typeof fallback === "object" && fallback !== null ? Reflect.get(fallback, "WaveFile") : undefined;
  if (typeof viaDefault === "function") return viaDefault as WaveFileClass;
  throw new Error("wavefile: WaveFile class not found");
}

export type AudioDecodeErrorCode =
  | "audio:not-wav"
  | "audio:truncated"
  | "audio:malformed"
  | "audio:unsupported-format"
  | "audio:too-long"
  | "audio:too-large";

export class AudioDecodeError extends Error {
  readonly code: AudioDecodeErrorCode;
  constructor(code: AudioDecodeErrorCode, message: string) {
    super(message);
    this.name = "AudioDecodeError";
    this.code = code;
  }
}

export interface DecodeLimits {
  /** Whole file, bytes. Default 64 MiB. */
  readonly maxBytes?: number;
  /** Default 600 s (10 min). */
  readonly maxDurationSeconds?: number;
}

export const DEFAULT_MAX_BYTES = 64 * 1024 * 1024;
export const DEFAULT_MAX_DURATION_SECONDS = 600;
export const MIN_WAV_SAMPLE_RATE = 32_000;
export const MAX_WAV_SAMPLE_RATE = 192_000;
export const MAX_WAV_CHANNELS = 8;

export type WavSampleFormat = "pcm-int" | "float";

export interface WavHeader {
  readonly sampleRate: number;
  readonly channelCount: number;
  readonly bitDepth: 16 | 24 | 32;
  readonly format: WavSampleFormat;
  readonly blockAlign: number;
  readonly littleEndian: boolean;
  /** Byte offset of the first sample in the file. */
  readonly dataOffset: number;
  /** Bytes of sample data the header declares. */
  readonly dataBytes: number;
  readonly frameCount: number;
  readonly durationSeconds: number;
}

export interface DecodedWav {
  readonly sampleRate: number;
  readonly channels: Float32Array[];
  readonly bitDepth: 16 | 24 | 32;
  readonly format: WavSampleFormat;
  readonly durationSeconds: number;
}

const WAVE_FORMAT_PCM = 1;
const WAVE_FORMAT_IEEE_FLOAT = 3;
const WAVE_FORMAT_EXTENSIBLE = 0xfffe;

interface ChunkLocation {
  /** Offset of the chunk's payload. */
  start: number;
  size: number;
}

/**
 * Locates the `fmt ` and `data` payloads by walking the RIFF chunk headers.
 * wavefile parses the fields but does not expose chunk offsets in its
 * published build, and its per-sample decoding is too slow for long clips.
 */
function locateChunks(bytes: Uint8Array, littleEndian: boolean): { fmt?: ChunkLocation; data?: ChunkLocation; cut: boolean } {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let pos = 12;
  let fmt: ChunkLocation | undefined;
  let data: ChunkLocation | undefined;
  while (pos + 8 <= bytes.length) {
    const id = ascii(bytes, pos, 4);
    const size = view.getUint32(pos + 4, littleEndian);
    const loc = { start: pos + 8, size };
    if (id === "fmt " && !fmt) fmt = loc;
    if (id === "data" && !data) {
      data = loc;
      break; // samples follow; anything after them is irrelevant here
    }
    pos += 8 + size + (size % 2);
  }
  // Cut short: a chunk header or the fmt payload lies past the end of the bytes.
  const cut = pos + 8 > bytes.length && !data ? true : fmt !== undefined && fmt.start + Math.min(fmt.size, 16) > bytes.length;
  return { fmt, data, cut };
}

interface ParsedFmt {
  audioFormat: number;
  numChannels: number;
  sampleRate: number;
  blockAlign: number;
  bitsPerSample: number;
  validBitsPerSample?: number;
  subformat?: number[];
}

function ascii(bytes: Uint8Array, start: number, length: number): string {
  let s = "";
  for (let i = start; i < start + length && i < bytes.length; i++) s += String.fromCharCode(bytes[i]!);
  return s;
}

function readFmt(wav: object): ParsedFmt {
  const fmt: unknown = Reflect.get(wav, "fmt");
  const num = (key: string): number => {
    const v: unknown = typeof fmt === "object" && fmt !== null ? Reflect.get(fmt, key) : undefined;
    return typeof v === "number" ? v : NaN;
  };
  const subformat: unknown = typeof fmt === "object" && fmt !== null ? Reflect.get(fmt, "subformat") : undefined;
  return {
    audioFormat: num("audioFormat"),
    numChannels: num("numChannels"),
    sampleRate: num("sampleRate"),
    blockAlign: num("blockAlign"),
    bitsPerSample: num("bitsPerSample"),
    validBitsPerSample: Number.isFinite(num("validBitsPerSample")) ? num("validBitsPerSample") : undefined,
    subformat: Array.isArray(subformat) ? subformat.filter((v): v is number => typeof v === "number") : undefined,
  };
}

/**
 * Parses and validates the header. Works on a prefix of the file too (the
 * declared data size is used), so callers can reject an upload early.
 */
export function readWavHeader(bytes: Uint8Array, limits: DecodeLimits = {}, opts: { partial?: boolean } = {}): WavHeader {
  const maxBytes = limits.maxBytes ?? DEFAULT_MAX_BYTES;
  const maxDuration = limits.maxDurationSeconds ?? DEFAULT_MAX_DURATION_SECONDS;
  if (!opts.partial && bytes.length > maxBytes) {
    throw new AudioDecodeError("audio:too-large", `The file is ${bytes.length} bytes; the limit is ${maxBytes} bytes.`);
  }
  const container = ascii(bytes, 0, 4);
  if (bytes.length < 12) {
    if (container.length > 0 && "RIFF".startsWith(container) || container === "RIFX") {
      throw new AudioDecodeError("audio:truncated", "The file ends inside the RIFF header.");
    }
    throw new AudioDecodeError("audio:not-wav", "This is not a WAV file (no RIFF/WAVE header).");
  }
  if ((container !== "RIFF" && container !== "RIFX") || ascii(bytes, 8, 4) !== "WAVE") {
    const hint = container === "RF64" ? " RF64 files are not supported." : "";
    throw new AudioDecodeError("audio:not-wav", `This is not a WAV file (no RIFF/WAVE header).${hint}`);
  }

  const littleEndian = container === "RIFF";
  const located = locateChunks(bytes, littleEndian);
  if (!located.fmt || !located.data) {
    if (located.cut) {
      throw new AudioDecodeError("audio:truncated", "The WAV file is incomplete: it ends before its fmt or data chunk.");
    }
    throw new AudioDecodeError("audio:malformed", `The WAV file has no ${located.fmt ? "data" : "fmt "} chunk.`);
  }
  if (located.cut) throw new AudioDecodeError("audio:truncated", "The WAV file ends inside its fmt chunk.");

  const WaveFile = waveFileClass();
  const wav = new WaveFile();
  try {
    // Header only (second argument false): no sample bytes are copied.
    wav.fromBuffer(bytes, false);
  } catch (error) {
    const detail = error instanceof Error ? error.message : String(error);
    throw new AudioDecodeError("audio:malformed", `The WAV header could not be read (${detail}).`);
  }

  const fmt = readFmt(wav);
  let formatTag = fmt.audioFormat;
  if (formatTag === WAVE_FORMAT_EXTENSIBLE) {
    // The first 32 bits of the SubFormat GUID carry the real format tag.
    formatTag = fmt.subformat?.[0] ?? NaN;
  }
  let format: WavSampleFormat;
  if (formatTag === WAVE_FORMAT_PCM) format = "pcm-int";
  else if (formatTag === WAVE_FORMAT_IEEE_FLOAT) format = "float";
  else {
    throw new AudioDecodeError(
      "audio:unsupported-format",
      `WAV encoding ${Number.isFinite(formatTag) ? `0x${formatTag.toString(16)}` : "unknown"} is not supported; use PCM (16/24/32-bit) or 32-bit float.`,
    );
  }
  const bits = fmt.bitsPerSample;
  const okBits = format === "float" ? bits === 32 : bits === 16 || bits === 24 || bits === 32;
  if (!okBits) {
    const what = format === "float" ? `${bits}-bit float` : `${bits}-bit PCM`;
    throw new AudioDecodeError("audio:unsupported-format", `${what} is not supported; use PCM 16/24/32-bit or 32-bit float.`);
  }
  const channelCount = fmt.numChannels;
  if (!Number.isInteger(channelCount) || channelCount < 1) {
    throw new AudioDecodeError("audio:malformed", "The WAV header declares no channels.");
  }
  if (channelCount > MAX_WAV_CHANNELS) {
    throw new AudioDecodeError("audio:unsupported-format", `${channelCount} channels; at most ${MAX_WAV_CHANNELS} are supported.`);
  }
  const sampleRate = fmt.sampleRate;
  if (!Number.isInteger(sampleRate) || sampleRate < MIN_WAV_SAMPLE_RATE || sampleRate > MAX_WAV_SAMPLE_RATE) {
    throw new AudioDecodeError(
      "audio:unsupported-format",
      `Sample rate ${sampleRate} Hz is not supported; use ${MIN_WAV_SAMPLE_RATE / 1000}–${MAX_WAV_SAMPLE_RATE / 1000} kHz (e.g. 44.1, 48 or 96 kHz).`,
    );
  }
  const blockAlign = (channelCount * bits) / 8;
  if (fmt.blockAlign !== blockAlign) {
    throw new AudioDecodeError("audio:malformed", `Block align ${fmt.blockAlign} does not match ${channelCount} × ${bits} bits.`);
  }

  const dataOffset = located.data.start;
  const dataBytes = located.data.size;
  const frameCount = Math.floor(dataBytes / blockAlign);
  const durationSeconds = frameCount / sampleRate;
  if (durationSeconds > maxDuration) {
    throw new AudioDecodeError(
      "audio:too-long",
      `The clip is ${durationSeconds.toFixed(1)} s long; the limit is ${maxDuration} s.`,
    );
  }
  if (!opts.partial && dataOffset + dataBytes > bytes.length) {
    throw new AudioDecodeError(
      "audio:truncated",
      `The data chunk declares ${dataBytes} bytes but only ${Math.max(0, bytes.length - dataOffset)} are present.`,
    );
  }
  if (dataBytes % blockAlign !== 0) {
    throw new AudioDecodeError("audio:truncated", "The data chunk ends in the middle of a sample frame.");
  }
  return {
    sampleRate,
    channelCount,
    bitDepth: bits === 16 ? 16 : bits === 24 ? 24 : 32,
    format,
    blockAlign,
    littleEndian,
    dataOffset,
    dataBytes,
    frameCount,
    durationSeconds,
  };
}

export interface DecodeOptions {
  /**
   * Allocates each channel's samples, e.g. on a SharedArrayBuffer so a worker
   * thread can read them without a copy. Default: a plain Float32Array.
   */
  readonly allocate?: (frameCount: number) => Float32Array;
}

/** Decodes a whole WAV file to one Float32Array per channel, full scale = ±1.0. */
export function decodeWav(bytes: Uint8Array, limits: DecodeLimits = {}, opts: DecodeOptions = {}): DecodedWav {
  const header = readWavHeader(bytes, limits);
  const { channelCount, frameCount, blockAlign, dataOffset, littleEndian: le, bitDepth, format } = header;
  const allocate = opts.allocate ?? ((n: number) => new Float32Array(n));
  const channels = Array.from({ length: channelCount }, () => allocate(frameCount));
  const view = new DataView(bytes.buffer, bytes.byteOffset + dataOffset, frameCount * blockAlign);
  const bytesPerSample = bitDepth / 8;
  if (format === "pcm-int" && bitDepth === 24) {
    decodePcm24(bytes, dataOffset, frameCount, blockAlign, le, channels);
  } else if (format === "pcm-int" && bitDepth === 16 && le && channelCount === 2) {
    decodePcm16Stereo(view, frameCount, channels[0]!, channels[1]!);
  } else {
    for (let c = 0; c < channelCount; c++) {
      const out = channels[c]!;
      let pos = c * bytesPerSample;
      if (format === "float") {
        for (let i = 0; i < frameCount; i++, pos += blockAlign) out[i] = view.getFloat32(pos, le);
      } else if (bitDepth === 16) {
        for (let i = 0; i < frameCount; i++, pos += blockAlign) out[i] = view.getInt16(pos, le) / 32768;
      } else {
        for (let i = 0; i < frameCount; i++, pos += blockAlign) out[i] = view.getInt32(pos, le) / 2147483648;
      }
    }
  }
  return { sampleRate: header.sampleRate, channels, bitDepth, format, durationSeconds: header.durationSeconds };
}

/**
 * 24-bit PCM, the usual format of measurement clips: one sequential pass over
 * the bytes (frame by frame, every channel), assembling each word from three
 * byte reads rather than three DataView calls.
 */
function decodePcm24(
  bytes: Uint8Array,
  dataOffset: number,
  frameCount: number,
  blockAlign: number,
  le: boolean,
  channels: Float32Array[],
): void {
  const channelCount = channels.length;
  const scale = 1 / 8388608;
  if (channelCount === 2 && le) {
    const left = channels[0]!;
    const right = channels[1]!;
    for (let i = 0, p = dataOffset; i < frameCount; i++, p += 6) {
      // Assemble as a signed 32-bit word, then shift back down to keep the sign.
      left[i] = (((bytes[p + 2]! << 24) | (bytes[p + 1]! << 16) | (bytes[p]! << 8)) >> 8) * scale;
      right[i] = (((bytes[p + 5]! << 24) | (bytes[p + 4]! << 16) | (bytes[p + 3]! << 8)) >> 8) * scale;
    }
    return;
  }
  for (let i = 0, frame = dataOffset; i < frameCount; i++, frame += blockAlign) {
    for (let c = 0, p = frame; c < channelCount; c++, p += 3) {
      const word = le
        ? (bytes[p + 2]! << 24) | (bytes[p + 1]! << 16) | (bytes[p]! << 8)
        : (bytes[p]! << 24) | (bytes[p + 1]! << 16) | (bytes[p + 2]! << 8);
      channels[c]![i] = (word >> 8) * scale;
    }
  }
}

/** 16-bit little-endian stereo through one Int16 view when the data is 2-byte aligned. */
function decodePcm16Stereo(view: DataView, frameCount: number, left: Float32Array, right: Float32Array): void {
  const scale = 1 / 32768;
  if ((view.byteOffset & 1) === 0 && new Uint8Array(new Uint16Array([1]).buffer)[0] === 1) {
    const words = new Int16Array(view.buffer, view.byteOffset, frameCount * 2);
    for (let i = 0, p = 0; i < frameCount; i++, p += 2) {
      left[i] = words[p]! * scale;
      right[i] = words[p + 1]! * scale;
    }
    return;
  }
  for (let i = 0, pos = 0; i < frameCount; i++, pos += 4) {
    left[i] = view.getInt16(pos, true) * scale;
    right[i] = view.getInt16(pos + 2, true) * scale;
  }
}
