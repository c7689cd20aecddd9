/**
 * The analysis worker's side of analyze-stream.ts: it takes one job, the source part of a file's
 * analysis, drains the ring of shared slots the modulation source comes through (sample-ring.ts)
 * into a SourcePartStream (shared/analysis/stream.ts) as the main thread decodes, and posts the
 * figures back, their typed arrays transferred, not copied.
 *
 * worker-entry.cjs starts it inside the thread; importing this module does nothing by itself.
 */
import type { MessagePort } from 'node:worker_threads';
import { type SourcePartFigures, SourcePartStream } from '../../shared/analysis/stream.ts';
import type { SourceTaskSettings } from '../../shared/analysis/tasks.ts';
import { type Ring, arrayBuffersOf, drainRing, markStopped } from '../services/sample-ring.ts';

/** The source part of one analysis, handed to the worker. */
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
  | { type: 'source part'; output: SourcePartFigures; startMs: number; endMs: number }
  | { type: 'stream failed'; message: string; range: boolean }
  | { type: 'done' };

/** Epoch time in ms with sub-ms resolution, comparable between threads (each has its own timeOrigin). @example epochMs() - Date.now() // ≈ 0 */
export const epochMs = (): number => performance.timeOrigin + performance.now();

/**
 * Drains a job's ring into the source part and posts its figures (or the failure: a RangeError
 * stays one), then 'done'.
 *
 * @example runStreamJob(job, (m, t) => port.postMessage(m, t))
 */
export function runStreamJob(job: StreamJob, post: (m: WorkerReply, transfer?: ArrayBuffer[]) => void): void {
  const startMs = epochMs();
  try {
    const part = new SourcePartStream(job.sampleCount, job.sampleRate, job.settings, job.separate);
    // The slots are read where they lie, in shared memory: each measurement that reads a block
    // more than once works on a copy of its own (V8 reads typed arrays over a SharedArrayBuffer
    // several times slower in some kernels: the true peak's block maxima took 144 ms against 10 ms
    // for the 5-minute clip, measured).
    const output = drainRing(job.ring, { add: (x) => part.add(x), restart: () => undefined, result: () => part.result() });
    post({ type: 'source part', output, startMs, endMs: epochMs() }, arrayBuffersOf(output));
  } catch (e) {
    markStopped(job.ring); // (drainRing does so itself; a job that failed before it must too)
    post({ type: 'stream failed', message: e instanceof Error ? e.message : String(e), range: e instanceof RangeError });
  }
  post({ type: 'done' });
}

/**
 * The worker's main loop: says 'ready', then runs each job it is sent.
 * @example serveAnalysisJobs(parentPort!)
 */
export function serveAnalysisJobs(port: MessagePort): void {
  port.on('message', (job: StreamJob) => runStreamJob(job, (m, t) => port.postMessage(m, t ?? [])));
  port.postMessage({ type: 'ready' } satisfies WorkerReply);
}
