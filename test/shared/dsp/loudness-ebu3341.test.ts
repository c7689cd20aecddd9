/**
 * EBU Tech 3341 (2016) test cases: minimum requirements for an EBU-mode loudness meter, cases 1–5,
 * 9 and 12. Signals: stereo, both channels the same 1 kHz sine at the stated peak level in dBFS,
 * 48 kHz, synthesised from the published descriptions (full lengths: the meter is fast enough).
 * Required tolerance ±0.1 LU. We also hold each result to ±0.003 LU of the [calc] value of the
 * BS.1770-4 formulas in float64 (test/fixtures/loudness/reference_values.py), which is a much
 * sharper check of the implementation; 0.003 LU covers float32 samples and summation order.
 */
import { describe, expect, it } from 'vitest';
import { measureLoudness } from '../../../shared/dsp/loudness.ts';
import { steppedTone } from './loudness-test-signals.ts';

const FS = 48000;
const stereo = (x: Float32Array) => measureLoudness([x, x], FS);

describe('EBU Tech 3341 loudness cases', () => {
  it('case 1: 20 s at −23 dBFS reads M = S = I = −23.0', () => {
    const r = stereo(steppedTone([[20, -23]]));
    // EBU Tech 3341 case 1: −23.0 ±0.1 LU; [calc] −22.9933 for all three.
    for (const v of [r.integratedLufs, r.maxMomentaryLufs, r.maxShortTermLufs]) {
      expect(Math.abs(v - -23)).toBeLessThanOrEqual(0.1);
      expect(Math.abs(v - -22.9933)).toBeLessThan(0.003);
    }
    expect(r.momentaryLufs.length).toBe(197); // (20 s − 0.4 s)/0.1 s + 1 complete 400 ms blocks
    expect(r.shortTermLufs.length).toBe(171); // (20 s − 3 s)/0.1 s + 1 complete 3 s windows
  });

  it('case 2: 20 s at −33 dBFS reads M = S = I = −33.0', () => {
    const r = stereo(steppedTone([[20, -33]]));
    // EBU Tech 3341 case 2: −33.0 ±0.1 LU; [calc] −32.9933.
    for (const v of [r.integratedLufs, r.maxMomentaryLufs, r.maxShortTermLufs]) {
      expect(Math.abs(v - -33)).toBeLessThanOrEqual(0.1);
      expect(Math.abs(v - -32.9933)).toBeLessThan(0.003);
    }
  });

  it('case 3: 10 s −36 / 60 s −23 / 10 s −36 dBFS gives I = −23.0 (relative gate drops the −36 parts)', () => {
    const r = stereo(
      steppedTone([
        [10, -36],
        [60, -23],
        [10, -36],
      ]),
    );
    // EBU Tech 3341 case 3: I = −23.0 ±0.1 LU; [calc] −23.0139.
    expect(Math.abs(r.integratedLufs - -23)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.integratedLufs - -23.0139)).toBeLessThan(0.003);
  });

  it('case 4: −72 / −36 / −23 / −36 / −72 dBFS (10, 10, 60, 10, 10 s) gives I = −23.0 (both gates act)', () => {
    const r = stereo(
      steppedTone([
        [10, -72],
        [10, -36],
        [60, -23],
        [10, -36],
        [10, -72],
      ]),
    );
    // EBU Tech 3341 case 4: I = −23.0 ±0.1 LU; [calc] −23.0139.
    expect(Math.abs(r.integratedLufs - -23)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.integratedLufs - -23.0139)).toBeLessThan(0.003);
  });

  it('case 5: 20 s −26 / 20.1 s −20 / 20 s −26 dBFS gives I = −23.0 (energy, not dB, averaging)', () => {
    const r = stereo(
      steppedTone([
        [20, -26],
        [20.1, -20],
        [20, -26],
      ]),
    );
    // EBU Tech 3341 case 5: I = −23.0 ±0.1 LU; [calc] −22.9787. A dB average would give −24.0.
    expect(Math.abs(r.integratedLufs - -23)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.integratedLufs - -22.9787)).toBeLessThan(0.003);
    // Max momentary sees the −20 dBFS part: [calc] −19.9933.
    expect(Math.abs(r.maxMomentaryLufs - -19.9933)).toBeLessThan(0.003);
  });

  it('case 9: (1.34 s −20, 1.66 s −30 dBFS) × 5 keeps S = −23.0 constant after 3 s', () => {
    const r = stereo(
      steppedTone(
        Array.from({ length: 5 }, () => [
          [1.34, -20],
          [1.66, -30],
        ]).flat() as [number, number][],
      ),
    );
    // EBU Tech 3341 case 9: S = −23.0 ±0.1 LU at every update once 3 s have passed; every complete
    // 3 s window spans one period. [calc] −22.9863 for every window.
    expect(r.shortTermLufs.length).toBe(121);
    for (const s of r.shortTermLufs) {
      expect(Math.abs(s - -23)).toBeLessThanOrEqual(0.1);
      expect(Math.abs(s - -22.9863)).toBeLessThan(0.003);
    }
  });

  it('case 12: (0.18 s −20, 0.22 s −30 dBFS) × 25 keeps M = −23.0 constant after 1 s', () => {
    const r = stereo(
      steppedTone(
        Array.from({ length: 25 }, () => [
          [0.18, -20],
          [0.22, -30],
        ]).flat() as [number, number][],
      ),
    );
    // EBU Tech 3341 case 12: M = −23.0 ±0.1 LU; every 400 ms window spans one period.
    // [calc] −22.9605 … −22.9604 over all windows.
    expect(r.momentaryLufs.length).toBe(97);
    for (const m of r.momentaryLufs) {
      expect(Math.abs(m - -23)).toBeLessThanOrEqual(0.1);
      expect(Math.abs(m - -22.9605)).toBeLessThan(0.003);
    }
  });
});
