/**
 * Over real HTTP on a free loopback port: the access token (bearer header or the sign-in
 * cookie), the configuration's refusal to bind another address without one, the demo data seeded
 * once and never again over deletions, and the page shown while the client is not built.
 */
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ConfigError, configFromEnv } from '../../../server/config.ts';
import { appOn, tempDataDir } from './helpers.ts';

const TOKEN = 'test-token-0123456789abcdef';

describe('access over HTTP', () => {
  const data = tempDataDir();
  let app: FastifyInstance;
  let base = '';
  beforeAll(async () => {
    app = await appOn(data.dir, { token: TOKEN, seedDemo: true });
    await app.listen({ host: '127.0.0.1', port: 0 });
    const a = app.server.address();
    base = `http://127.0.0.1:${typeof a === 'object' && a ? a.port : 0}`;
  });
  afterAll(async () => {
    await app.close();
    data.cleanup();
  });

  it('asks for the token on the API and accepts a bearer header', async () => {
    const no = await fetch(`${base}/api/clips`);
    expect(no.status).toBe(401);
    expect(no.headers.get('content-type')).toMatch(/problem\+json/);
    const yes = await fetch(`${base}/api/clips`, { headers: { authorization: `Bearer ${TOKEN}` } });
    expect(yes.status).toBe(200);
    expect((await yes.json()).items.length).toBe(3); // the demo clips
  });

  it('sets a cookie from the sign-in page that then opens the API', async () => {
    const wrong = await fetch(`${base}/signin`, { method: 'POST', body: new URLSearchParams({ token: 'nope' }), redirect: 'manual' });
    expect(wrong.status).toBe(401);
    const ok = await fetch(`${base}/signin`, { method: 'POST', body: new URLSearchParams({ token: TOKEN }), redirect: 'manual' });
    expect(ok.status).toBe(303);
    const cookie = ok.headers.get('set-cookie')!.split(';')[0];
    expect((await fetch(`${base}/api/sets`, { headers: { cookie } })).status).toBe(200);
  });

  it('says how to build the client when it is not built', async () => {
    const res = await fetch(`${base}/`);
    expect(res.status).toBe(200);
    expect(await res.text()).toMatch(/not built/);
  });

  it('seeds the demo data once and never over deletions', async () => {
    const h = { authorization: `Bearer ${TOKEN}` };
    const sets = (await (await fetch(`${base}/api/sets`, { headers: h })).json()).items;
    expect(sets.length).toBe(1);
    expect((await fetch(`${base}/api/sets/${sets[0].id}`, { method: 'DELETE', headers: h })).status).toBe(204);
    await app.close();
    app = await appOn(data.dir, { token: TOKEN, seedDemo: true });
    expect(app.store.listSets()).toEqual([]);
    expect(app.store.listClips().length).toBe(3);
  });
});

describe('configuration', () => {
  it('refuses a non-loopback address without a token, with a clear message', () => {
    expect(() => configFromEnv({ HOST: '0.0.0.0', DATA_DIR: '/tmp/none-such-coilcue' }, '/')).toThrow(ConfigError);
    expect(() => configFromEnv({ HOST: '0.0.0.0', DATA_DIR: '/tmp/none-such-coilcue' }, '/')).toThrow(/COILCUE_TOKEN/);
    expect(configFromEnv({ HOST: '0.0.0.0', COILCUE_TOKEN: TOKEN, DATA_DIR: '/tmp/x' }, '/').token).toBe(TOKEN);
  });
  it('names a bad value and the rule', () => {
    expect(() => configFromEnv({ PORT: 'eighty' }, '/')).toThrow(/PORT="eighty" is not valid/);
    expect(() => configFromEnv({ COILCUE_JOB_THREADS: '999' }, '/')).toThrow(/COILCUE_JOB_THREADS/);
    const c = configFromEnv({}, '/srv');
    expect(c).toMatchObject({ host: '127.0.0.1', port: 8480, dataDir: '/srv/data' });
  });
});
