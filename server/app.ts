/**
 * The Fastify app (tests import this): `buildApp(config)` registers the plugins, one capability
 * each, in order (errors, storage, jobs, security, OpenAPI, demo data, the API routes, the web
 * client) and never listens; server/main.ts does that.
 */
import swagger from '@fastify/swagger';
import { TypeBoxValidatorCompiler } from '@fastify/type-provider-typebox';
import Fastify, { type FastifyInstance } from 'fastify';
import type { ServerConfig } from './config.ts';
import client from './plugins/client.ts';
import demo from './plugins/demo.ts';
import errors from './plugins/errors.ts';
import jobs from './plugins/jobs.ts';
import security from './plugins/security.ts';
import storage from './plugins/storage.ts';
import { apiRoutes } from './routes/index.ts';
import { packageVersion } from './services/engine-version.ts';

export async function buildApp(config: ServerConfig): Promise<FastifyInstance> {
  const app = Fastify({
    logger: config.logLevel === false ? false : { level: config.logLevel },
    bodyLimit: config.bodyLimitBytes,
    // Seeding the demo data synthesises three clips: seconds on a busy machine, more than the default 10 s allows.
    pluginTimeout: 120_000,
    // Routes answer with plain JSON documents; the schemas describe them (OpenAPI) and check inputs.
    ajv: undefined,
  });
  app.setValidatorCompiler(TypeBoxValidatorCompiler);
  app.setSerializerCompiler(() => (data) => JSON.stringify(data));
  await app.register(errors);
  await app.register(storage, { config });
  await app.register(jobs);
  await app.register(security);
  await app.register(swagger, {
    openapi: {
      openapi: '3.0.3',
      info: { title: 'coilcue', version: packageVersion(), description: 'Fits music to audio-modulated resonant coils and keeps their transistors alive. The contract: docs/api.md.' },
      components: { securitySchemes: { bearer: { type: 'http', scheme: 'bearer' } } },
    },
  });
  await app.register(demo);
  await app.register(apiRoutes, { prefix: '/api' });
  await app.register(client);
  return app;
}
