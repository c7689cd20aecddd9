/** Analyses: start one for a clip (a job), list and read them, and the chart data of one. */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import {
  AnalysisListSchema,
  AnalysisRequestSchema,
  AnalysisSchema,
  AnalysisStartedSchema,
  DisplayQuerySchema,
  DisplaySchema,
  IdParams,
  problems,
} from '../../shared/schemas/api.ts';
import { startAnalysis } from '../jobs/work.ts';
import { HttpError, notFound } from '../plugins/errors.ts';
import { DEFAULT_DISPLAY_COLUMNS, displayOf } from '../services/display.ts';
import { engineVersion } from '../services/engine-version.ts';
import type { StoredAnalysis } from '../storage/store.ts';

/** The API's view of a stored analysis (the file name stays inside). */
export const publicAnalysis = ({ reductions: _r, ...a }: StoredAnalysis) => a;

const routes: FastifyPluginAsyncTypebox = async (app) => {
  const { store } = app;

  app.post(
    '/clips/:id/analyses',
    {
      schema: {
        summary: 'Analyse a clip (a job); a fresh stored analysis with the same settings answers at once',
        params: IdParams,
        body: AnalysisRequestSchema,
        response: { 200: AnalysisStartedSchema, 202: AnalysisStartedSchema, ...problems(400, 404, 503) },
      },
    },
    async (req, reply) => {
      const clip = store.getClip(req.params.id);
      if (!clip) throw notFound('clip', req.params.id);
      const settings = { channel: req.body?.channel ?? 'mix', frameMs: req.body?.frameMs ?? 1 } as const;
      if (settings.channel === 'right' && clip.channels < 2) {
        throw new HttpError(400, 'bad-channel', 'channel "right" asked of a mono clip; choose "mix" or "left"', 'channel');
      }
      const current = store.currentAnalysis(clip.id, settings, engineVersion());
      if (current && current.jobId) {
        const job = store.getJob(current.jobId);
        if (job && (current.state === 'done' || current.state === 'queued' || current.state === 'running')) {
          return reply.code(current.state === 'done' ? 200 : 202).send({ analysis: publicAnalysis(current), job });
        }
      }
      const { analysis, job } = startAnalysis(store, app.jobs, clip.id, settings);
      app.jobs.pump();
      return reply.code(202).send({ analysis: publicAnalysis(analysis), job });
    },
  );

  app.get('/clips/:id/analyses', { schema: { params: IdParams, response: { 200: AnalysisListSchema, ...problems(404) } } }, async (req) => {
    if (!store.getClip(req.params.id)) throw notFound('clip', req.params.id);
    return { items: store.listAnalyses(req.params.id).map(publicAnalysis) };
  });

  app.get('/analyses/:id', { schema: { params: IdParams, response: { 200: AnalysisSchema, ...problems(404) } } }, async (req) => {
    const a = store.getAnalysis(req.params.id);
    if (!a) throw notFound('analysis', req.params.id);
    return publicAnalysis(a);
  });

  app.get(
    '/analyses/:id/display',
    { schema: { summary: 'Chart data on a display grid', params: IdParams, querystring: DisplayQuerySchema, response: { 200: DisplaySchema, ...problems(400, 404, 409) } } },
    async (req) => {
      const a = store.getAnalysis(req.params.id);
      if (!a) throw notFound('analysis', req.params.id);
      if (a.state !== 'done' || !a.reductions) throw new HttpError(409, 'not-ready', `the analysis is ${a.state}; wait for its job (GET /api/jobs/${a.jobId}/events)`, 'id');
      const { fromS, toS } = req.query;
      if (fromS !== undefined && toS !== undefined && !(toS > fromS)) throw new HttpError(400, 'bad-range', `toS (${toS}) must be greater than fromS (${fromS})`, 'toS');
      const r = await app.reductions(a.reductions);
      return displayOf(r.analysis, req.query.columns ?? DEFAULT_DISPLAY_COLUMNS, fromS, toS);
    },
  );
};

export default routes;
