/** Jobs: a time limit stops one with a reason; a job a stopped server left running is re-queued and completes. */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, describe, expect, it } from 'vitest';
import { appOn, multipart, tempDataDir, toneWav, waitJob } from './helpers.ts';

describe('jobs', () => {
  const data = tempDataDir();
  let app: FastifyInstance | null = null;
  afterAll(async () => {
    await app?.close();
    data.cleanup();
  });

  it('stop at their time limit with the reason, leaving no file behind', async () => {
    app = await appOn(data.dir, { jobTimeoutS: 0.05 });
    const clip = (await app.inject({ method: 'POST', url: '/api/clips', ...multipart([{ name: 'tone.wav', bytes: toneWav(3) }]) })).json();
    const { job, analysis } = (await app.inject({ method: 'POST', url: `/api/clips/${clip.id}/analyses`, payload: {} })).json();
    const done = await waitJob(app, job.id);
    expect(done.state).toBe('failed');
    expect(done.error).toMatchObject({ code: 'timeout' });
    expect((await app.inject({ method: 'GET', url: `/api/analyses/${analysis.id}` })).json().state).toBe('failed');
    expect(readdirSync(join(data.dir, 'analyses'))).toEqual([]);
    expect(readdirSync(join(data.dir, 'tmp'))).toEqual([]);
    await app.close();
    app = null;
  });

  it('left running by a stopped server are re-queued at the next start and complete', async () => {
    app = await appOn(data.dir);
    const clip = app.store.listClips()[0];
    // What a killed server leaves: a job and its analysis marked running, nothing written yet.
    const job = app.store.createJob({ kind: 'analysis', analysisId: '' });
    const a = app.store.createAnalysis(clip.id, { channel: 'left', frameMs: 1 }, (await app.inject({ method: 'GET', url: '/api/version' })).json().engineVersion, job.id);
    app.store.db.prepare("UPDATE jobs SET state = 'running', attempts = 1, payload = ? WHERE id = ?").run(JSON.stringify({ kind: 'analysis', analysisId: a.id }), job.id);
    app.store.setAnalysisState(a.id, 'running');
    // Close without the runner seeing it (as a crash would), then start again.
    app.store.close();
    await app.close().catch(() => undefined);
    app = await appOn(data.dir);
    const done = await waitJob(app, job.id);
    expect(done.state, JSON.stringify(done.error)).toBe('done');
    expect(app.store.getAnalysis(a.id)?.state).toBe('done');
  });
});
