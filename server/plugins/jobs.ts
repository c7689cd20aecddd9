/**
 * Jobs: the worker-thread pool and the job rows (server/jobs/runner.ts). At start, jobs a stopped
 * server left running are re-queued (or failed with a reason after a second interruption); at
 * close, running jobs get a few seconds to finish and the rest go back to the queue.
 */
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { JobRunner } from '../jobs/runner.ts';
import { executorFor } from '../jobs/work.ts';

declare module 'fastify' {
  interface FastifyInstance {
    jobs: JobRunner;
  }
}

async function createJobs(app: FastifyInstance): Promise<void> {
  const { requeued, failed } = app.store.recoverInterrupted();
  if (requeued.length || failed.length) app.log.warn({ requeued, failed }, 'jobs interrupted by the last stop');
  // Analyses and renders that were running follow their jobs back to the queue.
  app.store.db.exec("UPDATE analyses SET state = 'queued' WHERE state = 'running'; UPDATE renders SET state = 'queued' WHERE state = 'running'");
  for (const id of failed) {
    app.store.db.prepare("UPDATE analyses SET state = 'failed' WHERE job_id = ? AND state != 'done'").run(id);
    app.store.db.prepare("UPDATE renders SET state = 'failed' WHERE job_id = ? AND state != 'done'").run(id);
  }
  const runner = new JobRunner(app.store, app.paths, app.config, executorFor(app.store, app.paths), app.log);
  app.decorate('jobs', runner);
  app.addHook('onReady', async () => runner.pump());
  app.addHook('preClose', async () => runner.close());
}

export default fp(createJobs, { name: 'jobs', dependencies: ['storage'] });
