/**
 * The whole path through the API on a short synthesised clip: upload → analyse (progress events,
 * then the result equal to `coilcue analyze --json` on the same file) → plan → re-evaluate at
 * +3 dB → render → download (decodes, length matches) → delete; a restart keeps everything.
 */
import { existsSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import { analysisDocument, analyzeFile } from '../../../server/services/analysis.ts';
import { jsonReplacer, loadPlanClip, planClipDocument } from '../../../server/services/plan.ts';
import { coilReportFor } from '../../../server/services/profiles.ts';
import { planSettings } from '../../../shared/plan/evaluate.ts';
import { parseCoilProfile } from '../../../shared/schemas/coil.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR } from '../../../shared/demo/drivers.ts';
import { appOn, multipart, tempDataDir, toneWav, waitJob } from './helpers.ts';

describe('the API end to end', () => {
  const data = tempDataDir();
  let app: FastifyInstance;
  const wav = toneWav(1.5);
  const ids: Record<string, string> = {};

  beforeAll(async () => {
    app = await appOn(data.dir);
  });
  afterAll(async () => {
    await app.close();
    data.cleanup();
  });

  it('uploads a clip once, and the same bytes again answer the same clip', async () => {
    const up = await app.inject({ method: 'POST', url: '/api/clips', ...multipart([{ name: 'tone.wav', bytes: wav }]) });
    expect(up.statusCode, up.body).toBe(201);
    const clip = up.json();
    expect(clip).toMatchObject({ name: 'tone.wav', format: 'wav', sampleRate: 8000, channels: 2, sizeBytes: wav.length });
    expect(clip.durationS).toBeCloseTo(1.5, 9);
    ids.clip = clip.id;
    const again = await app.inject({ method: 'POST', url: '/api/clips', ...multipart([{ name: 'copy.wav', bytes: wav }]) });
    expect(again.statusCode).toBe(200);
    expect(again.json().id).toBe(clip.id);
    expect(readdirSync(join(data.dir, 'clips'))).toEqual([clip.sha256]);
  });

  it('analyses it as a job with progress events, and the summary equals the command line document', async () => {
    const res = await app.inject({ method: 'POST', url: `/api/clips/${ids.clip}/analyses`, payload: {} });
    expect(res.statusCode, res.body).toBe(202);
    const { analysis, job } = res.json();
    const events = await app.inject({ method: 'GET', url: `/api/jobs/${job.id}/events` });
    expect(events.headers['content-type']).toMatch(/text\/event-stream/);
    expect(events.body).toMatch(/event: (progress|done)/);
    expect(events.body).toMatch(/event: done\ndata: /);
    const done = await waitJob(app, job.id);
    expect(done.state).toBe('done');
    const a = (await app.inject({ method: 'GET', url: `/api/analyses/${analysis.id}` })).json();
    expect(a.state).toBe('done');
    // The command line's document for the same file and settings (analyze --json), number for number.
    const file = join(data.dir, 'same.wav');
    writeFileSync(file, wav);
    const cli = JSON.parse(JSON.stringify(analysisDocument(await analyzeFile(file))));
    expect(a.summary).toEqual(cli);
    ids.analysis = a.id;
    // A second request with the same settings answers the stored one.
    const again = await app.inject({ method: 'POST', url: `/api/clips/${ids.clip}/analyses`, payload: { channel: 'mix', frameMs: 1 } });
    expect(again.statusCode).toBe(200);
    expect(again.json().analysis.id).toBe(a.id);
  });

  it('gives display data on the grid asked for', async () => {
    const d = (await app.inject({ method: 'GET', url: `/api/analyses/${ids.analysis}/display?columns=100` })).json();
    expect(d.timeS.length).toBeLessThanOrEqual(100);
    expect(d.peakMax.length).toBe(d.timeS.length);
    // The envelope never exceeds the synthesised amplitude (0.5, ±1 LSB of 16-bit rounding and dither).
    expect(Math.max(...d.peakMax)).toBeLessThanOrEqual(0.5 + 1e-3);
    expect(d.spectrum.freqHz.length).toBe(d.spectrum.powerDb.length);
  });

  it('stores profiles, plans, re-evaluates at +3 dB, renders and downloads', async () => {
    const coil = await app.inject({ method: 'POST', url: '/api/coils', payload: DEMO_COILS['desk-lantern'] });
    expect(coil.statusCode, coil.body).toBe(201);
    expect(coil.json().report.resonanceHz).toBeGreaterThan(0);
    const driver = await app.inject({ method: 'POST', url: '/api/drivers', payload: DEMO_DRIVER_LINEAR });
    expect(driver.statusCode, driver.body).toBe(201);
    ids.coil = coil.json().id;
    ids.driver = driver.json().id;
    const plan = await app.inject({ method: 'POST', url: '/api/plans', payload: { clipId: ids.clip, coilId: ids.coil, driverId: ids.driver, gainDb: -6 } });
    expect(plan.statusCode, plan.body).toBe(201);
    const p = plan.json();
    expect(p.coil.name).toBe(DEMO_COILS['desk-lantern'].name);
    expect(p.document.evaluatedGainDb).toBe(-6);
    ids.plan = p.id;
    const ev = await app.inject({ method: 'POST', url: `/api/plans/${ids.plan}/evaluate`, payload: { gainDb: -3, columns: 50 } });
    expect(ev.statusCode, ev.body).toBe(200);
    const e = ev.json();
    expect(e.document.evaluatedGainDb).toBe(-3);
    expect(e.temperatures.timeS.length).toBeLessThanOrEqual(50);
    // The same document as `coilcue plan --json --gain-db -3` on the same file, built from the samples.
    const file = join(data.dir, 'same.wav');
    const { planClip, analysis } = await loadPlanClip(file, DEMO_DRIVER_LINEAR, 'mix', 'zero-crossing');
    planClip.name = 'tone.wav';
    const cli = planClipDocument(planClip, analysis, coilReportFor(parseCoilProfile(DEMO_COILS['desk-lantern']), DEMO_DRIVER_LINEAR), DEMO_DRIVER_LINEAR, planSettings(DEMO_DRIVER_LINEAR), { gainDb: -3 });
    expect(e.document).toEqual(JSON.parse(JSON.stringify(cli.document, jsonReplacer)));
    // It reused the gain search the plan stored (the page never sees it), and says how long it took.
    expect(p.search).toBeUndefined();
    expect(ev.headers['server-timing']).toMatch(/^evaluate;dur=\d+(\.\d)?$/);
    // A plan stored before searches were kept searches once, keeps it, and answers the same.
    app.store.db.prepare('UPDATE plans SET search = NULL WHERE id = ?').run(ids.plan);
    const again = await app.inject({ method: 'POST', url: `/api/plans/${ids.plan}/evaluate`, payload: { gainDb: -3, columns: 50 } });
    expect(again.json()).toEqual(e);
    expect(app.store.getPlan(ids.plan)!.search).toMatchObject({ advisedGainDb: e.document.advisedGainDb, evaluations: e.document.searchEvaluations });
    // The traces' maxima are the document's peaks (the column maximum keeps the peak).
    for (const d of e.temperatures.devices) {
      const doc = e.document.devices.find((x: { role: string }) => x.role === d.role);
      expect(Math.max(...d.junctionC)).toBeCloseTo(doc.peakJunctionC, 3);
    }
    const mod = (await app.inject({ method: 'GET', url: `/api/plans/${ids.plan}/modulation?columns=40&gainDb=-3` })).json();
    expect(mod.railMaxV.length).toBeLessThanOrEqual(40);
    expect(Math.max(...mod.railMaxV)).toBeLessThanOrEqual(DEMO_DRIVER_LINEAR.supplyVoltageV);

    const r = await app.inject({ method: 'POST', url: `/api/plans/${ids.plan}/renders`, payload: { kind: 'render', gainDb: -6 } });
    expect(r.statusCode, r.body).toBe(202);
    const done = await waitJob(app, r.json().job.id);
    expect(done.state, JSON.stringify(done.error)).toBe('done');
    const rec = (await app.inject({ method: 'GET', url: `/api/renders/${r.json().render.id}` })).json();
    expect(typeof rec.safe).toBe('boolean');
    const audio = await app.inject({ method: 'GET', url: `/api/renders/${rec.id}/audio` });
    expect(audio.statusCode).toBe(200);
    expect(audio.headers['content-disposition']).toMatch(/filename="tone-coil\.wav"/);
    const decoded = await decodeAudioBytes(new Uint8Array(audio.rawPayload));
    expect(decoded.channels[0].length).toBe(Math.round(1.5 * 8000));
    ids.render = rec.id;
  });

  it('keeps everything across a restart on the same data folder', async () => {
    await app.close();
    app = await appOn(data.dir);
    for (const url of [`/api/clips/${ids.clip}`, `/api/analyses/${ids.analysis}`, `/api/coils/${ids.coil}`, `/api/drivers/${ids.driver}`, `/api/plans/${ids.plan}`, `/api/renders/${ids.render}`]) {
      expect((await app.inject({ method: 'GET', url })).statusCode, url).toBe(200);
    }
  });

  it('deletes the clip with everything made from it', async () => {
    const sha = (await app.inject({ method: 'GET', url: `/api/clips/${ids.clip}` })).json().sha256;
    expect((await app.inject({ method: 'DELETE', url: `/api/clips/${ids.clip}` })).statusCode).toBe(204);
    expect((await app.inject({ method: 'GET', url: `/api/plans/${ids.plan}` })).statusCode).toBe(404);
    expect(existsSync(join(data.dir, 'clips', sha))).toBe(false);
    expect(readdirSync(join(data.dir, 'analyses'))).toEqual([]);
    expect(readdirSync(join(data.dir, 'renders'))).toEqual([]);
  });
});
