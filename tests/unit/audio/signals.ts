/**
 * Test-signal helpers for the audio unit tests (not a test file itself).
 * Levels are per-channel sine peak levels in dBFS, as EBU Tech 3341/3342
 * state them ("stereo sine 1 kHz at -23 dBFS": the same tone, in phase, on
 * both channels).
 */

import * as wavefileModule from "wavefile";

type WaveFileClass = typeof wavefileModule.WaveFile;

/** wavefile's CommonJS build puts the class on the default export under Node. */
export const WaveFile: WaveFileClass =
  (Reflect.get(wavefileModule, "WaveFile") as WaveFileClass | undefined) ??
  (Reflect.get(wavefileModule, "default") as { WaveFile: WaveFileClass }).WaveFile;

export function dbToAmp(db: number): number {
  return Math.pow(10, db / 20);
}

export interface Segment {
  readonly levelDbfs: number;
  readonly seconds: number;
}

/** Concatenated sine segments with continuous phase. */
export function toneSequence(
  segments: readonly Segment[],
  sampleRate: number,
  frequencyHz = 1000,
  phaseRad = 0,
): Float32Array {
  const total = segments.reduce((n, s) => n + Math.round(s.seconds * sampleRate), 0);
  const out = new Float32Array(total);
  let i = 0;
  for (const s of segments) {
    const amp = dbToAmp(s.levelDbfs);
    const end = i + Math.round(s.seconds * sampleRate);
    for (; i < end; i++) out[i] = amp * Math.sin((2 * Math.PI * frequencyHz * i) / sampleRate + phaseRad);
  }
  return out;
}

export function tone(levelDbfs: number, seconds: number, sampleRate: number, frequencyHz = 1000, phaseRad = 0): Float32Array {
  return toneSequence([{ levelDbfs, seconds }], sampleRate, frequencyHz, phaseRad);
}

/**
 * Tech 3341 true-peak style tone: amplitude (linear) at a fraction of fs with
 * a phase in degrees. `fadeSeconds` applies raised-cosine fades: an abrupt
 * start from digital silence is itself a broadband transient whose
 * inter-sample overshoot (Gibbs) depends on the interpolator, so the steady
 * tone the case describes is measured with short fades.
 */
export function fractionalTone(
  amplitude: number,
  fractionOfFs: number,
  phaseDeg: number,
  seconds: number,
  sampleRate: number,
  fadeSeconds = 0,
): Float32Array {
  const n = Math.round(seconds * sampleRate);
  const out = new Float32Array(n);
  const phase = (phaseDeg * Math.PI) / 180;
  const fade = Math.round(fadeSeconds * sampleRate);
  for (let i = 0; i < n; i++) {
    let gain = 1;
    if (i < fade) gain = 0.5 - 0.5 * Math.cos((Math.PI * i) / fade);
    else if (i >= n - fade) gain = 0.5 - 0.5 * Math.cos((Math.PI * (n - 1 - i)) / fade);
    out[i] = gain * amplitude * Math.sin(2 * Math.PI * fractionOfFs * i + phase);
  }
  return out;
}

/** Deterministic pseudo-random generator (mulberry32) so noise tests repeat exactly. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Noise with a slow loudness swell, a stand-in for programme material. */
export function programmeLikeNoise(seconds: number, sampleRate: number, seed: number, peakDbfs = -6): Float32Array {
  const rnd = seededRandom(seed);
  const n = Math.round(seconds * sampleRate);
  const out = new Float32Array(n);
  let lp = 0;
  const amp = dbToAmp(peakDbfs);
  for (let i = 0; i < n; i++) {
    // One-pole low-pass (~3 kHz) tilts the spectrum towards programme-like balance.
    lp += 0.35 * (rnd() * 2 - 1 - lp);
    const swell = 0.55 + 0.45 * Math.sin((2 * Math.PI * i) / (sampleRate * 7.3));
    out[i] = amp * swell * lp;
  }
  return out;
}

export type WavBitDepthCode = "16" | "24" | "32" | "32f";

/** Encodes channels with wavefile (integer codes expect scaled integers). */
export function encodeWav(channels: readonly Float32Array[], sampleRate: number, bitDepth: WavBitDepthCode = "32f"): Uint8Array {
  const wav = new WaveFile();
  const scale = bitDepth === "32f" ? 1 : bitDepth === "16" ? 32767 : bitDepth === "24" ? 8388607 : 2147483647;
  const data = channels.map((ch) => (scale === 1 ? Array.from(ch) : Array.from(ch, (v) => Math.round(v * scale))));
  wav.fromScratch(channels.length, sampleRate, bitDepth, data);
  return wav.toBuffer();
}
