/**
 * Our Web Audio biquad formulas (lib/audio/biquad.ts) against Chromium's own
 * BiquadFilterNode.getFrequencyResponse: every filter type, magnitude within
 * 0.01 dB on a 20 Hz–20 kHz grid. The tone-curve bands carry a linear Q; the
 * Web Audio parameters handed to Chromium come from our mapping
 * (eqBandToWebAudioParams), so lowpass/highpass get Q in dB as the spec wants.
 *
 * No app server needed: about:blank and an OfflineAudioContext at 48 kHz.
 */
import { expect, test } from "@playwright/test";
import {
  biquadResponse,
  eqBandToWebAudioParams,
  webAudioBiquad,
  type EqBandParams,
  type WebAudioBiquadParams,
} from "../../lib/audio/biquad";
import { logFrequencyGrid } from "../../lib/audio/tone-curve";

const SAMPLE_RATE = 48_000;

const eqBands: EqBandParams[] = [
  { type: "peaking", frequencyHz: 1000, gainDb: 6, q: 1 },
  { type: "peaking", frequencyHz: 63, gainDb: -9, q: 4 },
  { type: "lowshelf", frequencyHz: 120, gainDb: 4, q: 1 },
  { type: "highshelf", frequencyHz: 6000, gainDb: -5, q: 1 },
  { type: "highpass", frequencyHz: 30, gainDb: 0, q: 0.707 },
  { type: "highpass", frequencyHz: 80, gainDb: 0, q: 2 },
  { type: "lowpass", frequencyHz: 12_000, gainDb: 0, q: 0.707 },
  { type: "lowpass", frequencyHz: 150, gainDb: 0, q: 0.5 },
  { type: "notch", frequencyHz: 60, gainDb: 0, q: 8 },
];

// The spec's remaining types, with spec units directly.
const specOnly: WebAudioBiquadParams[] = [
  { type: "bandpass", frequencyHz: 2500, q: 1.5, gainDb: 0, sampleRate: SAMPLE_RATE },
  { type: "allpass", frequencyHz: 700, q: 0.8, gainDb: 0, sampleRate: SAMPLE_RATE },
];

interface ChromiumCase {
  type: string;
  frequency: number;
  Q: number;
  gain: number;
}

test("Chromium BiquadFilterNode.getFrequencyResponse matches lib/audio/biquad within 0.01 dB", async ({ page }) => {
  await page.goto("about:blank");
  const params = [...eqBands.map((b) => eqBandToWebAudioParams(b, SAMPLE_RATE)), ...specOnly];
  const grid = Array.from(logFrequencyGrid(20, 20_000, 24));
  const cases: ChromiumCase[] = params.map((p) => ({ type: p.type, frequency: p.frequencyHz, Q: p.q, gain: p.gainDb }));

  const chromium = await page.evaluate(
    ({ cases, grid, sampleRate }) => {
      const ctx = new OfflineAudioContext(1, 128, sampleRate);
      const freqs = Float32Array.from(grid);
      return cases.map((c) => {
        const node = new BiquadFilterNode(ctx, { type: c.type as BiquadFilterType, frequency: c.frequency, Q: c.Q, gain: c.gain });
        const mag = new Float32Array(freqs.length);
        const phase = new Float32Array(freqs.length);
        node.getFrequencyResponse(freqs, mag, phase);
        return { mag: Array.from(mag), freqs: Array.from(freqs) };
      });
    },
    { cases, grid, sampleRate: SAMPLE_RATE },
  );

  let worst = 0;
  params.forEach((p, i) => {
    const coefficients = webAudioBiquad(p);
    const { mag, freqs } = chromium[i]!;
    freqs.forEach((f, k) => {
      // Chromium reports at the float32-rounded frequency; evaluate ours there too.
      const oursDb = biquadResponse(coefficients, f, SAMPLE_RATE).magnitudeDb;
      const theirsDb = 20 * Math.log10(mag[k]!);
      const label = `${p.type} ${p.frequencyHz} Hz Q ${p.q} gain ${p.gainDb} at ${f.toFixed(2)} Hz: ours ${oursDb.toFixed(4)} dB, Chromium ${theirsDb.toFixed(4)} dB`;
      if (oursDb < -60) {
        // Deep in a notch or stop band float32 rounding dominates; both must still be deep.
        expect(theirsDb, label).toBeLessThan(-50);
      } else {
        expect(Math.abs(oursDb - theirsDb), label).toBeLessThan(0.01);
        worst = Math.max(worst, Math.abs(oursDb - theirsDb));
      }
    });
  });
  test.info().annotations.push({ type: "largest difference", description: `${worst.toExponential(2)} dB` });
});
