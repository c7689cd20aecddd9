/** A set through the API: created, reordered, planned as a job (clips analysed first), with temperatures through the gaps. */
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR } from '../../../shared/demo/drivers.ts';
import { appOn, multipart, tempDataDir, toneWav, waitJob } from './helpers.ts';

describe('sets', () => {
  const data = tempDataDir();
  let app: FastifyInstance;
  beforeAll(async () => {
    app = await appOn(data.dir);
  });
  afterAll(async () => {
    await app.close();
    data.cleanup();
  });

  it('creates, reorders and plans a set; a profile it uses cannot be deleted', async () => {
    const clips = [];
    for (const [s, amp] of [[1, 0.3], [1.2, 0.6]] as const) {
      clips.push((await app.inject({ method: 'POST', url: '/api/clips', ...multipart([{ name: `t${s}.wav`, bytes: toneWav(s, 8000, amp) }]) })).json().id);
    }
    const coilId = (await app.inject({ method: 'POST', url: '/api/coils', payload: DEMO_COILS['desk-lantern'] })).json().id;
    const driverId = (await app.inject({ method: 'POST', url: '/api/drivers', payload: DEMO_DRIVER_LINEAR })).json().id;
    const body = { name: 'Test evening', coilId, driverId, items: clips.map((clipId) => ({ clipId, gapAfterS: 2, gainDb: null })) };
    const created = await app.inject({ method: 'POST', url: '/api/sets', payload: body });
    expect(created.statusCode, created.body).toBe(201);
    const id = created.json().id;
    const reordered = await app.inject({ method: 'PUT', url: `/api/sets/${id}`, payload: { ...body, items: [...body.items].reverse() } });
    expect(reordered.json().items.map((i: { clipId: string }) => i.clipId)).toEqual([...clips].reverse());
    expect((await app.inject({ method: 'DELETE', url: `/api/coils/${coilId}` })).statusCode).toBe(409);
    const started = await app.inject({ method: 'POST', url: `/api/sets/${id}/plan` });
    expect(started.statusCode).toBe(202);
    const done = await waitJob(app, started.json().job.id);
    expect(done.state, JSON.stringify(done.error)).toBe('done');
    const plan = (await app.inject({ method: 'GET', url: `/api/sets/${id}/plan` })).json();
    expect(plan.result.items.map((i: { clip: string }) => i.clip)).toEqual(['t1.2.wav', 't1.wav']);
    expect(plan.temperatures.gaps.length).toBe(2);
    expect(plan.temperatures.gaps[0].fromS).toBeCloseTo(1.2, 6);
    // Within the first clip the traces reach its peak and no more (the column maximum keeps it;
    // float32 traces: 1 mK). A gap may run hotter: a linear pass device idles at half the rail.
    const t = plan.temperatures.timeS as number[];
    const colS = t[1] - t[0];
    const first = plan.result.items[0];
    for (const d of plan.temperatures.devices as { role: string; junctionC: number[] }[]) {
      const inClip = d.junctionC.filter((_, j) => t[j] + colS <= 1.2);
      const peak = first.devices.find((x: { role: string }) => x.role === d.role).peakJunctionC;
      expect(Math.max(...inClip)).toBeLessThanOrEqual(peak + 1e-3);
      expect(Math.max(...inClip)).toBeGreaterThan(peak - 0.05);
    }
  });
});
