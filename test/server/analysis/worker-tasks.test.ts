// The analysis worker's side (server/analysis/worker-tasks.ts): a stream job drained from its ring
// in this thread with a recording `post`, and in a real worker thread as the main thread fills the
// ring. The figures are SourcePartStream's fed directly, exactly (the same code on the same samples).
import { describe, expect, it } from 'vitest';
import { AnalysisWorker, type Reply } from '../../../server/analysis/worker-handle.ts';
import { type StreamJob, type WorkerReply, runStreamJob } from '../../../server/analysis/worker-tasks.ts';
import { RingWriter, arrayBuffersOf } from '../../../server/services/sample-ring.ts';
import { settingsForShape } from '../../../shared/analysis/analyze-clip.ts';
import { SourcePartStream } from '../../../shared/analysis/stream.ts';

const FS = 8000;
const n = 3 * FS + 5;
const source = Float32Array.from({ length: n }, (_, i) => 0.5 * Math.sin((2 * Math.PI * 440 * i) / FS));
const { channel: _, ...settings } = settingsForShape({ sampleCount: n, channelCount: 2, sampleRate: FS });

function direct() {
  const p = new SourcePartStream(n, FS, settings, true);
  p.add(source);
  return p.result();
}

describe('runStreamJob', () => {
  it('posts the source part of the samples that came through the ring, then done', () => {
    const w = new RingWriter(4, 1 << 13); // 32 Ki samples: the whole source fits before this thread drains it
    expect(w.add(source)).toBe(true);
    w.end();
    const replies: WorkerReply[] = [];
    runStreamJob({ type: 'stream', sampleCount: n, sampleRate: FS, settings, separate: true, ring: w.ring }, (m) => replies.push(m));
    expect(replies.map((r) => r.type)).toEqual(['source part', 'done']);
    const got = replies[0] as Extract<WorkerReply, { type: 'source part' }>;
    expect(got.output).toEqual(direct());
    // a 440 Hz sine: YIN (de Cheveigné & Kawahara 2002) reads 440 Hz within the pitch module's 0.5 %
    expect(Math.abs(got.output.spectrum.pitch.medianHz! / 440 - 1)).toBeLessThan(0.005);
    expect(w.stopped).toBe(true);
  });

  it('a job it cannot run is reported (a RangeError stays one) and the ring is released', () => {
    const w = new RingWriter(2, 64);
    const replies: WorkerReply[] = [];
    runStreamJob({ type: 'stream', sampleCount: n, sampleRate: FS, settings: { ...settings, fftSize: 1000 }, separate: true, ring: w.ring }, (m) => replies.push(m));
    expect(replies[0]).toMatchObject({ type: 'stream failed', range: true, message: expect.stringMatching(/power of two/) });
    expect(replies[1]).toEqual({ type: 'done' });
    expect(w.stopped).toBe(true);
    expect(w.add(source)).toBe(false); // the producer is not held back by a consumer that is gone
  });
});

describe('arrayBuffersOf', () => {
  it('finds each ArrayBuffer once, in nested objects and arrays, and leaves shared memory out', () => {
    const a = new Float64Array(4);
    const shared = new Float32Array(new SharedArrayBuffer(8));
    const found = arrayBuffersOf({ a, again: a.subarray(1), list: [{ b: new Float32Array(2) }], shared, n: 1, s: 'x', nil: null });
    expect(found).toHaveLength(2);
    expect(found).toContain(a.buffer);
  });
});

describe('in a worker thread', () => {
  it('drains the ring as this thread fills it, through more samples than the ring holds at once', async () => {
    const w = new AnalysisWorker();
    expect(await w.ready).toBe(true);
    const ring = new RingWriter(2, 1024); // 2 Ki samples: the producer waits for the worker many times
    const job: StreamJob = { type: 'stream', sampleCount: n, sampleRate: FS, settings, separate: true, ring: ring.ring };
    const replies: Reply[] = [];
    const finished = new Promise<void>((resolve) =>
      w.submit(job, (m) => {
        replies.push(m);
        if (m.type === 'done' || m.type === 'gone') resolve();
      }),
    );
    for (let at = 0; at < n; at += 3000) expect(ring.add(source.subarray(at, Math.min(n, at + 3000)))).toBe(true);
    ring.end();
    await finished;
    expect(replies.map((r) => r.type)).toEqual(['source part', 'done']);
    expect((replies[0] as Extract<WorkerReply, { type: 'source part' }>).output).toEqual(direct());
    await w.terminate();
  });
});
