/**
 * The web client: client/dist (the Vite build) served at /, with every other non-API path
 * answered by its index.html (the client routes in the browser). When the client is not built,
 * / says so and how to build it; the API works either way.
 */
import { existsSync } from 'node:fs';
import fastifyStatic from '@fastify/static';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { sendProblem } from './errors.ts';

const NOT_BUILT = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>coilcue</title>
<style>body{font:16px system-ui,sans-serif;max-width:36rem;margin:4rem auto;padding:0 1rem}code{background:#eee;padding:.1rem .3rem}</style></head>
<body><h1>coilcue</h1><p>The server is running, but the web client is not built yet.</p>
<p>Build it with <code>npm run build:client</code> (it writes <code>client/dist/</code>), then reload this page.</p>
<p>The HTTP API answers at <a href="/api/health">/api/health</a>; every route is described at <a href="/api/openapi.json">/api/openapi.json</a>.</p></body></html>`;

async function createClient(app: FastifyInstance): Promise<void> {
  const dir = app.config.clientDir;
  const built = existsSync(`${dir}/index.html`);
  if (built) {
    await app.register(fastifyStatic, { root: dir, prefix: '/', wildcard: false, index: 'index.html' });
  }
  app.get('/*', async (req, reply) => {
    const path = req.url.split('?')[0];
    if (path === '/api' || path.startsWith('/api/')) {
      return sendProblem(reply, { type: 'https://coilcue.invalid/problems/no-route', title: 'Not found', status: 404, code: 'no-route', detail: `no route GET ${path}; GET /api/openapi.json lists every route` });
    }
    if (!built) return reply.type('text/html; charset=utf-8').send(NOT_BUILT);
    return reply.sendFile('index.html');
  });
}

export default fp(createClient, { name: 'client', dependencies: ['errors'] });
