// Damaged files through the upload route: each is refused with a problem+json 4xx that says what is
// wrong, leaving no row and no file behind; or it is stored, and then its analysis either ends with
// finite figures or fails with a reason. Seeded and bounded (fast-check), like the decoders' own
// property tests (test/server/audio/decode-fuzz.test.ts).
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance } from 'fastify';
import { damagedCopies } from '../audio/damage.ts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { everyNumberFinite } from '../audio/finite.ts';
import { appOn, multipart, tempDataDir } from './helpers.ts';

const fixtures = fileURLToPath(new URL('../../fixtures/audio/', import.meta.url));
const { dir, cleanup } = tempDataDir();
let app: FastifyInstance;
beforeAll(async () => {
  app = await appOn(dir);
});
afterAll(async () => {
  await app.close();
  cleanup();
});

const list = (folder: string) => readdirSync(join(dir, folder)).sort();

describe('damaged uploads', () => {
  for (const name of ['wav-s16-stereo.wav', 'tone-44k1-stereo.flac', 'tone-48k-stereo.ogg', 'tone-44k1-stereo.mp3']) {
    it(`${name}: four seeded damaged copies`, { timeout: 180_000 }, async () => {
      const original = new Uint8Array(readFileSync(join(fixtures, name)));
      const copies = damagedCopies(original, 29, 4);
      for (const [i, bytes] of copies.entries()) {
        const what = `${name} copy ${i}`;
        const clipsBefore = list('clips');
        const m = multipart([{ name: `damaged-${i}-${name}`, bytes }]);
        const r = await app.inject({ method: 'POST', url: '/api/clips', payload: m.payload, headers: m.headers });
        if (r.statusCode >= 400) {
          expect(r.statusCode, what).toBeLessThan(500);
          expect(r.headers['content-type'], what).toMatch(/application\/problem\+json/);
          const p = r.json() as { detail: string; code: string };
          expect(p.detail.length, what).toBeGreaterThan(20);
          expect(p.detail, what).not.toMatch(/\n\s+at /);
          // Nothing half stored: no new file, nothing left in the temporary folder.
          expect(list('clips'), what).toEqual(clipsBefore);
          expect(list('tmp'), what).toEqual([]);
          continue;
        }
        // Stored: its analysis ends with finite figures or fails with a reason.
        const clip = r.json() as { id: string };
        const started = (await app.inject({ method: 'POST', url: `/api/clips/${clip.id}/analyses`, payload: {} })).json() as { analysis: { id: string }; job: { id: string } };
        let state = '';
        for (let k = 0; k < 1200 && state !== 'done' && state !== 'failed'; k++) {
          const j = (await app.inject({ method: 'GET', url: `/api/jobs/${started.job.id}` })).json() as { state: string; error: { detail: string } | null };
          state = j.state;
          if (state === 'failed') expect(j.error?.detail, what).toMatch(/[a-z]/);
          else await new Promise((res) => setTimeout(res, 50));
        }
        expect(['done', 'failed'], what).toContain(state);
        if (state === 'done') {
          const a = (await app.inject({ method: 'GET', url: `/api/analyses/${started.analysis.id}` })).json() as { summary: unknown };
          expect(everyNumberFinite(a.summary), what).toBeNull();
        }
      }
    });
  }
});
