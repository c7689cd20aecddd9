// Seeded generator (shared/demo/prng.ts): xoshiro128** (Blackman & Vigna, ACM TOMS 47(4), 2021) seeded
// through the MurmurHash3 fmix32 finaliser.
import { describe, expect, it } from 'vitest';
import { createRng } from '../../../shared/demo/prng.ts';

describe('createRng', () => {
  it('matches the reference C implementation for seed 42', () => {
    // Reference: xoshiro128starstar.c (prng.di.unimi.it, public domain) transcribed [recalled], with the
    // same seeding (s[i] = fmix32(42 + (i+1)·0x9E3779B9)), compiled with gcc -O2; first six outputs:
    const expected = [2837322924, 544945897, 479756282, 3500138142, 339756180, 113173290];
    const rnd = createRng(42);
    expect(expected.map(() => rnd() * 2 ** 32)).toEqual(expected);
  });

  it('is deterministic per seed, and different seeds give different streams', () => {
    const a = createRng(7), b = createRng(7), c = createRng(8);
    const xs = Array.from({ length: 100 }, () => a());
    expect(Array.from({ length: 100 }, () => b())).toEqual(xs);
    expect(Array.from({ length: 100 }, () => c())).not.toEqual(xs);
  });

  it('is uniform on [0, 1): mean 1/2, variance 1/12, flat histogram, no lag-1 correlation', () => {
    const N = 200_000;
    const rnd = createRng(99);
    const x = Float64Array.from({ length: N }, () => rnd());
    let mean = 0, v = 0, lag = 0, lo = 1, hi = 0;
    for (const u of x) {
      mean += u / N;
      lo = Math.min(lo, u);
      hi = Math.max(hi, u);
    }
    for (let i = 0; i < N; i++) {
      v += (x[i] - mean) ** 2 / N;
      if (i > 0) lag += ((x[i] - mean) * (x[i - 1] - mean)) / N;
    }
    expect(lo).toBeGreaterThanOrEqual(0);
    expect(hi).toBeLessThan(1);
    // 4 standard errors at N = 2e5: mean √(1/12)/√N → 0.0026; variance √((1/80 − 1/144)/N) → 0.0007;
    // lag-1 autocovariance (1/12)/√N → 0.00075.
    expect(Math.abs(mean - 0.5)).toBeLessThan(0.0026);
    expect(Math.abs(v - 1 / 12)).toBeLessThan(0.0007);
    expect(Math.abs(lag)).toBeLessThan(0.00075);
    // χ² over 16 bins, 15 degrees of freedom: below 37.7 (p = 0.001).
    const counts = new Array(16).fill(0);
    for (const u of x) counts[Math.floor(u * 16)]++;
    const e = N / 16;
    expect(counts.reduce((s, c) => s + (c - e) ** 2 / e, 0)).toBeLessThan(37.7);
  });
});
