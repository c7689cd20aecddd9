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

/** Messages from the worker. Times are epoch milliseconds (performance.timeOrigin + performance.now()). */
export type WorkerReply =
  | { type: 'ready' }
  | { type: 'result'; task: AnalysisTask; output: TaskOutputs[AnalysisTask]; startMs: number; endMs: number }
  | { type: 'failed'; task: AnalysisTask; message: string }
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
 * The worker's main loop: says 'ready', then runs each job it is sent.
 * @example serveAnalysisJobs(parentPort!)
 */
export function serveAnalysisJobs(port: MessagePort): void {
  port.on('message', (job: AnalysisJob) => runAnalysisJob(job, (m, t) => port.postMessage(m, t ?? [])));
  port.postMessage({ type: 'ready' } satisfies WorkerReply);
}
