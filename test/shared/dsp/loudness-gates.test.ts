/**
 * The two relative gates pinned from both sides, through the whole measurement. Each signal is a
 * stereo 1 kHz tone (EBU Tech 3341/3342 style, ./loudness-test-signals.ts) with a loud part and a
 * quiet part whose level is chosen, in this file, to sit 1 LU above or 1 LU below the gate that the
 * standard's two-pass gating puts for that very signal. The expected block levels are worked out
 * here from the standard's definitions on the 100 ms sub-block grid (the level steps fall on it):
 * - integrated loudness (ITU-R BS.1770-4 §2.8 / Annex 1): 400 ms blocks every 100 ms; absolute
 *   gate −70 LUFS; relative gate Γ = (energy mean of the absolutely gated blocks) − 10 LU; the
 *   result is the energy mean of the blocks above both gates;
 * - loudness range (EBU Tech 3342): 3 s short-term windows every 100 ms; relative gate 20 LU below
 *   the energy mean of the absolutely gated windows; LRA = P95 − P10 with the percentile at 1-based
 *   index round((n − 1)·p/100 + 1).
 * A stereo 1 kHz sine of peak X dBFS reads X LUFS (EBU Tech 3341 case 1: −23 dBFS → −23 LUFS); the
 * K-weighting's gain at 1 kHz less the −0.691 dB offset leaves about 0.003 dB, and the filter's
 * transient at a level step a few thousandths more: tolerance 0.02 LU. Flipping the quiet part moves
 * the result by several LU.
 */
import { describe, expect, it } from 'vitest';
import { measureLoudness } from '../../../shared/dsp/loudness.ts';
import { steppedTone } from './loudness-test-signals.ts';

const energy = (lufs: number) => Math.pow(10, lufs / 10);
const level = (e: number) => 10 * Math.log10(e);

/** Window levels (LUFS) of a two-level signal on 100 ms sub-blocks: window of `w` sub-blocks, hop 1. */
function windowLevels(loudS: number, loudLufs: number, quietS: number, quietLufs: number, w: number): number[] {
  const sub = [...Array(Math.round(loudS * 10)).fill(energy(loudLufs)), ...Array(Math.round(quietS * 10)).fill(energy(quietLufs))];
  const out: number[] = [];
  for (let k = 0; k + w <= sub.length; k++) out.push(level(sub.slice(k, k + w).reduce((a, b) => a + b, 0) / w));
  return out;
}

/** Energy mean of the levels strictly above `threshold`. */
const meanAbove = (levels: number[], threshold: number) => level(levels.filter((l) => l > threshold).reduce((a, l) => a + energy(l), 0) / levels.filter((l) => l > threshold).length);

/** Relative gate of the standard's two-pass gating: (energy mean above −70) + gateLu. */
const relativeGate = (levels: number[], gateLu: number) => meanAbove(levels, -70) + gateLu;

/** The quiet level that sits `offsetLu` above the gate its own signal produces (bisection; q − Γ(q) rises with q). */
function quietAt(offsetLu: number, levelsOf: (q: number) => number[], gateLu: number): number {
  let lo = -69;
  let hi = -20;
  for (let i = 0; i < 100; i++) {
    const q = (lo + hi) / 2;
    if (q - relativeGate(levelsOf(q), gateLu) > offsetLu) hi = q;
    else lo = q;
  }
  return (lo + hi) / 2;
}

const stereo = (loudS: number, quietS: number, q: number) => {
  const x = steppedTone([
    [loudS, -20],
    [quietS, q],
  ]);
  return measureLoudness([x, x], 48000);
};

describe('integrated loudness: the −10 LU relative gate (BS.1770-4 §2.8)', () => {
  const blocks = (q: number) => windowLevels(10, -20, 10, q, 4);
  for (const offset of [0.5, -0.5]) {
    it(`a quiet part ${offset > 0 ? 'half a LU above the gate is kept' : 'half a LU below the gate is dropped'}`, () => {
      const q = quietAt(offset, blocks, -10);
      const levels = blocks(q);
      const gate = relativeGate(levels, -10);
      expect(q - gate).toBeCloseTo(offset, 6);
      const expected = meanAbove(levels, Math.max(gate, -70));
      const r = stereo(10, 10, q);
      expect(Math.abs(r.integratedLufs - expected)).toBeLessThan(0.02);
      // The quiet part's share decides the result: with it about −22.9 LUFS, without it about −20.
      if (offset > 0) expect(expected).toBeLessThan(-22);
      else expect(expected).toBeGreaterThan(-20.5);
    });
  }
});

describe('loudness range: the −20 LU relative gate (EBU Tech 3342)', () => {
  // 30 s loud, 15 s quiet: the quiet plateau holds more than 10 % of the windows, so P10 lies on it
  // when it is kept, and P95 lies on the loud plateau.
  const windows = (q: number) => windowLevels(30, -20, 15, q, 30);
  const lraOf = (levels: number[], gate: number) => {
    const kept = levels.filter((l) => l > Math.max(gate, -70)).sort((a, b) => a - b);
    const at = (p: number) => kept[Math.round(((kept.length - 1) * p) / 100 + 1) - 1];
    return at(95) - at(10);
  };
  for (const offset of [0.5, -0.5]) {
    it(`a quiet part ${offset > 0 ? 'half a LU above the gate is kept' : 'half a LU below the gate is dropped'}`, () => {
      const q = quietAt(offset, windows, -20);
      const levels = windows(q);
      const gate = relativeGate(levels, -20);
      expect(q - gate).toBeCloseTo(offset, 6);
      const expected = lraOf(levels, gate);
      const r = stereo(30, 15, q);
      expect(Math.abs(r.loudnessRangeLu - expected)).toBeLessThan(0.02);
      // Kept: the range spans the two plateaus (about 19 LU); dropped: only the loud plateau and the
      // upper transition windows remain.
      if (offset > 0) expect(expected).toBeGreaterThan(18);
      else expect(expected).toBeLessThan(2);
    });
  }
});
