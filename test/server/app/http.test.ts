/**
 * Over real HTTP on a free loopback port: an upload from a browser-style form, progress as
 * server-sent events while the analysis runs, the rate limit (429 with Retry-After) and the bound
 * on request bodies (413).
 */
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { appOn, tempDataDir, toneWav } from './helpers.ts';

describe('over HTTP', () => {
  const data = tempDataDir();
  let app: FastifyInstance;
  let base = '';
  beforeAll(async () => {
    app = await appOn(data.dir, { rateLimitPerMinute: 40, bodyLimitBytes: 64 * 1024 });
    await app.listen({ host: '127.0.0.1', port: 0 });
    const a = app.server.address();
    base = `http://127.0.0.1:${typeof a === 'object' && a ? a.port : 0}`;
  });
  afterAll(async () => {
    await app.close();
    data.cleanup();
  });

  it('uploads a form, then streams the analysis progress as server-sent events until done', async () => {
    const form = new FormData();
    form.append('file', new Blob([toneWav(2) as Uint8Array<ArrayBuffer>], { type: 'audio/wav' }), 'song.wav');
    const up = await fetch(`${base}/api/clips`, { method: 'POST', body: form });
    expect(up.status).toBe(201);
    const clip = await up.json();
    const started = await (await fetch(`${base}/api/clips/${clip.id}/analyses`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })).json();
    const res = await fetch(`${base}/api/jobs/${started.job.id}/events`);
    expect(res.headers.get('content-type')).toMatch(/text\/event-stream/);
    const text = await res.text(); // the stream ends after the final event
    const events = [...text.matchAll(/event: (\w+)\ndata: (.*)\n/g)].map((m) => ({ event: m[1], job: JSON.parse(m[2]) }));
    expect(events.length).toBeGreaterThanOrEqual(2);
    expect(events[0].event).toBe('progress');
    expect(events[events.length - 1].event).toBe('done');
    const fractions = events.map((e) => e.job.progress);
    for (let i = 1; i < fractions.length; i++) expect(fractions[i]).toBeGreaterThanOrEqual(fractions[i - 1]);
  });

  it('refuses a body over the limit with 413 problem+json', async () => {
    const big = { ...DEMO_COILS['desk-lantern'], name: 'x'.repeat(100_000) };
    const res = await fetch(`${base}/api/coils`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(big) });
    expect(res.status).toBe(413);
    expect(res.headers.get('content-type')).toMatch(/problem\+json/);
  });

  it('limits requests per client with 429 and Retry-After, but never the health probe', async () => {
    let limited: Response | null = null;
    for (let i = 0; i < 60 && !limited; i++) {
      const r = await fetch(`${base}/api/clips`);
      if (r.status === 429) limited = r;
      else await r.arrayBuffer();
    }
    expect(limited).not.toBeNull();
    expect(Number(limited!.headers.get('retry-after'))).toBeGreaterThan(0);
    expect((await limited!.json()).code).toBe('rate-limited');
    expect((await fetch(`${base}/api/health`)).status).toBe(200);
  });
});
