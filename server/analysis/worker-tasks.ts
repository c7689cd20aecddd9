/**
 * The analysis worker's side of analyze-parallel.ts: it takes tasks (shared/analysis/tasks.ts) one
 * at a time from a list shared with the main thread, claiming each with an atomic increment of a
 * shared counter, so each task runs exactly once, on whichever thread is free first; every output
 * goes back as it is done, its typed arrays transferred, not copied. Source tasks wait until the
 * main thread has written the modulation source (a flag in shared memory).
 *
 * worker-entry.cjs starts it inside the thread; importing this module does nothing by itself.
 */
import type { MessagePort } from 'node:worker_threads';
import {
  type AnalysisTask,
  CHANNEL_TASKS,
  type ChannelTask,
  type SourceTask,
  type SourceTaskSettings,
  type TaskOutputs,
  runChannelTask,
  runSourceTask,
} from '../../shared/analysis/tasks.ts';
import { type SourcePartFigures, SourcePartStream } from '../../shared/analysis/stream.ts';
import { type Ring, drainRing } from '../services/sample-ring.ts';

/** One analysis handed to the worker. */
export interface AnalysisJob {
  /** Hz. */
  sampleRate: number;
  /** The clip's channels in shared memory, when `tasks` holds channel tasks; else empty. */
  channels: Float32Array[];
  /** Modulation source in shared memory (a SharedArrayBuffer), full scale ±1; valid once sync[1] ≠ 0. */
  source: Float32Array;
  settings: SourceTaskSettings;
  /** Tasks to share, in the order they are claimed. */
  tasks: AnalysisTask[];
  /**
   * sync[0]: index of the next unclaimed task (both threads take tasks with Atomics.add(sync, 0, 1));
   * sync[1]: 0 until the main thread has written `source`, then 1 (Atomics.store + notify).
   */
  sync: Int32Array;
}

/**
 * The source part of an analysis made block by block (analyze-stream.ts): the modulation source
 * comes through a ring of shared slots as the file is decoded, and the worker feeds it to a
 * SourcePartStream (shared/analysis/stream.ts).
 */
export interface StreamJob {
  type: 'stream';
  /** Samples of the whole source. */
  sampleCount: number;
  /** Hz. */
  sampleRate: number;
  settings: SourceTaskSettings;
  /** The source is not the clip's only channel: measure its own levels too. */
  separate: boolean;
  ring: Ring;
}

/** Messages from the worker. Times are epoch milliseconds (performance.timeOrigin + performance.now()). */
export type WorkerReply =
  | { type: 'ready' }
  | { type: 'result'; task: AnalysisTask; output: TaskOutputs[AnalysisTask]; startMs: number; endMs: number }
  | { type: 'failed'; task: AnalysisTask; message: string }
  | { type: 'source part'; output: SourcePartFigures; startMs: number; endMs: number }
  | { type: 'stream failed'; message: string; range: boolean }
  | { type: 'done' };

/** Epoch time in ms with sub-ms resolution, comparable between threads (each has its own timeOrigin). @example epochMs() - Date.now() // ≈ 0 */
export const epochMs = (): number => performance.timeOrigin + performance.now();

/**
 * Every ArrayBuffer behind the typed arrays in `value` (plain objects and arrays walked), each
 * once; shared memory is left out (it is shared, not moved).
 *
 * @example transferables({ a: new Float64Array(4), b: [new Float32Array(2)] }) // two ArrayBuffers
 */
export function transferables(value: unknown, found = new Set<ArrayBuffer>()): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    if (value.buffer instanceof ArrayBuffer) found.add(value.buffer);
  } else if (Array.isArray(value)) {
    for (const v of value) transferables(v, found);
  } else if (value !== null && typeof value === 'object') {
    for (const v of Object.values(value)) transferables(v, found);
  }
  return [...found];
}

const isChannelTask = (t: AnalysisTask): t is ChannelTask => (CHANNEL_TASKS as readonly string[]).includes(t);

/** Blocks until sync[1] ≠ 0 (the source is written), in 50 ms waits so that terminate() can stop it. */
function awaitSource(sync: Int32Array): void {
  while (Atomics.load(sync, 1) === 0) Atomics.wait(sync, 1, 0, 50);
}

/**
 * Runs tasks of `job` until none is left unclaimed, posting each output (or the failure, after which
 * it stops claiming: the main thread then runs what is left, and meets the same error itself).
 * Posts 'done' at the end.
 *
 * @example runAnalysisJob(job, (m, t) => port.postMessage(m, t))
 */
export function runAnalysisJob(job: AnalysisJob, post: (m: WorkerReply, transfer?: ArrayBuffer[]) => void): void {
  const { sampleRate, channels, source, settings, tasks, sync } = job;
  for (;;) {
    const i = Atomics.add(sync, 0, 1);
    if (i >= tasks.length) break;
    const task = tasks[i];
    let output: TaskOutputs[AnalysisTask];
    let startMs: number;
    try {
      if (isChannelTask(task)) {
        startMs = epochMs();
        output = runChannelTask(task, { sampleRate, channels });
      } else {
        awaitSource(sync);
        startMs = epochMs();
        output = runSourceTask(task as SourceTask, source, sampleRate, settings);
      }
    } catch (e) {
      post({ type: 'failed', task, message: e instanceof Error ? e.message : String(e) });
      break;
    }
    post({ type: 'result', task, output, startMs, endMs: epochMs() }, transferables(output));
  }
  post({ type: 'done' });
}

/**
 * Drains a stream job's ring into the source part and posts its figures (or the failure: a
 * RangeError stays one), then 'done'.
 *
 * @example runStreamJob(job, (m, t) => port.postMessage(m, t))
 */
export function runStreamJob(job: StreamJob, post: (m: WorkerReply, transfer?: ArrayBuffer[]) => void): void {
  const startMs = epochMs();
  try {
    const part = new SourcePartStream(job.sampleCount, job.sampleRate, job.settings, job.separate);
    // Each slot is copied out of shared memory first: V8 reads typed arrays over a SharedArrayBuffer
    // several times slower in some kernels (the true peak's block maxima: 144 ms against 10 ms for
    // the 5-minute clip, measured), and the copy costs ~0.1 ms a slot.
    let own = new Float32Array(0);
    const output = drainRing(job.ring, {
      add: (x) => {
        if (own.length < x.length) own = new Float32Array(x.length);
        own.set(x);
        part.add(own, x.length);
      },
      restart: () => undefined,
      result: () => part.result(),
    });
    post({ type: 'source part', output, startMs, endMs: epochMs() }, transferables(output));
  } catch (e) {
    post({ type: 'stream failed', message: e instanceof Error ? e.message : String(e), range: e instanceof RangeError });
  }
  post({ type: 'done' });
}

/**
 * The worker's main loop: says 'ready', then runs each job it is sent.
 * @example serveAnalysisJobs(parentPort!)
 */
export function serveAnalysisJobs(port: MessagePort): void {
  port.on('message', (job: AnalysisJob | StreamJob) => {
    const post = (m: WorkerReply, t?: ArrayBuffer[]) => port.postMessage(m, t ?? []);
    if ('type' in job) runStreamJob(job, post);
    else runAnalysisJob(job, post);
  });
  port.postMessage({ type: 'ready' } satisfies WorkerReply);
}
