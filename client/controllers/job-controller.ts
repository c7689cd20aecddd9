/**
 * Follows long work on the server (analysis, set plan, render) through its server-sent events
 * (`GET /api/jobs/:id/events`): `progress` events update `job` and request a render of the host;
 * `done` or `failed` settle the promise `watch` returned. Closes its stream when the host leaves
 * the page. If the stream breaks before the end, it asks `GET /api/jobs/:id` once and, if the
 * job is still going, listens again.
 */
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import { ApiError, getJob, jobEventsUrl, type Job } from '../api.ts';

export class JobController implements ReactiveController {
  /** The job as last reported (null before the first watch). */
  job: Job | null = null;
  private source: EventSource | null = null;
  private settle: ((job: Job) => void) | null = null;
  private fail: ((e: Error) => void) | null = null;

  constructor(private readonly host: ReactiveControllerHost) {
    host.addController(this);
  }

  hostConnected(): void {}

  hostDisconnected(): void {
    this.close();
  }

  /** Listens to the job until it ends; resolves with the finished job, rejects with its error. */
  watch(job: Job): Promise<Job> {
    this.close();
    this.job = job;
    this.host.requestUpdate();
    return new Promise<Job>((resolve, reject) => {
      this.settle = resolve;
      this.fail = reject;
      if (job.state === 'done' || job.state === 'failed') this.finish(job);
      else this.open(job.id);
    });
  }

  private open(id: string): void {
    const es = new EventSource(jobEventsUrl(id));
    this.source = es;
    const update = (e: MessageEvent<string>): Job => {
      const j = JSON.parse(e.data) as Job;
      this.job = j;
      this.host.requestUpdate();
      return j;
    };
    es.addEventListener('progress', (e) => update(e as MessageEvent<string>));
    es.addEventListener('done', (e) => this.finish(update(e as MessageEvent<string>)));
    es.addEventListener('failed', (e) => this.finish(update(e as MessageEvent<string>)));
    es.onerror = () => {
      if (this.source !== es) return;
      es.close();
      this.source = null;
      getJob(id)
        .then((j) => {
          this.job = j;
          this.host.requestUpdate();
          if (j.state === 'done' || j.state === 'failed') this.finish(j);
          else setTimeout(() => this.settle && this.open(id), 500);
        })
        .catch((err: Error) => this.reject(err));
    };
  }

  private finish(job: Job): void {
    this.close();
    const resolve = this.settle;
    const reject = this.fail;
    this.settle = this.fail = null;
    if (job.state === 'done') resolve?.(job);
    else reject?.(new ApiError(422, job.error?.code ?? 'job-failed', job.error?.detail ?? `the ${job.kind} failed; try again`, job.error?.field ?? null));
  }

  private reject(err: Error): void {
    this.close();
    const reject = this.fail;
    this.settle = this.fail = null;
    reject?.(err);
  }

  private close(): void {
    this.source?.close();
    this.source = null;
  }
}
