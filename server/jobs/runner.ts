/**
 * Jobs: rows in the database (queued → running → done | failed with a reason) run in a bounded
 * pool of worker threads (piscina), at most `jobThreads` at once, each with a time limit; the
 * event loop only writes rows and answers requests. Progress goes to listeners (the server-sent
 * events route) as it comes and to the row at most every 250 ms. A queue past its limit refuses
 * new work (QueueFullError → 503 with Retry-After).
 *
 * What runs where: a job thread decodes the clip and runs the analysis, which itself uses a second
 * thread (server/analysis/analyze-stream.ts), so one analysis keeps two cores busy; the pool is
 * sized to the cores, so two analyses at once share them. Gain searches for new plans also run in
 * the pool (awaited by the request, not rows); a re-evaluation at a gain is fast enough to run in
 * the event loop (server/services/stored-plan.ts).
 */
import { EventEmitter } from 'node:events';
import { join } from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { Job } from '../../shared/schemas/api.ts';
import type { ServerConfig } from '../config.ts';
import { type DataPaths, removeQuietly, tempPath } from '../storage/files.ts';
import type { JobPayload, Store } from '../storage/store.ts';
import type { ProgressMessage, Task, TaskResult } from './tasks.ts';

const WORKER = new URL('./job-worker.cjs', import.meta.url).pathname;

/** The queue is full: answer 503 with Retry-After. */
export class QueueFullError extends Error {
  override readonly name = 'QueueFullError';
  constructor(readonly retryAfterS: number) {
    super(`the job queue is full; try again in ${retryAfterS} s`);
  }
}

/** A task that ended with a reason a person can act on. */
export class TaskFailure extends Error {
  override readonly name = 'TaskFailure';
  constructor(
    readonly code: string,
    detail: string,
    readonly field?: string,
  ) {
    super(detail);
  }
}

/** Runs a job's work from its row; returns the id of what it made (resultId). Thrown TaskFailures become the row's reason. */
export type JobExecutor = (job: Job, payload: JobPayload, runner: JobRunner) => Promise<string | null>;

export class JobRunner {
  readonly events = new EventEmitter();
  private readonly pool: Piscina<Task, TaskResult>;
  private readonly running = new Map<string, AbortController>();
  private closing = false;
  private lastWrite = new Map<string, number>();

  constructor(
    private readonly store: Store,
    private readonly paths: DataPaths,
    private readonly config: ServerConfig,
    private readonly executor: JobExecutor,
    private readonly log: { warn(o: object, m: string): void; error(o: object, m: string): void },
  ) {
    this.pool = new Piscina<Task, TaskResult>({ filename: WORKER, minThreads: 1, maxThreads: config.jobThreads, idleTimeout: 60_000 });
    this.events.setMaxListeners(0);
  }

  /** Jobs waiting and running. */
  depth(): { queued: number; running: number } {
    return { queued: this.store.countJobs('queued'), running: this.store.countJobs('running') };
  }

  /** Refuses when the queue is full (QueueFullError). */
  checkRoom(): void {
    const d = this.depth();
    if (d.queued + d.running >= this.config.queueLimit) {
      // A job's typical length on this machine is tens of seconds; ask to come back after one.
      throw new QueueFullError(Math.max(5, Math.min(120, 10 * Math.ceil((d.queued + 1) / this.config.jobThreads))));
    }
  }

  /** Creates the job row (QueueFullError when full) and starts it when a thread is free. */
  enqueue(payload: JobPayload): Job {
    this.checkRoom();
    const job = this.store.createJob(payload);
    this.emit(job);
    queueMicrotask(() => this.pump());
    return job;
  }

  /** Starts queued jobs while threads are free. */
  pump(): void {
    if (this.closing) return;
    for (const id of this.store.queuedJobIds()) {
      if (this.running.size >= this.config.jobThreads) return;
      if (this.running.has(id)) continue;
      void this.execute(id);
    }
  }

  private emit(job: Job): void {
    this.events.emit('job', job);
    this.events.emit(`job:${job.id}`, job);
  }

