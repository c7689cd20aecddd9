// The worker's side of the shared task list (server/analysis/worker-tasks.ts), run in this thread
// with a recording `post`, and the shared-memory flag that holds source tasks back, in a real worker.
import { describe, expect, it } from 'vitest';
import { AnalysisWorker } from '../../../server/analysis/analyze-parallel.ts';
import { type AnalysisJob, type WorkerReply, runAnalysisJob, transferables } from '../../../server/analysis/worker-tasks.ts';
import { resolveAnalyzeSettings } from '../../../shared/analysis/analyze-clip.ts';
import { runChannelTask, runSourceTask } from '../../../shared/analysis/tasks.ts';

const FS = 8000;
const sine = (hz: number, amp: number, n: number) => {
  const x = new Float32Array(new SharedArrayBuffer(4 * n));
  for (let i = 0; i < n; i++) x[i] = amp * Math.sin((2 * Math.PI * hz * i) / FS);
  return x;
};
const source = sine(440, 0.5, FS * 2);
const clip = { sampleRate: FS, channels: [source] };
const { channel: _, ...settings } = resolveAnalyzeSettings(clip);

function job(tasks: AnalysisJob['tasks'], ready = 1): AnalysisJob {
  const sync = new Int32Array(new SharedArrayBuffer(8));
  sync[1] = ready;
  return { sampleRate: FS, channels: clip.channels, source, settings, tasks, sync };
}

describe('runAnalysisJob', () => {
  it('claims every task in order, posts outputs equal to running them directly, then done', () => {
    const replies: WorkerReply[] = [];
    const j = job(['levels', 'source levels', 'pitch']);
    runAnalysisJob(j, (m) => replies.push(m));
    expect(replies.map((r) => r.type)).toEqual(['result', 'result', 'result', 'done']);
    const [levels, sourceLevels, pitch] = replies as Extract<WorkerReply, { type: 'result' }>[];
    expect(levels.output).toEqual(runChannelTask('levels', clip));
    expect(sourceLevels.output).toEqual(runSourceTask('source levels', source, FS, settings));
    expect(pitch.output).toEqual(runSourceTask('pitch', source, FS, settings));
    // a 440 Hz sine: YIN (de Cheveigné & Kawahara 2002) reads 440 Hz; 0.5 % is the pitch module's tolerance
    expect(Math.abs((pitch.output as { medianHz: number }).medianHz / 440 - 1)).toBeLessThan(0.005);
    expect(Atomics.load(j.sync, 0)).toBeGreaterThanOrEqual(3);
  });

  it('takes nothing the main thread has claimed already', () => {
    const replies: WorkerReply[] = [];
    const j = job(['levels', 'source levels', 'frames']);
    j.sync[0] = 2; // the main thread took the first two
    runAnalysisJob(j, (m) => replies.push(m));
    expect(replies.map((r) => (r.type === 'result' ? r.task : r.type))).toEqual(['frames', 'done']);
  });

  it('reports a task that throws and stops claiming, leaving the rest to the main thread', () => {
    const replies: WorkerReply[] = [];
    const j = job(['spectrum', 'source levels']);
    j.settings = { ...settings, fftSize: 1000 }; // not a power of two: welchPsd throws RangeError
    runAnalysisJob(j, (m) => replies.push(m));
    expect(replies[0]).toMatchObject({ type: 'failed', task: 'spectrum', message: expect.stringMatching(/power of two/) });
    expect(replies.slice(1)).toEqual([{ type: 'done' }]);
    expect(Atomics.load(j.sync, 0)).toBe(1); // 'source levels' is still unclaimed
  });
});

describe('transferables', () => {
  it('finds each ArrayBuffer once, in nested objects and arrays, and leaves shared memory out', () => {
    const a = new Float64Array(4);
    const found = transferables({ a, again: a.subarray(1), list: [{ b: new Float32Array(2) }], shared: source, n: 1, s: 'x', nil: null });
    expect(found).toHaveLength(2);
    expect(found).toContain(a.buffer);
  });
});

describe('in a worker thread', () => {
  it('source tasks wait until the main thread says the source is written', async () => {
    const w = new AnalysisWorker();
    expect(await w.ready).toBe(true);
    const j = job(['source levels'], 0);
    const replies: string[] = [];
    let done: () => void = () => undefined;
    const finished = new Promise<void>((r) => (done = r));
    w.submit(j, (m) => {
      replies.push(m.type);
      if (m.type === 'done' || m.type === 'gone') done();
    });
    await new Promise((r) => setTimeout(r, 150));
    expect(replies).toEqual([]); // nothing can come before the flag, however long we wait
    Atomics.store(j.sync, 1, 1);
    Atomics.notify(j.sync, 1);
    await finished;
    expect(replies).toEqual(['result', 'done']);
    await w.terminate();
  });
});
