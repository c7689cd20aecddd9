/** Renders and previews: the record (with the closed-loop verdict) and the WAV. */
import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import { join } from 'node:path';
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import { Type } from 'typebox';
import { IdParams, RenderSchema, problems } from '../../shared/schemas/api.ts';
import { HttpError, notFound } from '../plugins/errors.ts';
import type { StoredRender } from '../storage/store.ts';
import { attachment } from './clips.ts';

export const publicRender = ({ file: _f, request: _r, ...r }: StoredRender) => r;

const routes: FastifyPluginAsyncTypebox = async (app) => {
  const { store, paths } = app;
  app.get('/renders/:id', { schema: { params: IdParams, response: { 200: RenderSchema, ...problems(404) } } }, async (req) => {
    const r = store.getRender(req.params.id);
    if (!r) throw notFound('render', req.params.id);
    return publicRender(r);
  });
  app.get('/renders/:id/audio', { schema: { params: IdParams, summary: 'The rendered WAV', response: { 200: Type.Unknown(), ...problems(404, 409) } } }, async (req, reply) => {
    const r = store.getRender(req.params.id);
    if (!r) throw notFound('render', req.params.id);
    if (r.state !== 'done' || !r.file) throw new HttpError(409, 'not-ready', `the ${r.kind} is ${r.state}; wait for its job (GET /api/jobs/${r.jobId}/events)`, 'id');
    const plan = store.getPlan(r.planId);
    const clip = plan ? store.getClip(plan.clipId) : null;
    const base = (clip?.name ?? 'clip').replace(/\.[A-Za-z0-9]+$/, '');
    const path = join(paths.renders, r.file);
    const size = (await stat(path)).size;
    return reply
      .type('audio/wav')
      .header('content-length', size)
      .header('content-disposition', attachment(`${base}${r.kind === 'render' ? '-coil' : '-arcs'}.wav`))
      .send(createReadStream(path));
  });
};

export default routes;
