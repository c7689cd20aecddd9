import { describe, expect, it } from 'vitest';
import { WelchStream, type WelchSpectrum, welchPsd } from '../../../shared/dsp/welch.ts';
import type { PlanClip } from '../../../shared/plan/evaluate.ts';
import { PlanReducer } from '../../../server/render/plan-reducer.ts';
import { ReductionThread } from '../../../server/services/reduction-thread.ts';

const FS = 44100;
/** A tone in noise (Park–Miller generator), long enough for several of WelchStream's stretches and ring turns. */
function signal(n: number): Float32Array {
  let r = 12345;
  return Float32Array.from({ length: n }, (_, i) => {
    r = (r * 16807) % 2147483647;
    return 0.5 * Math.sin((2 * Math.PI * 997 * i) / FS) + 0.05 * (2 * (r / 2147483647) - 1);
  });
}

/** Feeds `x` in blocks whose lengths cycle through `lengths`. */
function feed(t: { add(x: Float32Array): void }, x: Float32Array, lengths: number[]): void {
  for (let at = 0, k = 0; at < x.length; k++) {
    const len = Math.min(lengths[k % lengths.length], x.length - at);
    t.add(x.subarray(at, at + len));
    at += len;
  }
}

// Block lengths from one sample to more than the ring's slot (65536) and a WelchStream stretch.
const LENGTHS = [262144, 1, 4095, 70001, 4097, 33];

describe('ReductionThread', () => {
  const x = signal(FS * 20 + 1234);

  it("gives Welch's spectrum of the in-thread stream bit for bit, on the other thread and here, whatever the block lengths", async () => {
    const s = new WelchStream(FS, 4096);
    s.add(x);
    const reference = s.result();
    for (const threads of [true, false]) {
      const t = new ReductionThread<WelchSpectrum>(threads);
      t.start({ kind: 'welch', sampleRate: FS, size: 4096 });
      feed(t, x, LENGTHS);
      const got = await t.result();
      expect(got.segments).toBe(reference.segments);
      expect(Array.from(got.psd)).toEqual(Array.from(reference.psd));
      expect(Array.from(got.frequencyHz)).toEqual(Array.from(reference.frequencyHz));
    }
    // And that stream agrees with Welch's method on the whole signal at once (within rounding).
    const whole = welchPsd(x, FS, { size: 4096 });
    expect(reference.segments).toBe(whole.segments);
    for (let k = 0; k < whole.psd.length; k += 97) expect(reference.psd[k]).toBeCloseTo(whole.psd[k], 12);
  });

  it("gives the planner's reductions of the in-thread reducer, pulse candidates included, and forgets a restarted pass", async () => {
    const r = new PlanReducer(x.length, FS, true);
    r.add(x);
    const reference = r.result('clip');
    const t = new ReductionThread<PlanClip>(true);
    t.start({ kind: 'plan', sampleCount: x.length, sampleRate: FS, pulses: true, name: 'clip' });
    feed(t, x.subarray(0, 300000).map((v) => -v), LENGTHS); // a first pass, then replaced
    t.restart();
    feed(t, x, LENGTHS);
    const got = await t.result();
    expect(got.name).toBe('clip');
    expect(Array.from(got.frames.meanSquare)).toEqual(Array.from(reference.frames.meanSquare));
    expect(Array.from(got.frames.max)).toEqual(Array.from(reference.frames.max));
    expect(Array.from(got.histogram.counts)).toEqual(Array.from(reference.histogram.counts));
    expect(Array.from(got.pulseEvents!.timeS)).toEqual(Array.from(reference.pulseEvents!.timeS));
  });

  it('holds a producer that outruns the thread to the ring, so a synchronous loop neither grows memory nor loses samples', async () => {
    // 200 blocks of 64 Ki samples (50 MiB of samples) added without ever yielding to the event loop.
    const t = new ReductionThread<PlanClip>(true);
    const n = 200 * 65536;
    t.start({ kind: 'plan', sampleCount: n, sampleRate: FS, pulses: false, name: 'long' });
    const block = new Float32Array(65536);
    const before = process.memoryUsage().arrayBuffers;
    let peak = before;
    for (let k = 0; k < 200; k++) {
      block.fill(k % 2 === 0 ? 0.5 : -0.25);
      t.add(block);
      peak = Math.max(peak, process.memoryUsage().arrayBuffers);
    }
    const got = await t.result();
    expect(peak - before).toBeLessThan(8 << 20);
    expect(got.frames.count).toBe(Math.ceil(n / (FS * 1e-3))); // 1 ms frames of 44.1 samples (frame-stats.ts)
    expect(got.histogram.counts.reduce((a, b) => a + b, 0) + got.histogram.above + got.histogram.below + got.histogram.zeros).toBe(n);
  });

  it('refuses a clip shorter than one segment with a RangeError, on either thread', async () => {
    for (const threads of [true, false]) {
      const t = new ReductionThread<WelchSpectrum>(threads);
      t.start({ kind: 'welch', sampleRate: FS, size: 4096 });
      t.add(x.subarray(0, 1000));
      await expect(t.result()).rejects.toThrow(RangeError);
    }
  });
});
