// Test helper: seeded damaged copies of a file — cut short, or a few of its first 64 bytes (the
// header) overwritten — for the tests that feed damaged files through the executable and the
// upload route (the decoders' own property test, decode-fuzz.test.ts, draws many more kinds).
import fc from 'fast-check';

export function damagedCopies(original: Uint8Array, seed: number, runs: number): Uint8Array[] {
  return fc.sample(
    fc.oneof(
      fc.integer({ min: 1, max: original.length - 1 }).map((n) => original.slice(0, n)),
      fc.array(fc.tuple(fc.nat({ max: 63 }), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 6 }).map((flips) => {
        const b = original.slice();
        for (const [at, v] of flips) b[at] = v;
        return b;
      }),
    ),
    { seed, numRuns: runs },
  );
}
