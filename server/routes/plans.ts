/**
 * Plans: a clip on a coil and a driver, advised or at a gain (made from a fresh stored analysis,
 * or after one as a job); re-evaluation at another gain and the modulation preview from the
 * stored reductions (never decoding again); renders and previews as jobs.
 */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import {
  EvaluateRequestSchema,
  EvaluateSchema,
  IdParams,
  JobOnlySchema,
  ModulationQuerySchema,
  ModulationSchema,
  PlanRequestSchema,
  PlanSchema,
  RenderRequestSchema,
  RenderStartedSchema,
  problems,
} from '../../shared/schemas/api.ts';
import { gainSearchOf } from '../../shared/plan/advise.ts';
import type { CoilProfile } from '../../shared/schemas/coil.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import { makePlan, planAnalysisSettings, startAnalysis } from '../jobs/work.ts';
import { HttpError, notFound } from '../plugins/errors.ts';
import { engineVersion } from '../services/engine-version.ts';
import { evaluateStored, modulationStored } from '../services/stored-plan.ts';
import type { StoredPlan } from '../storage/store.ts';
import { publicRender } from './renders.ts';

export const publicPlan = ({ settings: _s, search: _g, ...p }: StoredPlan) => p;

const routes: FastifyPluginAsyncTypebox = async (app) => {
  const { store } = app;

  /** The plan, its analysis's reductions and its clip's name; 404/409 when any is missing. */
  async function loaded(id: string) {
    const plan = store.getPlan(id);
    if (!plan) throw notFound('plan', id);
    const a = store.getAnalysis(plan.analysisId);
    if (!a?.reductions) throw new HttpError(409, 'not-ready', 'the analysis behind this plan is not available; make the plan again', 'id');
    const clip = store.getClip(plan.clipId);
    return { plan, reductions: await app.reductions(a.reductions), name: clip?.name ?? plan.clipId };
  }

  app.post(
    '/plans',
    {
      schema: {
        summary: 'Plan a clip on a coil and a driver (201 at once from a fresh analysis, else 202 with the job that analyses it first)',
        body: PlanRequestSchema,
        response: { 201: PlanSchema, 202: JobOnlySchema, ...problems(400, 404, 503) },
      },
    },
    async (req, reply) => {
      const b = req.body;
      const clip = store.getClip(b.clipId);
      if (!clip) throw new HttpError(404, 'not-found', `no clip with id ${b.clipId}; list them with GET /api/clips`, 'clipId');
      if (!store.getProfile<CoilProfile>('coil', b.coilId)) throw new HttpError(404, 'not-found', `no coil with id ${b.coilId}; list them with GET /api/coils`, 'coilId');
      if (!store.getProfile<DriverProfile>('driver', b.driverId)) throw new HttpError(404, 'not-found', `no driver with id ${b.driverId}; list them with GET /api/drivers`, 'driverId');
      const settings = planAnalysisSettings(b.channel);
      if (settings.channel === 'right' && clip.channels < 2) throw new HttpError(400, 'bad-channel', 'channel "right" asked of a mono clip; choose "mix" or "left"', 'channel');
      const intent = { clipId: b.clipId, coilId: b.coilId, driverId: b.driverId, gainDb: b.gainDb ?? null, settings: b.settings ?? {} };
      const a = store.currentAnalysis(clip.id, settings, engineVersion());
      if (a?.state === 'done') return reply.code(201).send(publicPlan(await makePlan(store, app.paths, app.jobs, a.id, intent)));
      const { job } = startAnalysis(store, app.jobs, clip.id, settings, { plan: intent });
      app.jobs.pump();
      return reply.code(202).send({ job });
    },
  );

  app.get('/plans/:id', { schema: { params: IdParams, response: { 200: PlanSchema, ...problems(404) } } }, async (req) => {
    const plan = store.getPlan(req.params.id);
    if (!plan) throw notFound('plan', req.params.id);
    return publicPlan(plan);
  });

  app.post(
    '/plans/:id/evaluate',
    { schema: { summary: 'The plan at another gain, with junction temperatures, from the stored reductions', params: IdParams, body: EvaluateRequestSchema, response: { 200: EvaluateSchema, ...problems(400, 404, 409) } } },
    async (req, reply) => {
      const { plan, reductions, name } = await loaded(req.params.id);
      const started = performance.now();
      // The plan's own gain search (it does not depend on the gain asked for); a plan stored
      // before searches were kept gets its search once, here, and keeps it.
      const { advice, ...out } = evaluateStored(reductions, name, plan.coil as CoilProfile, plan.driver, plan.settings, req.body.gainDb, req.body.columns ?? 1000, plan.search ?? undefined);
      if (!plan.search) store.setPlanSearch(plan.id, 'atAdvised' in advice ? gainSearchOf(advice) : advice);
      // The time this server spent on it (W3C Server Timing), for the benchmark and the page's own figures.
      reply.header('server-timing', `evaluate;dur=${(performance.now() - started).toFixed(1)}`);
      return out;
    },
  );

  app.get(
    '/plans/:id/modulation',
    { schema: { summary: 'The modulation preview on a display grid', params: IdParams, querystring: ModulationQuerySchema, response: { 200: ModulationSchema, ...problems(400, 404, 409) } } },
    async (req) => {
      const { plan, reductions } = await loaded(req.params.id);
      const q = req.query;
      const doc = plan.document as { advisedGainDb?: number | null; evaluatedGainDb?: number | null };
      const gainDb = q.gainDb ?? plan.gainDb ?? doc.advisedGainDb ?? doc.evaluatedGainDb ?? -60;
      const durationS = reductions.analysis.durationS;
      const fromS = Math.min(q.fromS ?? 0, durationS);
      const toS = Math.min(q.toS ?? durationS, durationS);
      if (!(toS > fromS)) throw new HttpError(400, 'bad-range', `toS (${toS}) must be greater than fromS (${fromS}) within the clip's ${durationS.toFixed(1)} s`, 'toS');
      return modulationStored(reductions, plan.coil as CoilProfile, plan.driver, gainDb, q.columns ?? 1000, fromS, toS);
    },
  );

  app.post(
    '/plans/:id/renders',
    { schema: { summary: 'Render the coil-ready clip or the arc-sound preview (a job)', params: IdParams, body: RenderRequestSchema, response: { 202: RenderStartedSchema, ...problems(400, 404, 503) } } },
    async (req, reply) => {
      const plan = store.getPlan(req.params.id);
      if (!plan) throw notFound('plan', req.params.id);
      app.jobs.checkRoom();
      const { render, job } = store.db.transaction(() => {
        const job = store.createJob({ kind: req.body.kind, renderId: '' });
        const render = store.createRender(plan.id, req.body.kind, { ...req.body }, job.id);
        store.db.prepare('UPDATE jobs SET payload = ? WHERE id = ?').run(JSON.stringify({ kind: req.body.kind, renderId: render.id }), job.id);
        return { render, job };
      })();
      app.jobs.pump();
      return reply.code(202).send({ render: publicRender(render), job });
    },
  );
};

export default routes;
