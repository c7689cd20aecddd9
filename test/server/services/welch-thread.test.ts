import { describe, expect, it } from 'vitest';
import { WelchStream, welchPsd } from '../../../shared/dsp/welch.ts';
import { WelchOffThread } from '../../../server/services/welch-thread.ts';

const FS = 44100;
/** A tone in noise (Park–Miller generator), long enough for several of WelchStream's stretches. */
function signal(n: number): Float32Array {
  let r = 12345;
  return Float32Array.from({ length: n }, (_, i) => {
    r = (r * 16807) % 2147483647;
    return 0.5 * Math.sin((2 * Math.PI * 997 * i) / FS) + 0.05 * (2 * (r / 2147483647) - 1);
  });
}

async function offThread(x: Float32Array, blockLengths: number[], threads: boolean) {
  const w = new WelchOffThread(4096, threads);
  w.start(FS);
  let at = 0;
  for (let k = 0; at < x.length; k++) {
    const len = Math.min(blockLengths[k % blockLengths.length], x.length - at);
    const view = w.block(len);
    view.set(x.subarray(at, at + len));
    w.submit(view);
    at += len;
  }
  return w.result();
}

describe('WelchOffThread', () => {
  const x = signal(FS * 20 + 1234);
  const reference = (() => {
    const s = new WelchStream(FS, 4096);
    s.add(x);
    return s.result();
  })();

  it("gives the in-thread stream's spectrum bit for bit, on the other thread and here, whatever the block lengths", async () => {
    // Block lengths from one sample to far more than a stretch (64 segments), in an uneven cycle.
    for (const threads of [true, false]) {
      const got = await offThread(x, [262144, 1, 4095, 70001, 4097, 33], threads);
      expect(got.segments).toBe(reference.segments);
      expect(Array.from(got.psd)).toEqual(Array.from(reference.psd));
      expect(Array.from(got.frequencyHz)).toEqual(Array.from(reference.frequencyHz));
    }
    // And that stream agrees with Welch's method on the whole signal at once (within rounding).
    const whole = welchPsd(x, FS, { size: 4096 });
    expect(reference.segments).toBe(whole.segments);
    for (let k = 0; k < whole.psd.length; k += 97) expect(reference.psd[k]).toBeCloseTo(whole.psd[k], 12);
  });

  it('reuses its shared buffers instead of taking new memory for every block', async () => {
    const w = new WelchOffThread(4096, true);
    await w.ready;
    w.start(FS);
    // Each block waits for the previous one's buffer to come back: one buffer serves them all.
    for (let k = 0; k < 50; k++) {
      const view = w.block(8192);
      view.set(x.subarray(k * 8192, (k + 1) * 8192));
      w.submit(view);
      for (let t = 0; t < 2000 && w.buffersFree === 0; t++) await new Promise((r) => setTimeout(r, 1));
    }
    await w.result();
    expect(w.buffersMade).toBe(1);
  });

  it('refuses a clip shorter than one segment with a RangeError, on either thread', async () => {
    for (const threads of [true, false]) await expect(offThread(x.subarray(0, 1000), [512], threads)).rejects.toThrow(RangeError);
  });
});
