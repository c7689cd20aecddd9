// A bounded load on loopback: health and profile reads hammered (autocannon, a fixed number of
// connections and seconds) while more analyses are asked for than the queue holds. The server keeps
// answering (no error, no refused health check), refuses the excess with 503 and Retry-After, and
// every analysis it accepted ends with the same document as the same analysis run alone. Latency
// and memory figures are printed by `npm run bench` (test/bench/server-bench.ts), not asserted here:
// the machines are shared and noisy.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import autocannon from 'autocannon';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analysisDocument, analyzeFile } from '../../../server/services/analysis.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { appOn, multipart, tempDataDir, toneWav } from './helpers.ts';

const { dir, cleanup } = tempDataDir();
let app: FastifyInstance;
let origin: string;
const QUEUE_LIMIT = 3;

beforeAll(async () => {
  app = await appOn(dir, { queueLimit: QUEUE_LIMIT, jobThreads: 1 });
  origin = await app.listen({ host: '127.0.0.1', port: 0 });
});
afterAll(async () => {
  await app.close();
  cleanup();
});

describe('under a bounded load', () => {
  it('answers health and profile reads, refuses excess analyses with 503 and Retry-After, and completes every accepted one as if alone', async () => {
    const wav = toneWav(8, 44100, 0.6);
    const m = multipart([{ name: 'load.wav', bytes: wav }]);
    const up = await app.inject({ method: 'POST', url: '/api/clips', payload: m.payload, headers: m.headers });
    expect(up.statusCode).toBe(201);
    const clip = up.json() as { id: string };
    await app.inject({ method: 'POST', url: '/api/coils', payload: DEMO_COILS['desk-lantern'] });

    // Eight analyses with different frame lengths (none served from another's result), at once.
    const frames = [0.5, 1, 2, 4, 5, 8, 10, 20];
    const asked = await Promise.all(
      frames.map((frameMs) => fetch(`${origin}/api/clips/${clip.id}/analyses`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ frameMs }) })),
    );
    // Meanwhile: 2 s of health checks and profile reads on 4 connections each.
    const [health, coils] = await Promise.all([
      autocannon({ url: `${origin}/api/health`, connections: 4, duration: 2 }),
      autocannon({ url: `${origin}/api/coils`, connections: 4, duration: 2 }),
    ]);
    for (const [what, r] of [['health', health], ['coil list', coils]] as const) {
      expect(r.errors, what).toBe(0); // connection errors and timeouts
      expect(r.non2xx, what).toBe(0);
      expect(r.requests.total, what).toBeGreaterThan(0);
    }

    const accepted: { frameMs: number; jobId: string; analysisId: string }[] = [];
    let refused = 0;
    for (const [i, r] of asked.entries()) {
      if (r.status === 503) {
        refused++;
        expect(Number(r.headers.get('retry-after'))).toBeGreaterThan(0);
        expect(r.headers.get('content-type')).toMatch(/application\/problem\+json/);
        continue;
      }
      expect(r.status).toBe(202);
      const b = (await r.json()) as { analysis: { id: string }; job: { id: string } };
      accepted.push({ frameMs: frames[i], jobId: b.job.id, analysisId: b.analysis.id });
    }
    // The queue holds QUEUE_LIMIT jobs: the rest were refused, not dropped silently.
    expect(accepted.length).toBe(QUEUE_LIMIT);
    expect(refused).toBe(frames.length - QUEUE_LIMIT);

    // Each accepted analysis ends, with the document of the same analysis run alone.
    const stored = join(dir, 'alone');
    mkdirSync(stored, { recursive: true });
    writeFileSync(join(stored, 'load.wav'), wav);
    for (const a of accepted) {
      for (let i = 0; ; i++) {
        const j = (await app.inject({ method: 'GET', url: `/api/jobs/${a.jobId}` })).json() as { state: string; error: unknown };
        if (j.state === 'done') break;
        if (j.state === 'failed') throw new Error(`analysis at ${a.frameMs} ms failed: ${JSON.stringify(j.error)}`);
        if (i > 1200) throw new Error(`analysis at ${a.frameMs} ms still ${j.state} after 120 s`);
        await new Promise((r) => setTimeout(r, 100));
      }
      const got = (await app.inject({ method: 'GET', url: `/api/analyses/${a.analysisId}` })).json() as { summary: unknown };
      const alone = analysisDocument(await analyzeFile(join(stored, 'load.wav'), { channel: 'mix', frameS: a.frameMs / 1000 }));
      expect(got.summary).toEqual(JSON.parse(JSON.stringify(alone)));
    }
  });
});
