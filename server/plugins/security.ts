/**
 * Security: response headers with a content security policy the web client (a Vite build served
 * from this origin, Lit with adopted style sheets) passes; a per-client rate limit on the API; and,
 * when an access token is configured, a sign-in: every /api request must carry the token as a
 * bearer header or in the cookie the small page at /signin sets.
 */
import { createHash, timingSafeEqual } from 'node:crypto';
import helmet from '@fastify/helmet';
import rateLimit from '@fastify/rate-limit';
import type { FastifyInstance, FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { HttpError, sendProblem } from './errors.ts';

export const COOKIE = 'coilcue_token';

/** The content security policy (docs/api.md repeats it for the client). */
export const CSP_DIRECTIVES = {
  defaultSrc: ["'self'"],
  scriptSrc: ["'self'"],
  styleSrc: ["'self'", "'unsafe-inline'"],
  connectSrc: ["'self'"],
  mediaSrc: ["'self'", 'blob:'],
  imgSrc: ["'self'", 'data:', 'blob:'],
  fontSrc: ["'self'"],
  objectSrc: ["'none'"],
  baseUri: ["'self'"],
  formAction: ["'self'"],
  frameAncestors: ["'none'"],
  upgradeInsecureRequests: null,
};

const digest = (s: string): Buffer => createHash('sha256').update(s).digest();

function cookieValue(header: string | undefined, name: string): string | null {
  for (const part of (header ?? '').split(';')) {
    const [k, ...v] = part.trim().split('=');
    if (k === name) {
      try {
        return decodeURIComponent(v.join('='));
      } catch {
        return null;
      }
    }
  }
  return null;
}

const page = (body: string): string =>
  `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>coilcue: sign in</title>` +
  `<style>body{font:16px system-ui,sans-serif;max-width:28rem;margin:4rem auto;padding:0 1rem}input,button{font:inherit;padding:.4rem}label{display:block;margin:.5rem 0}</style></head><body>${body}</body></html>`;

const FORM = (msg: string) =>
  page(
    `<h1>coilcue</h1><p>This server asks for its access token (COILCUE_TOKEN, or the file access-token in its data folder).</p>${msg}` +
      `<form method="post" action="/signin"><label for="token">Access token</label><input id="token" name="token" type="password" autocomplete="current-password" required size="40"> <button type="submit">Sign in</button></form>`,
  );

async function createSecurity(app: FastifyInstance): Promise<void> {
  const { config } = app;
  await app.register(helmet, { contentSecurityPolicy: { useDefaults: false, directives: CSP_DIRECTIVES }, hsts: false });
  if (config.rateLimitPerMinute > 0) {
    await app.register(rateLimit, {
      global: true,
      max: config.rateLimitPerMinute,
      timeWindow: 60_000,
      // The client's own files and the health probe are not limited; the API's work is.
      allowList: (req: FastifyRequest) => !req.url.startsWith('/api/') || req.url === '/api/health',
      errorResponseBuilder: (_req, ctx) =>
        new HttpError(429, 'rate-limited', `more than ${ctx.max} requests in a minute from this client; wait ${Math.ceil(ctx.ttl / 1000)} s`, undefined, {
          'retry-after': String(Math.ceil(ctx.ttl / 1000)),
        }),
    });
  }
  if (config.token === null) return;
  const want = digest(config.token);
  const ok = (given: string | null) => given !== null && timingSafeEqual(digest(given), want);
  app.addHook('onRequest', async (req, reply) => {
    if (!req.url.startsWith('/api/') && req.url !== '/api') return;
    const auth = req.headers.authorization;
    const bearer = auth?.startsWith('Bearer ') ? auth.slice(7).trim() : null;
    if (ok(bearer) || ok(cookieValue(req.headers.cookie, COOKIE))) return;
    return sendProblem(
      reply,
      { type: 'https://coilcue.invalid/problems/sign-in', title: 'Sign-in needed', status: 401, code: 'sign-in', detail: 'this server needs its access token: sign in at /signin, or send "Authorization: Bearer <token>"' },
      { 'www-authenticate': 'Bearer realm="coilcue"' },
    );
  });
  app.addContentTypeParser('application/x-www-form-urlencoded', { parseAs: 'string', bodyLimit: 4096 }, (_req, body, done) => {
    done(null, Object.fromEntries(new URLSearchParams(body as string)));
  });
  app.get('/signin', async (_req, reply) => reply.type('text/html; charset=utf-8').send(FORM('')));
  app.post('/signin', async (req, reply) => {
    const token = (req.body as { token?: string } | null)?.token ?? null;
    if (!ok(token)) return reply.code(401).type('text/html; charset=utf-8').send(FORM('<p role="alert"><strong>That token is not right.</strong> Check it and try again.</p>'));
    return reply
      .header('set-cookie', `${COOKIE}=${encodeURIComponent(token!)}; HttpOnly; SameSite=Strict; Path=/; Max-Age=${30 * 86400}`)
      .redirect('/', 303);
  });
}

export default fp(createSecurity, { name: 'security', dependencies: ['storage', 'errors'] });
