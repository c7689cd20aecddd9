import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { RealFft, isPowerOfTwo, nextPowerOfTwo } from '../../../shared/dsp/fft.ts';

// fft-js (devDependency) is the independent oracle: a separate, recursive radix-2 Cooley–Tukey
// implementation. It ships no types, so it is loaded through require with the one signature we use.
const require = createRequire(import.meta.url);
const oracle = require('fft-js') as { fft(x: number[]): [number, number][] };

/** Deterministic uniform noise in [−1, 1) (a 32-bit LCG, Numerical Recipes constants). */
function noise(n: number, seed: number): number[] {
  let s = seed >>> 0;
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out.push(s / 2 ** 31 - 1);
  }
  return out;
}

describe('RealFft construction', () => {
  it('accepts powers of two ≥ 4 and rejects the rest', () => {
    expect(() => new RealFft(2)).toThrow(RangeError);
    expect(() => new RealFft(12)).toThrow(/power of two/);
    expect(() => new RealFft(4.5)).toThrow(RangeError);
    expect(new RealFft(4).bins).toBe(3);
    expect(new RealFft(4096).bins).toBe(2049);
  });

  it('helpers', () => {
    expect(isPowerOfTwo(1024)).toBe(true);
    expect(isPowerOfTwo(1000)).toBe(false);
    expect(nextPowerOfTwo(441)).toBe(512);
    expect(nextPowerOfTwo(512)).toBe(512);
  });

  it('rejects input longer than the size', () => {
    expect(() => new RealFft(4).forward([1, 2, 3, 4, 5])).toThrow(/more than size 4/);
  });
});

describe('RealFft.forward against the fft-js oracle', () => {
  // Both are float64 O(N log N) algorithms: rounding grows like ε·log2 N ≈ 1e-15, so 1e-9 of the
  // largest bin leaves a wide margin while any indexing or sign error would be O(1).
  for (const n of [4, 8, 16, 128, 1024, 4096]) {
    it(`N = ${n}, uniform noise, agrees to 1e-9 relative`, () => {
      const x = noise(n, 1234 + n);
      const ref = oracle.fft(x);
      const { re, im } = new RealFft(n).forward(x);
      let scale = 0;
      for (let k = 0; k <= n / 2; k++) scale = Math.max(scale, Math.hypot(ref[k][0], ref[k][1]));
      let worst = 0;
      for (let k = 0; k <= n / 2; k++) {
        worst = Math.max(worst, Math.abs(re[k] - ref[k][0]), Math.abs(im[k] - ref[k][1]));
      }
      expect(scale).toBeGreaterThan(0);
      expect(worst / scale).toBeLessThan(1e-9);
    });
  }

  it('reuses its buffers: a second call gives the same answer and writes the given outputs', () => {
    const f = new RealFft(64);
    const x = noise(64, 7);
    const a = f.forward(x);
    f.forward(noise(64, 8));
    const re = new Float64Array(33);
    const im = new Float64Array(33);
    const b = f.forward(x, re, im);
    expect(b.re).toBe(re);
    for (let k = 0; k < 33; k++) {
      expect(b.re[k]).toBeCloseTo(a.re[k], 12);
      expect(b.im[k]).toBeCloseTo(a.im[k], 12);
    }
  });

  it('zero-pads short input (DFT of a padded sequence, checked by the direct sum)', () => {
    const x = [0.5, -1, 2];
    const n = 8;
    const { re, im } = new RealFft(n).forward(Float32Array.from(x));
    for (let k = 0; k <= n / 2; k++) {
      let sr = 0;
      let si = 0;
      for (let i = 0; i < x.length; i++) {
        sr += x[i] * Math.cos((2 * Math.PI * k * i) / n);
        si -= x[i] * Math.sin((2 * Math.PI * k * i) / n);
      }
      expect(re[k]).toBeCloseTo(sr, 12);
      expect(im[k]).toBeCloseTo(si, 12);
    }
  });
});

