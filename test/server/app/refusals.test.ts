/**
 * Bad input through the API: uploads that are not audio, truncated, over a limit, empty or two
 * files get problem+json 4xx and leave no row and no file; a profile with a wrong field gets 400
 * naming the dotted field; a full queue answers 503 with Retry-After.
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { appOn, multipart, tempDataDir, toneWav } from './helpers.ts';

describe('refusals', () => {
  const data = tempDataDir();
  let app: FastifyInstance;
  beforeAll(async () => {
    app = await appOn(data.dir, { maxUploadBytes: 200_000, maxDurationS: 5, queueLimit: 1, jobThreads: 1 });
  });
  afterAll(async () => {
    await app.close();
    data.cleanup();
  });

  const nothingLeft = () => {
    expect((app.store.listClips())).toEqual([]);
    expect(readdirSync(join(data.dir, 'clips'))).toEqual([]);
    expect(readdirSync(join(data.dir, 'tmp'))).toEqual([]);
  };

  const wav = toneWav(1);
  const cases: [string, () => ReturnType<typeof multipart>, number, string][] = [
    ['not audio', () => multipart([{ name: 'notes.wav', bytes: new TextEncoder().encode('these are not samples, just words in a text file. '.repeat(50)) }]), 400, 'not-audio'],
    ['truncated', () => multipart([{ name: 'cut.wav', bytes: wav.subarray(0, Math.floor(wav.length / 2)) }]), 400, 'truncated'],
    ['empty', () => multipart([{ name: 'empty.wav', bytes: new Uint8Array(0) }]), 400, 'empty'],
    ['over the size limit', () => multipart([{ name: 'big.wav', bytes: toneWav(14, 8000) }]), 413, 'too-large'],
    ['over the duration limit', () => multipart([{ name: 'long.wav', bytes: toneWav(6, 4000, 0.5) }]), 413, 'too-long'],
    ['two files', () => multipart([{ name: 'a.wav', bytes: wav }, { name: 'b.wav', bytes: toneWav(1.1) }]), 400, ''],
  ];
  for (const [what, body, status, code] of cases) {
    it(`refuses an upload that is ${what}`, async () => {
      const res = await app.inject({ method: 'POST', url: '/api/clips', ...body() });
      expect(res.statusCode, res.body).toBe(status);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      const p = res.json();
      if (code) expect(p.code).toBe(code);
      expect(p.field).toBe('file');
      expect(p.detail.length).toBeGreaterThan(20);
      nothingLeft();
    });
  }

  it('refuses a profile with a wrong field, naming the dotted field', async () => {
    const bad = { ...DEMO_COILS['desk-lantern'], secondary: { ...DEMO_COILS['desk-lantern'].secondary, turns: -3 } };
    const res = await app.inject({ method: 'POST', url: '/api/coils', payload: bad });
    expect(res.statusCode).toBe(400);
    expect(res.json()).toMatchObject({ status: 400, field: 'secondary.turns' });
    expect(app.store.listProfiles('coil')).toEqual([]);
  });

  it('refuses a bad query or body naming the field', async () => {
    const res = await app.inject({ method: 'POST', url: '/api/plans', payload: { clipId: 'x', coilId: 'y', driverId: 'z', gainDb: 99 } });
    expect(res.statusCode).toBe(400);
    expect(res.json().field).toBe('gainDb');
  });

  it('answers 503 with Retry-After when the queue is full', async () => {
    const up = await app.inject({ method: 'POST', url: '/api/clips', ...multipart([{ name: 'tone.wav', bytes: wav }]) });
    const id = up.json().id;
    const first = await app.inject({ method: 'POST', url: `/api/clips/${id}/analyses`, payload: { frameMs: 2 } });
    expect(first.statusCode).toBe(202);
    const second = await app.inject({ method: 'POST', url: `/api/clips/${id}/analyses`, payload: { frameMs: 4 } });
    expect(second.statusCode).toBe(503);
    expect(Number(second.headers['retry-after'])).toBeGreaterThan(0);
    expect(second.json().code).toBe('queue-full');
  });

  it('sends security headers with a content security policy for a same-origin client', async () => {
    const res = await app.inject({ method: 'GET', url: '/api/health' });
    const csp = String(res.headers['content-security-policy']);
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("connect-src 'self'");
    expect(csp).toContain('media-src');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });

  it('describes every API route in OpenAPI', async () => {
    const doc = (await app.inject({ method: 'GET', url: '/api/openapi.json' })).json();
    expect(doc.openapi).toMatch(/^3\./);
    for (const p of ['/api/clips', '/api/clips/{id}/analyses', '/api/plans/{id}/evaluate', '/api/plans/{id}/modulation', '/api/sets/{id}/plan', '/api/renders/{id}/audio', '/api/coils/{id}/export']) {
      expect(Object.keys(doc.paths), p).toContain(p);
    }
  });
});
