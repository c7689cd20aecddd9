/** The API under /api: every route file, registered explicitly. */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import analyses from './analyses.ts';
import clips from './clips.ts';
import jobs from './jobs.ts';
import plans from './plans.ts';
import profiles from './profiles.ts';
import renders from './renders.ts';
import service from './service.ts';
import sets from './sets.ts';

export const apiRoutes: FastifyPluginAsyncTypebox = async (app) => {
  await app.register(service);
  await app.register(jobs);
  await app.register(clips);
  await app.register(analyses);
  await app.register(profiles);
  await app.register(plans);
  await app.register(renders);
  await app.register(sets);
};
