/** Sets: create, read, replace (reorder, gaps, gains), delete, and plan (a job). */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import { Type } from 'typebox';
import { IdParams, JobOnlySchema, SetListSchema, type SetRequest, SetPlanSchema, SetRequestSchema, ShowSetSchema, problems } from '../../shared/schemas/api.ts';
import { HttpError, notFound } from '../plugins/errors.ts';

const routes: FastifyPluginAsyncTypebox = async (app) => {
  const { store } = app;

  /** 404 naming the field when the set refers to a coil, driver or clip that does not exist. */
  function check(s: SetRequest): void {
    if (!store.getProfile('coil', s.coilId)) throw new HttpError(404, 'not-found', `no coil with id ${s.coilId}; list them with GET /api/coils`, 'coilId');
    if (!store.getProfile('driver', s.driverId)) throw new HttpError(404, 'not-found', `no driver with id ${s.driverId}; list them with GET /api/drivers`, 'driverId');
    s.items.forEach((it, i) => {
      if (!store.getClip(it.clipId)) throw new HttpError(404, 'not-found', `items.${i}.clipId: no clip with id ${it.clipId}; list them with GET /api/clips`, `items.${i}.clipId`);
    });
  }

  app.get('/sets', { schema: { response: { 200: SetListSchema } } }, async () => ({ items: store.listSets() }));
  app.post('/sets', { schema: { body: SetRequestSchema, response: { 201: ShowSetSchema, ...problems(400, 404) } } }, async (req, reply) => {
    check(req.body);
    return reply.code(201).send(store.insertSet(req.body));
  });
  app.get('/sets/:id', { schema: { params: IdParams, response: { 200: ShowSetSchema, ...problems(404) } } }, async (req) => {
    const s = store.getSet(req.params.id);
    if (!s) throw notFound('set', req.params.id);
    return s;
  });
  app.put('/sets/:id', { schema: { summary: 'Replace a set (reorder: send the items in the new order)', params: IdParams, body: SetRequestSchema, response: { 200: ShowSetSchema, ...problems(400, 404) } } }, async (req) => {
    if (!store.getSet(req.params.id)) throw notFound('set', req.params.id);
    check(req.body);
    return store.updateSet(req.params.id, req.body)!;
  });
  app.delete('/sets/:id', { schema: { params: IdParams, response: { 204: Type.Null(), ...problems(404) } } }, async (req, reply) => {
    if (!store.deleteSet(req.params.id)) throw notFound('set', req.params.id);
    return reply.code(204).send(null);
  });
  app.post('/sets/:id/plan', { schema: { summary: 'Plan the set (a job; clips without a fresh analysis are analysed first)', params: IdParams, response: { 202: JobOnlySchema, ...problems(404, 503) } } }, async (req, reply) => {
    if (!store.getSet(req.params.id)) throw notFound('set', req.params.id);
    const job = app.jobs.enqueue({ kind: 'set-plan', setId: req.params.id });
    return reply.code(202).send({ job });
  });
  app.get('/sets/:id/plan', { schema: { summary: 'The last plan of the set', params: IdParams, response: { 200: SetPlanSchema, ...problems(404) } } }, async (req) => {
    if (!store.getSet(req.params.id)) throw notFound('set', req.params.id);
    const r = store.getSetResult<{ result: Record<string, unknown>; temperatures: never }>(req.params.id);
    if (!r) throw new HttpError(404, 'no-plan', 'the set has no plan yet (or it changed since); POST /api/sets/{id}/plan makes one', 'id');
    return r;
  });
};

export default routes;
