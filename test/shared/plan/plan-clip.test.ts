import { describe, expect, it } from 'vitest';
import { computeFrameStats } from '../../../shared/dsp/frame-stats.ts';
import { magnitudeHistogram } from '../../../shared/dsp/histogram.ts';
import type { PitchTrack } from '../../../shared/dsp/pitch.ts';
import { toPlanClip } from '../../../shared/plan/plan-clip.ts';

const FS = 48000;

/** 0.1 s: a 1 kHz sine whose negative half grows from −0.1 to −1.0 while the positive half stays at 0.5. */
function clip() {
  const n = FS / 10;
  const x = Float32Array.from({ length: n }, (_, i) => {
    const s = Math.sin((2 * Math.PI * 1000 * i) / FS);
    return s >= 0 ? 0.5 * s : (0.1 + (0.9 * i) / n) * s;
  });
  const frames = computeFrameStats(x, FS, { frameS: 1e-3 });
  return { x, analysis: { durationS: n / FS, sampleRate: FS, frames, histogram: magnitudeHistogram(x), spectrum: { pitch: null as unknown as PitchTrack } } };
}

/** A pitch track of 100 Hz on 20 ms hops centred at 10, 30, 50, 70, 90 ms; hop 3 unvoiced. */
const pitch = (timesS: number[]): PitchTrack => ({
  hopS: 0.02,
  timesS: Float64Array.from(timesS),
  f0Hz: Float32Array.from(timesS.map((_, j) => (j === 3 ? Number.NaN : 100))),
  aperiodicity: new Float32Array(timesS.length),
  medianHz: 100,
  voicedFraction: 0.8,
});

describe('toPlanClip', () => {
  it("hands the rail schemes the analysis's frames and histogram as they are, with no pulse candidates", () => {
    const { x, analysis } = clip();
    const p = toPlanClip('song', analysis, x, { scheme: 'rail-linear' });
    expect(p).toEqual({ name: 'song', durationS: 0.1, frames: analysis.frames, histogram: analysis.histogram });
    expect(p.frames).toBe(analysis.frames);
    expect(p.pulseEvents).toBeUndefined();
  });

  it('takes zero-crossing candidates from the source: one per cycle of the sine, at its upward crossings', () => {
    // A 1 kHz sine crosses zero upward at k ms (definition of frequency); the first crossing (t = 0)
    // has no sample below −h before it, so 99 events in 0.1 s; each cycle's peak is its negative half's.
    const { x, analysis } = clip();
    const p = toPlanClip('song', analysis, x, { scheme: 'pulse' });
    const e = p.pulseEvents!;
    expect(e.mode).toBe('zero-crossing');
    expect(e.timeS.length).toBe(99);
    for (let k = 0; k < e.timeS.length; k++) expect(e.timeS[k]).toBeCloseTo((k + 1) * 1e-3, 6);
    // Event k's cycle runs from (k+1) to (k+2) ms; its peak is the larger of the positive half (0.5)
    // and the negative half at (k+1.75) ms, of amplitude 0.1 + 0.9·t/0.1.
    expect(e.level[10]).toBeCloseTo(0.5, 3);
    expect(e.level[80]).toBeCloseTo(0.1 + 0.9 * (81.75e-3 / 0.1), 3);
  });

  it("takes pitch-locked candidates from the pitch track, one per cycle of f0 from the first hop's start, at the frame peak |x|", () => {
    // Hops start half a hop before their centres: firstS = 10 ms − 10 ms = 0. At 100 Hz: an event
    // every 10 ms while voiced (hops 0–2 and 4: 0–60 ms and 80–100 ms), none in the unvoiced hop 3
    // (60–80 ms), the train starting afresh after it.
    const { x, analysis } = clip();
    const p = toPlanClip('song', { ...analysis, spectrum: { pitch: pitch([0.01, 0.03, 0.05, 0.07, 0.09]) } }, x, { scheme: 'pulse' }, 'pitch-locked');
    const e = p.pulseEvents!;
    expect(e.mode).toBe('pitch-locked');
    const want = [0, 0.01, 0.02, 0.03, 0.04, 0.05, 0.08, 0.09];
    expect(e.timeS.length).toBe(want.length);
    want.forEach((t, k) => expect(e.timeS[k]).toBeCloseTo(t, 9));
    // Level: the peak |x| of the 1 ms frame holding the event, the larger of |min| and |max|: 0.5
    // (the positive half) until the negative half outgrows it past ~45 ms, then the negative half.
    const peakAt = (t: number) => {
      const k = Math.floor(t / 1e-3 + 1e-9);
      return Math.max(Math.abs(analysis.frames.min[k]), Math.abs(analysis.frames.max[k]));
    };
    expect(e.level[1]).toBeCloseTo(0.5, 3);
    expect(e.level[7]).toBeCloseTo(peakAt(0.09), 6);
    expect(e.level[7]).toBeGreaterThan(0.85); // |min| near 0.1 + 0.9·0.09/0.1 = 0.91 there
  });

  it('starts the pitch-locked train half a hop before the first centre, and at 0 with an empty track', () => {
    const { x, analysis } = clip();
    const late = toPlanClip('song', { ...analysis, spectrum: { pitch: pitch([0.025, 0.045]) } }, x, { scheme: 'pulse' }, 'pitch-locked');
    expect(late.pulseEvents!.timeS[0]).toBeCloseTo(0.015, 9);
    const none = toPlanClip('song', { ...analysis, spectrum: { pitch: pitch([]) } }, x, { scheme: 'pulse' }, 'pitch-locked');
    expect(none.pulseEvents!.timeS.length).toBe(0);
  });
});
