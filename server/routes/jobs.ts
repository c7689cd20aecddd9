/** Jobs: read one, or follow it as server-sent events until it ends. */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import { IdParams, type Job, JobSchema, problems } from '../../shared/schemas/api.ts';
import { notFound } from '../plugins/errors.ts';

const HEARTBEAT_MS = 15_000;

const routes: FastifyPluginAsyncTypebox = async (app) => {
  app.get('/jobs/:id', { schema: { params: IdParams, response: { 200: JobSchema, ...problems(404) } } }, async (req) => {
    const job = app.store.getJob(req.params.id);
    if (!job) throw notFound('job', req.params.id);
    return job;
  });

  app.get('/jobs/:id/events', { schema: { params: IdParams, summary: 'Server-sent events: progress, then done or failed', response: { ...problems(404) } } }, async (req, reply) => {
    const job = app.store.getJob(req.params.id);
    if (!job) throw notFound('job', req.params.id);
    reply.hijack();
    const res = reply.raw;
    res.writeHead(200, { 'content-type': 'text/event-stream; charset=utf-8', 'cache-control': 'no-store', connection: 'keep-alive', 'x-content-type-options': 'nosniff' });
    const send = (event: string, j: Job) => res.write(`event: ${event}\ndata: ${JSON.stringify(j)}\n\n`);
    const final = (j: Job) => j.state === 'done' || j.state === 'failed';
    if (final(job)) {
      send(job.state, job);
      res.end();
      return;
    }
    send('progress', job);
    const channel = `job:${job.id}`;
    const onJob = (j: Job) => {
      if (final(j)) {
        send(j.state, j);
        stop();
        res.end();
      } else send('progress', j);
    };
    const beat = setInterval(() => res.write(': keep-alive\n\n'), HEARTBEAT_MS);
    const stop = () => {
      clearInterval(beat);
      app.jobs.events.off(channel, onJob);
    };
    app.jobs.events.on(channel, onJob);
    req.raw.on('close', stop);
    // The job may have ended between the read above and the subscription.
    const now = app.store.getJob(job.id);
    if (now && final(now)) onJob(now);
  });
};

export default routes;
