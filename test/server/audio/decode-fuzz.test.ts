// Damaged files through the decoders and the analysis: every case ends in a clear InputError or in an
// analysis whose every figure is finite (or null where the summary writes −∞ dB as null). Seeded and
// bounded property tests (fast-check), so a failure reproduces and the suite's time stays fixed.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { summarizeAnalysis } from '../../../shared/analysis/summary.ts';
import { isInputError } from '../../../shared/errors.ts';
import { everyNumberFinite } from './finite.ts';
import { buildWav } from './wav-builder.ts';

const FIXTURES = join(import.meta.dirname, '../../fixtures/audio');
const fixture = (name: string) => new Uint8Array(readFileSync(join(FIXTURES, name)));

/** What decoding and analysing damaged bytes led to: 'input-error' (with its code) or 'analysed'. */
async function outcome(bytes: Uint8Array): Promise<{ kind: 'input-error'; code: string; message: string } | { kind: 'analysed' }> {
  try {
    const clip = await decodeAudioBytes(bytes, { timeoutS: 20, maxDurationS: 60, maxDecodedBytes: 64e6 });
    const summary = summarizeAnalysis(analyzeClip(clip));
    const bad = everyNumberFinite(summary);
    if (bad) throw new Error(`analysis of a damaged file gave a non-finite figure: ${bad}`);
    return { kind: 'analysed' };
  } catch (e) {
    if (isInputError(e)) return { kind: 'input-error', code: e.code, message: e.message };
    throw e;
  }
}

/** A damaged copy of `original`: cut short, bytes flipped (mostly in the header) or a 32-bit field overwritten. */
const damage = (original: Uint8Array) =>
  fc.oneof(
    fc.integer({ min: 0, max: original.length - 1 }).map((n) => original.slice(0, n)),
    fc
      .array(fc.record({ header: fc.boolean(), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }), { minLength: 1, maxLength: 8 })
      .map((flips) => {
        const b = original.slice();
        for (const f of flips) b[f.header ? f.at % Math.min(64, b.length) : f.at % b.length] = f.byte;
        return b;
      }),
    fc
      .record({ at: fc.nat({ max: 60 }), value: fc.constantFrom(0, 1, 0xffffffff, 0x7fffffff, 0x80000000, 48000, 65535) })
      .map(({ at, value }) => {
        const b = original.slice();
        if (at + 4 <= b.length) new DataView(b.buffer).setUint32(at & ~1, value >>> 0, true);
        return b;
      }),
  );

// Bounded: 30 damaged copies per format keep the file to a few seconds on two cores; compressed
// formats decode in a worker thread, so they get fewer.
const CASES: [string, number][] = [
  ['wav-s16-stereo.wav', 40],
  ['wav-s24-3ch-extensible.wav', 30],
  ['wav-f64-stereo.wav', 30],
  ['tone-44k1-stereo.flac', 15],
  ['tone-48k-stereo.ogg', 15],
  ['tone-44k1-stereo.mp3', 15],
];

describe('damaged files end in a clear error or a finite analysis', () => {
  for (const [name, runs] of CASES) {
    it(`${name}: ${runs} seeded damaged copies`, async () => {
      const original = fixture(name);
      await fc.assert(
        fc.asyncProperty(damage(original), async (bytes) => {
          const o = await outcome(bytes);
          if (o.kind === 'input-error') {
            // One line that says what is wrong and what to do: no stack, no newline.
            expect(o.message).not.toMatch(/\n|\bat .+:\d+:\d+/);
            expect(o.message.length).toBeGreaterThan(20);
          }
        }),
        { seed: 0xc011 + name.length, numRuns: runs, interruptAfterTimeLimit: 50_000 },
      );
    });
  }
});

describe('absurd WAV headers are refused with a reason', () => {
  const pcm = new Uint8Array(400);
  const cases: [string, Parameters<typeof buildWav>[0]][] = [
    ['zero channels', { channels: 0, sampleRate: 8000, containerBytes: 2, data: pcm }],
    ['65535 channels', { channels: 65535, sampleRate: 8000, containerBytes: 2, data: pcm }],
    ['a sample rate of 0 Hz', { channels: 1, sampleRate: 0, containerBytes: 2, data: pcm }],
    ['a sample rate of 4 GHz', { channels: 1, sampleRate: 4e9, containerBytes: 2, data: pcm }],
    ['a data chunk claiming 4 GiB', { channels: 1, sampleRate: 8000, containerBytes: 2, data: pcm, dataSizeField: 0xffffffff }],
    ['a RIFF size of 0', { channels: 1, sampleRate: 8000, containerBytes: 2, data: pcm, riffSizeField: 0 }],
    ['an unknown format tag', { tag: 0x7777, channels: 1, sampleRate: 8000, containerBytes: 2, data: pcm }],
    ['a 7-byte container', { channels: 1, sampleRate: 8000, containerBytes: 7, data: pcm.slice(0, 399) }],
  ];
  for (const [what, spec] of cases) {
    it(what, async () => {
      const o = await outcome(buildWav(spec));
      // A lying length may still leave readable samples (the reader takes what is there); then the
      // analysis must be finite, which outcome() checks. Otherwise the error says why.
      if (o.kind === 'input-error') expect(o.message).toMatch(/[a-z]/);
    });
  }
});
