// The worker that bounds compressed-audio decoding: a stuck codec is terminated, codec failures are
// reported as such, the caller's bytes are only handed over when asked.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CodecError, decodeInWorker } from '../../../server/audio/worker-decode.ts';
import { rejectsWithCode } from './wav-builder.ts';

const FIX = new URL('../../fixtures/audio/', import.meta.url);
const flac = () => new Uint8Array(readFileSync(new URL('tone-44k1-stereo.flac', FIX)));

describe('decodeInWorker', () => {
  it('terminates a worker stuck in a synchronous loop and reports decode-timeout', async () => {
    // hang-worker.mjs never yields; only Worker.terminate() can stop it. A Promise.race alone would leave it spinning.
    await rejectsWithCode(
      decodeInWorker(new Uint8Array(16), { timeoutS: 0.3, contextSampleRate: 44100, workerUrl: new URL('hang-worker.mjs', FIX) }),
      'decode-timeout',
    );
  });

  it('a codec failure becomes CodecError carrying the codec message', async () => {
    const p = decodeInWorker(new Uint8Array(16), { timeoutS: 30, contextSampleRate: 44100, workerUrl: new URL('throw-worker.mjs', FIX) });
    await expect(p).rejects.toThrow(CodecError);
    await expect(p).rejects.toThrow(/invalid frame header/);
  });

  it('the real worker rejects bytes that are not audio with CodecError', async () => {
    await expect(decodeInWorker(new Uint8Array(64).fill(7), { timeoutS: 30, contextSampleRate: 44100 })).rejects.toThrow(CodecError);
  });

  it('decodes through web-audio-api at the file rate even when the context rate differs', async () => {
    // The context is created at 22050 Hz here; the FLAC is 44100 Hz. web-audio-api 1.5.6 does not resample.
    const r = await decodeInWorker(flac(), { timeoutS: 30, contextSampleRate: 22050 });
    expect(r.sampleRate).toBe(44100);
    expect(r.channels).toHaveLength(2);
    expect(r.channels[0]).toHaveLength(88200); // 2 s (make-fixtures.sh)
  });

  it('copies the bytes unless transfer is asked for; with transfer the buffer moves to the worker', async () => {
    const kept = flac();
    await decodeInWorker(kept, { timeoutS: 30, contextSampleRate: 44100 });
    expect(kept.byteLength).toBeGreaterThan(0);
    const moved = flac();
    await decodeInWorker(moved, { timeoutS: 30, contextSampleRate: 44100, transfer: true });
    expect(moved.byteLength).toBe(0); // detached: ownership went to the worker, no copy was made
  });
});
