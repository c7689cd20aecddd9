/** Health, version, cautions and the OpenAPI description. */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import { COIL_CAUTIONS } from '../../shared/physics/coil/voltage.ts';
import { CautionsSchema, HealthSchema, VersionSchema } from '../../shared/schemas/api.ts';
import { Type } from 'typebox';
import { RENDER_CAUTION } from '../services/render.ts';
import { engineVersion, packageVersion } from '../services/engine-version.ts';

/** The topic of each of the coil report's cautions, in their order (shared/physics/coil/voltage.ts). */
const TOPICS = ['rf-burns', 'high-voltage', 'ozone', 'radio', 'fire', 'hearing', 'mains'] as const;

const routes: FastifyPluginAsyncTypebox = async (app) => {
  app.get('/health', { schema: { summary: 'Is the server up, its database reachable, how deep the job queue', response: { 200: HealthSchema, 503: HealthSchema } } }, async (_req, reply) => {
    const database = app.store.reachable() ? 'ok' : 'unreachable';
    const d = database === 'ok' ? app.jobs.depth() : { queued: 0, running: 0 };
    const body = { ok: database === 'ok', database, queueDepth: d.queued, running: d.running } as const;
    return reply.code(body.ok ? 200 : 503).send(body);
  });
  app.get('/version', { schema: { response: { 200: VersionSchema } } }, async () => ({ name: 'coilcue' as const, version: packageVersion(), engineVersion: engineVersion() }));
  app.get('/cautions', { schema: { summary: 'The safety cautions, the same wording as the command line', response: { 200: CautionsSchema } } }, async () => ({
    summary: RENDER_CAUTION,
    items: COIL_CAUTIONS.map((text, i) => ({ topic: TOPICS[i] ?? 'high-voltage', text })),
  }));
  app.get('/openapi.json', { schema: { summary: 'This description (OpenAPI 3)', response: { 200: Type.Object({}, { additionalProperties: true }) } } }, async () => app.swagger());
};

export default routes;