describe('RealFft.forwardPair', () => {
  it('equals two forward transforms (inputs of different lengths, zero-padded) to 1e-12 relative', () => {
    for (const n of [4, 64, 512]) {
      const f = new RealFft(n);
      const a = noise(n, 11 + n);
      const b = noise(Math.max(1, n / 2 - 3), 17 + n);
      const ra = f.forward(a);
      const rb = f.forward(b);
      const out = [0, 1, 2, 3].map(() => new Float64Array(f.bins));
      f.forwardPair(a, b, out[0], out[1], out[2], out[3]);
      let scale = 0;
      let worst = 0;
      for (let k = 0; k < f.bins; k++) {
        scale = Math.max(scale, Math.hypot(ra.re[k], ra.im[k]), Math.hypot(rb.re[k], rb.im[k]));
        worst = Math.max(
          worst,
          Math.abs(out[0][k] - ra.re[k]),
          Math.abs(out[1][k] - ra.im[k]),
          Math.abs(out[2][k] - rb.re[k]),
          Math.abs(out[3][k] - rb.im[k]),
        );
      }
      expect(worst / scale).toBeLessThan(1e-12);
    }
    const z = () => new Float64Array(3);
    expect(() => new RealFft(4).forwardPair([1, 2, 3, 4, 5], [], z(), z(), z(), z())).toThrow(RangeError);
  });
});

describe('RealFft.pairedPower', () => {
  it('equals |A|² + |B|² of the fft-js oracle (1e-9 relative), for every bin including 0 and N/2', () => {
    for (const n of [4, 64, 1024]) {
      const a = noise(n, 31 + n);
      const b = noise(n, 37 + n);
      const z = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) {
        z[2 * i] = a[i];
        z[2 * i + 1] = b[i];
      }
      const p = new RealFft(n).pairedPower(z);
      const ra = oracle.fft(a);
      const rb = oracle.fft(b);
      let scale = 0;
      let worst = 0;
      for (let k = 0; k <= n / 2; k++) {
        const ref = ra[k][0] ** 2 + ra[k][1] ** 2 + rb[k][0] ** 2 + rb[k][1] ** 2;
        scale = Math.max(scale, ref);
        worst = Math.max(worst, Math.abs(p[k] - ref));
      }
      expect(p.length).toBe(n / 2 + 1);
      expect(worst / scale).toBeLessThan(1e-9);
    }
  });

  it('rejects an input that is not 2·N values long', () => {
    expect(() => new RealFft(8).pairedPower(new Float64Array(8))).toThrow(/2·N = 16/);
  });
});

describe('RealFft: a sine and Parseval', () => {
  // DFT of a sinusoid (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed., ch. 8)
  it('a sine on bin 37 of 1024 lands in bin 37 with |X| = A·N/2', () => {
    const n = 1024;
    const a = 0.3;
    const x = Array.from({ length: n }, (_, i) => a * Math.sin((2 * Math.PI * 37 * i) / n + 0.4));
    const p = new RealFft(n).powerSpectrum(x);
    let peak = 0;
    for (let k = 1; k < p.length; k++) if (p[k] > p[peak]) peak = k;
    expect(peak).toBe(37);
    // float64 rounding only: 1e-9 relative
    expect(Math.sqrt(p[37])).toBeCloseTo((a * n) / 2, 6);
    // an on-bin sine leaks nothing: every other bin is at rounding level
    for (let k = 0; k < p.length; k++) if (k !== 37) expect(Math.sqrt(p[k])).toBeLessThan(1e-9);
  });

  // Parseval's relation for the DFT (Oppenheim & Schafer, ch. 8)
  it('Parseval: Σx² = (1/N)·Σ|X|² over all N bins, to 1e-12 relative', () => {
    for (const n of [4, 256, 2048]) {
      const x = noise(n, 99 + n);
      const p = new RealFft(n).powerSpectrum(x);
      let twoSided = p[0] + p[n / 2];
      for (let k = 1; k < n / 2; k++) twoSided += 2 * p[k];
      const energy = x.reduce((s, v) => s + v * v, 0);
      expect(Math.abs(twoSided / n - energy) / energy).toBeLessThan(1e-12);
    }
  });
});

