// The parts of shared/dsp/pitch.ts that work block by block: the decimation cascade (decimate) and
// the pitch track reading its decimated signal as it is made, over clips long enough for many blocks.
import { describe, expect, it } from 'vitest';
import { decimate, decimationFilter } from '../../../shared/dsp/decimate.ts';
import { yinPitchTrack } from '../../../shared/dsp/pitch.ts';

/** Reference: y[m] = Σₖ h[k]·x[m·q + k − (K−1)/2] over the whole signal, zeros outside, rounded to float32. */
function firWhole(x: ArrayLike<number>, q: number, h: Float64Array): Float32Array {
  const half = (h.length - 1) / 2;
  const out = new Float32Array(Math.ceil(x.length / q));
  for (let m = 0; m < out.length; m++) {
    let acc = 0;
    for (let k = 0; k < h.length; k++) {
      const i = m * q + k - half;
      if (i >= 0 && i < x.length) acc += h[k] * x[i];
    }
    out[m] = acc;
  }
  return out;
}

/** Reference cascade: the stages decimate documents (half-band stages for a power of two, else one stage). */
function decimateWhole(x: Float32Array, q: number): Float32Array {
  if ((q & (q - 1)) !== 0) return firWhole(x, q, decimationFilter(q));
  const stages = Math.round(Math.log2(q));
  let y: Float32Array = x;
  for (let i = 1; i <= stages; i++) y = firWhole(y, 2, decimationFilter(2, 1 - 0.4 * 2 ** (i - stages)));
  return y;
}

describe('decimate runs its cascade in blocks with the values of whole-signal stages', () => {
  // 100 003 samples: several 8192-output blocks and a ragged end. Tolerance 1e-6 FS: the reference
  // sums the taps in another order, so a stage output may differ by one float32 step (≤ 6e-8 at
  // these levels), which the next stage carries on; anything structural (a lost block edge, a
  // shifted sample) is ≥ 1e-3.
  const x = Float32Array.from({ length: 100_003 }, (_, i) => 0.6 * Math.sin(0.013 * i) + 0.3 * Math.sin(1.9 * i) + (i % 977 === 0 ? 0.5 : 0));
  for (const q of [2, 3, 4, 8]) {
    it(`q = ${q}`, () => {
      const got = decimate(x, q);
      const want = decimateWhole(x, q);
      expect(got).toHaveLength(want.length);
      let worst = 0;
      for (let m = 0; m < got.length; m++) worst = Math.max(worst, Math.abs(got[m] - want[m]));
      expect(worst).toBeLessThan(1e-6);
    });
  }
});

describe('yinPitchTrack on a long clip (its decimated signal made and dropped as it is read)', () => {
  it('40 s of notes of 1 s each, 110…880 Hz: every frame inside a note reads it within 0.5 %', () => {
    // Reference pitch: the synthesised notes' own frequencies (exact by construction); 0.5 % is the
    // tolerance of pitch.test.ts (de Cheveigné & Kawahara 2002 method, this module's measured error ≤ 0.3 %).
    const fs = 44100;
    const notes = [110, 220, 440, 880, 330];
    const x = new Float32Array(40 * fs);
    let phase = 0;
    for (let i = 0; i < x.length; i++) {
      phase += (2 * Math.PI * notes[Math.floor(i / fs) % notes.length]) / fs;
      x[i] = 0.4 * Math.sin(phase) + 0.15 * Math.sin(2 * phase);
    }
    const t = yinPitchTrack(x, fs, { hopS: 0.02 });
    expect(t.f0Hz.length).toBeGreaterThan(1900);
    let checked = 0;
    for (let f = 0; f < t.f0Hz.length; f++) {
      // the frame's analysed span is about ±30 ms around its time; skip frames near a note change
      const s = t.timesS[f];
      if (Math.abs(s - Math.round(s)) < 0.06) continue;
      const hz = notes[Math.floor(s) % notes.length];
      expect(Math.abs(t.f0Hz[f] / hz - 1)).toBeLessThan(0.005);
      checked++;
    }
    expect(checked).toBeGreaterThan(1500);
  });
});
