/**
 * The analysis worker thread as the main thread holds it (analyze-stream.ts gives it its job).
 * Kept apart from the analysis modules so a command can start the worker before loading them:
 * the thread loads its own modules meanwhile (~0.15 s on an idle machine, measured), and the
 * command's loading and decoding overlap that.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { StreamJob, WorkerReply } from './worker-tasks.ts';

const WORKER_ENTRY = new URL('./worker-entry.cjs', import.meta.url);

/** What a job hears from its worker: the worker's replies, or that it is gone. */
export type Reply = WorkerReply | { type: 'gone' };

/**
 * A worker thread for one analysis (analyzeFileStream). It begins loading at once; until a job is
 * submitted it does not keep the process alive. `available` is false once it has failed, been
 * terminated or been given its job.
 *
 * @example const w = new AnalysisWorker(); (await w.ready) // true once its modules are loaded
 */
export class AnalysisWorker {
  private worker: Worker | null = null;
  private onReply: ((m: Reply) => void) | null = null;
  private dead = false;
  private submitted = false;
  /** Resolves true when the worker has loaded its modules, false if it failed to start. */
  readonly ready: Promise<boolean>;

  /** `entry`: the worker's script (default worker-entry.cjs); null for none (the analysis stays in this thread). */
  constructor(entry: URL | null = WORKER_ENTRY) {
    let settle: (ok: boolean) => void = () => undefined;
    this.ready = new Promise((resolve) => (settle = resolve));
    try {
      if (entry === null) throw new RangeError('no worker');
      // A small young generation: the worker allocates typed arrays (outside the V8 heap) and few
      // objects, and the default semi-spaces cost ~7 MiB of peak RSS (measured on the 5-minute bench).
      this.worker = new Worker(entry, { resourceLimits: { maxYoungGenerationSizeMb: 2 } });
    } catch {
      this.dead = true;
      settle(false);
      return;
    }
    const worker = this.worker;
    worker.unref();
    worker.on('message', (m: WorkerReply) => {
      if (m.type === 'ready') settle(true);
      else this.onReply?.(m);
    });
    const gone = () => {
      settle(false);
      this.stop();
    };
    worker.on('error', gone);
    worker.on('exit', gone);
  }

  /** Marks the worker gone and tells the job, once. */
  private stop(): void {
    const reply = this.onReply;
    this.dead = true;
    this.onReply = null;
    reply?.({ type: 'gone' });
  }

  /** False once the worker has failed, exited or been terminated, or has a job already. */
  get available(): boolean {
    return !this.dead && !this.submitted;
  }

  /** Sends the one job this worker will do; replies go to `onReply`. False (and nothing sent) if not available. */
  submit(job: StreamJob, onReply: (m: Reply) => void): boolean {
    if (!this.available || !this.worker) return false;
    this.submitted = true;
    this.onReply = onReply;
    this.worker.ref(); // its replies must keep the process alive
    this.worker.postMessage(job);
    return true;
  }

  /** Stops the thread (idempotent); a job in progress is told the worker is gone. Resolves when it has exited. */
  async terminate(): Promise<void> {
    const w = this.worker;
    this.worker = null;
    this.stop();
    if (!w) return;
    w.unref();
    await w.terminate().catch(() => undefined);
  }
}

const newWorker = (): AnalysisWorker => new AnalysisWorker(availableParallelism() > 1 ? WORKER_ENTRY : null);

let early: AnalysisWorker | null = null;

/**
 * Starts a worker now for the next startAnalysisWorker() to take: the command line calls it before
 * loading a command that analyses a clip. Idempotent; a worker never taken does not keep the
 * process alive.
 *
 * @example prestartAnalysisWorker(); const { analyzeCommand } = await import('./analyze.ts');
 */
export function prestartAnalysisWorker(): void {
  early ??= newWorker();
}

/**
 * A worker for analyzeFileStream: the one prestartAnalysisWorker() started, if it is still
 * available, or a new one; do it before decoding so its start-up overlaps the decoding. Never
 * throws: a worker that cannot start only makes the analysis single-threaded. On a machine with one
 * core no thread is started (it could only slow the analysis down).
 *
 * @example const worker = startAnalysisWorker(); await analyzeFileStream(file, { worker })
 */
export function startAnalysisWorker(): AnalysisWorker {
  const w = early;
  early = null;
  return w?.available ? w : newWorker();
}

/**
 * Ends the worker prestartAnalysisWorker() started when no analysis took it (the command failed or
 * finished before analysing), so no thread outlives the command. Idempotent; resolves when it has exited.
 */
export async function releasePrestartedWorker(): Promise<void> {
  const w = early;
  early = null;
  await w?.terminate();
}