describe('RealFft.inverse', () => {
  it('round-trips noise to 1e-12 for sizes 4…4096', () => {
    for (const n of [4, 8, 32, 512, 4096]) {
      const f = new RealFft(n);
      const x = noise(n, 5 + n);
      const { re, im } = f.forward(x);
      const y = f.inverse(re, im);
      let worst = 0;
      for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(y[i] - x[i]));
      expect(worst).toBeLessThan(1e-12);
    }
  });

  it('inverse of |X|² is the circular autocorrelation (Wiener–Khinchin), checked by the direct sum', () => {
    const n = 64;
    const f = new RealFft(n);
    const x = noise(n, 42);
    const p = f.powerSpectrum(x);
    const r = f.inverse(p, new Float64Array(p.length));
    for (const lag of [0, 1, 5, 31, 32, 63]) {
      let s = 0;
      for (let i = 0; i < n; i++) s += x[i] * x[(i + lag) % n];
      expect(r[lag]).toBeCloseTo(s, 10);
    }
  });
});

describe('RealFft fused variants give their plain counterparts’ numbers bit for bit', () => {
  // These methods are documented as the same operations in the same order as the plain ones, so
  // exact equality (Object.is) is the contract under test, not a tolerance: one reordered addition
  // would show.
  const same = (a: ArrayLike<number>, b: ArrayLike<number>) => {
    expect(a.length).toBe(b.length);
    for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) expect([i, a[i]]).toEqual([i, b[i]]);
  };

  it('accumulatePairedPower = pairedPower added into one or both sums, N = 4…4096', () => {
    for (const n of [4, 8, 16, 32, 64, 512, 4096]) {
      const f = new RealFft(n);
      const z = Float64Array.from(noise(2 * n, 7 + n));
      const p = f.pairedPower(z);
      const start = Float64Array.from(noise(n / 2 + 1, 13 + n));
      const want = start.map((v, k) => v + p[k]);
      const acc = start.slice();
      const also = start.slice();
      f.accumulatePairedPower(z, acc, also);
      same(acc, want);
      same(also, want);
      const alone = start.slice();
      f.accumulatePairedPower(z, alone);
      same(alone, want);
    }
    expect(() => new RealFft(8).accumulatePairedPower(new Float64Array(8), new Float64Array(5))).toThrow(RangeError);
  });

  it('forwardPairAdjacent = forwardPair of the two stretches, whatever the previous call left', () => {
    const n = 64;
    const f = new RealFft(n);
    const g = new RealFft(n);
    const src = Float32Array.from(noise(4 * n, 21));
    const out = () => [0, 1, 2, 3].map(() => new Float64Array(n / 2 + 1));
    // lengths that shrink and grow, so stale values from a longer previous call must be cleared
    for (const [from, la, lb] of [[0, 64, 64], [5, 10, 40], [9, 40, 3], [100, 0, 17], [2, 33, 0], [7, 64, 64]]) {
      const p = out();
      const q = out();
      f.forwardPair(src.subarray(from, from + la), src.subarray(from + la, from + la + lb), p[0], p[1], p[2], p[3]);
      g.forwardPairAdjacent(src, from, from + la, from + la + lb, q[0], q[1], q[2], q[3]);
      for (let i = 0; i < 4; i++) same(q[i], p[i]);
    }
    const [r0, i0, r1, i1] = out();
    expect(() => g.forwardPairAdjacent(src, 0, n + 1, n + 2, r0, i0, r1, i1)).toThrow(RangeError);
  });

  it('inverse into exactly N values = inverse into a longer array (first N values), which it leaves beyond N', () => {
    const n = 32;
    const f = new RealFft(n);
    const re = Float64Array.from(noise(n / 2 + 1, 31));
    const im = Float64Array.from(noise(n / 2 + 1, 32));
    const exact = f.inverse(re, im, new Float64Array(n));
    const long = f.inverse(re, im, new Float64Array(n + 3).fill(7));
    same(exact, long.subarray(0, n));
    same(long.subarray(n), [7, 7, 7]);
  });
});