  private async execute(id: string): Promise<void> {
    const ctrl = new AbortController();
    this.running.set(id, ctrl);
    const job = this.store.startJob(id)!;
    this.emit(job);
    const payload = this.store.jobPayload(id)!;
    try {
      const resultId = await this.executor(job, payload, this);
      if (this.closing && ctrl.signal.aborted) return;
      this.emit(this.store.updateJob(id, { state: 'done', progress: 1, stage: 'done', resultId })!);
    } catch (e) {
      if (this.closing) return; // left for the next start to re-queue
      const f = e instanceof TaskFailure ? e : null;
      if (!f) this.log.error({ err: e, jobId: id }, 'job failed');
      const error = f
        ? { code: f.code, detail: f.message, ...(f.field ? { field: f.field } : {}) }
        : { code: 'internal', detail: 'internal error while running the job; the server log has the details' };
      this.emit(this.store.updateJob(id, { state: 'failed', stage: 'failed', error })!);
    } finally {
      this.running.delete(id);
      this.lastWrite.delete(id);
      this.pump();
    }
  }

  /** Progress of a running job: to listeners at once, to the row at most every 250 ms. */
  progress(id: string, fraction: number, stage: string): void {
    const t = Date.now();
    const p = Math.max(0, Math.min(0.999, fraction));
    if (t - (this.lastWrite.get(id) ?? 0) >= 250) {
      this.lastWrite.set(id, t);
      const job = this.store.updateJob(id, { progress: p, stage });
      if (job) this.emit(job);
    } else {
      const job = this.store.getJob(id);
      if (job) this.emit({ ...job, progress: p, stage });
    }
  }

  /**
   * Runs one task in the pool with the time limit; progress to `onProgress`. Resolves with the
   * task's value; throws TaskFailure for an input error or the time limit.
   */
  async run(task: Task, onProgress?: (fraction: number, stage: string) => void, jobId?: string): Promise<unknown> {
    const ch = new MessageChannel();
    ch.port1.on('message', (m: ProgressMessage) => onProgress?.(m.fraction, m.stage));
    const limitS = this.config.jobTimeoutS;
    const signal = AbortSignal.any([AbortSignal.timeout(limitS * 1000), ...(jobId && this.running.get(jobId) ? [this.running.get(jobId)!.signal] : [])]);
    try {
      const r = await this.pool.run({ ...task, port: ch.port2 } as Task, { transferList: [ch.port2], signal });
      if (!r.ok) throw new TaskFailure(r.code, r.detail, r.field);
      return r.value;
    } catch (e) {
      if (e instanceof TaskFailure) throw e;
      if ((e as Error).name === 'AbortError' || signal.aborted) {
        if (this.closing) throw new TaskFailure('interrupted', 'the server stopped while this job ran; it will run again at the next start');
        throw new TaskFailure('timeout', `the job ran longer than its ${limitS} s limit and was stopped; try a shorter clip`);
      }
      throw e;
    } finally {
      ch.port1.close();
    }
  }

  /** A fresh temporary path and its final path under `folder` (analyses or renders). */
  files(folder: 'analyses' | 'renders', name: string): { tmpPath: string; finalPath: string } {
    return { tmpPath: tempPath(this.paths), finalPath: join(this.paths[folder], name) };
  }

  removeTemp(path: string): Promise<void> {
    return removeQuietly(path);
  }

  /**
   * Stops taking jobs, gives running ones `graceMs` to finish, then stops the threads; jobs still
   * running go back to the queue (without counting the attempt) for the next start.
   */
  async close(graceMs = 5000): Promise<void> {
    this.closing = true;
    const deadline = Date.now() + graceMs;
    while (this.running.size && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    for (const [id, ctrl] of this.running) {
      ctrl.abort();
      try {
        this.store.db.prepare("UPDATE jobs SET state = 'queued', stage = 'queued', progress = 0, attempts = MAX(0, attempts - 1) WHERE id = ?").run(id);
      } catch {
        /* database already closed */
      }
    }
    await this.pool.destroy();
  }
}
