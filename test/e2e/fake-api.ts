/**
 * A stand-in for the coilcue server, for developing and checking the web page while the real
 * server is built: a Fastify instance answering the routes of docs/api.md that the page calls,
 * with documents made by the engine's own code (server/services, shared/) on demo profiles and
 * synthesised demo clips, held in memory. Jobs run at once and report over server-sent events.
 * Not the product: the end-to-end tests start the real server (server/app.ts) when it exists.
 *
 * Run it by hand: `node --import tsx test/e2e/fake-api.ts [port]` (serves client/dist too).
 */
import Fastify, { type FastifyInstance, type FastifyReply } from 'fastify';
import multipart from '@fastify/multipart';
import fastifyStatic from '@fastify/static';
import { createHash, randomUUID } from 'node:crypto';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodeWav } from '../../server/audio/wav.ts';
import { analysisDocument, analyzeFile } from '../../server/services/analysis.ts';
import { planClipDocument, prepareLoadedJob, type PreparedJob } from '../../server/services/plan.ts';
import { coilAtResonance, coilReportFor } from '../../server/services/profiles.ts';
import { previewJob, renderJob } from '../../server/services/render.ts';
import { MemorySink } from '../../server/render/staged-file.ts';
import { DEMO_CLIPS, synthDemoClip } from '../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVERS } from '../../shared/demo/drivers.ts';
import { evaluateAtGain, planSettings } from '../../shared/plan/evaluate.ts';
import { planSet } from '../../shared/plan/set.ts';
import { simulateSteady } from '../../shared/plan/steady.ts';
import { modulationPreview } from '../../shared/preview/modulation.ts';
import { COIL_CAUTIONS } from '../../shared/physics/coil/voltage.ts';
import { parseCoilProfile, type CoilProfile } from '../../shared/schemas/coil.ts';
import { parseDriverProfile, type DriverProfile } from '../../shared/schemas/driver.ts';
import { InputError } from '../../shared/errors.ts';
import { jsonReplacer } from '../../server/services/plan.ts';
import { frameStart } from '../../shared/dsp/frame-stats.ts';

const now = () => new Date().toISOString();
type Row<T> = T & { id: string; createdAt: string; updatedAt: string };

interface ClipRow {
  id: string;
  name: string;
  sha256: string;
  sizeBytes: number;
  format: 'wav';
  sampleRate: number;
  channels: number;
  durationS: number;
  createdAt: string;
  path: string;
}

/** Column edges of a display grid over frames [k0, k1) with at most `columns` columns. */
function grid(k0: number, k1: number, columns: number): number[] {
  const n = Math.max(1, k1 - k0);
  const per = Math.max(1, Math.ceil(n / columns));
  const edges: number[] = [];
  for (let k = k0; k < k1; k += per) edges.push(k);
  edges.push(k1);
  return edges;
}

export async function buildFakeApi(opts: { dataDir?: string; serveClient?: boolean } = {}): Promise<FastifyInstance> {
  const dir = opts.dataDir ?? mkdtempSync(join(tmpdir(), 'coilcue-fake-'));
  const app = Fastify({ logger: false, bodyLimit: 200 * 1024 * 1024 });
  await app.register(multipart, { limits: { fileSize: 200 * 1024 * 1024 } });

  const coils = new Map<string, Row<{ name: string; profile: CoilProfile }>>();
  const drivers = new Map<string, Row<{ name: string; profile: DriverProfile }>>();
  const clips = new Map<string, ClipRow>();
  const jobs = new Map<string, Record<string, unknown>>();
  const analyses = new Map<string, { row: Record<string, unknown>; prepared: Map<string, PreparedJob> }>();
  const prepared = new Map<string, PreparedJob & { full: Awaited<ReturnType<typeof analyzeFile>> }>();
  const plans = new Map<string, Record<string, unknown> & { id: string; job: PreparedJob; gainDb: number | null }>();
  const sets = new Map<string, Record<string, unknown> & { id: string }>();
  const setPlans = new Map<string, unknown>();
  const renders = new Map<string, { row: Record<string, unknown>; bytes: Uint8Array; name: string }>();

  const problem = (reply: FastifyReply, status: number, code: string, detail: string, field?: string) =>
    reply.code(status).type('application/problem+json').send({ type: 'about:blank', title: code, status, detail, code, ...(field ? { field } : {}) });
  app.setErrorHandler((err, _req, reply) => {
    if (err instanceof InputError) return problem(reply, 400, err.code, err.message, err.field);
    const e = err as { statusCode?: number; message: string };
    return problem(reply, e.statusCode ?? 500, 'error', e.statusCode ? e.message : 'internal error');
  });
  app.setReplySerializer((payload) => JSON.stringify(payload, jsonReplacer));

  const addCoil = (p: unknown) => {
    const profile = parseCoilProfile(p);
    const id = randomUUID();
    const row = { id, name: profile.name, profile, createdAt: now(), updatedAt: now() };
    coils.set(id, row);
    return row;
  };
  const addDriver = (p: unknown) => {
    const profile = parseDriverProfile(p);
    const id = randomUUID();
    const row = { id, name: profile.name, profile, createdAt: now(), updatedAt: now() };
    drivers.set(id, row);
    return row;
  };
  const coilOut = (r: Row<{ name: string; profile: CoilProfile }>) => ({ ...r, report: coilReportFor(r.profile) });
  const addClipBytes = (name: string, bytes: Uint8Array) => {
    const sha = createHash('sha256').update(bytes).digest('hex');
    for (const c of clips.values()) if (c.sha256 === sha) return { clip: c, fresh: false };
    const id = randomUUID();
    const path = join(dir, `${id}.wav`);
    writeFileSync(path, bytes);
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    // Header figures of a canonical PCM WAV (our own files and the test's).
    const channels = view.getUint16(22, true);
    const sampleRate = view.getUint32(24, true);
    const bits = view.getUint16(34, true);
    const durationS = (bytes.length - 44) / (channels * (bits / 8) * sampleRate);
    const clip: ClipRow = { id, name, sha256: sha, sizeBytes: bytes.length, format: 'wav', sampleRate, channels, durationS, createdAt: now(), path };
    clips.set(id, clip);
    return { clip, fresh: true };
  };
  const clipOut = ({ path: _p, ...c }: ClipRow) => c;
  const job = (kind: string, run: (progress: (f: number, stage: string) => void) => Promise<string>) => {
    const j: Record<string, unknown> = { id: randomUUID(), kind, state: 'running', progress: 0, stage: 'starting', error: null, resultId: null, createdAt: now(), updatedAt: now() };
    jobs.set(j.id as string, j);
    setImmediate(() => {
      run((f, stage) => Object.assign(j, { progress: f, stage, updatedAt: now() }))
        .then((resultId) => Object.assign(j, { state: 'done', progress: 1, stage: 'done', resultId, updatedAt: now() }))
        .catch((e: Error) => Object.assign(j, { state: 'failed', stage: 'failed', error: { code: (e as InputError).code ?? 'internal', detail: e.message }, updatedAt: now() }));
    });
    return j;
  };

  // Demo data, once.
  for (const p of Object.values(DEMO_COILS)) addCoil(p);
  for (const p of DEMO_DRIVERS) addDriver(p);
  for (const info of DEMO_CLIPS.slice(0, 2)) addClipBytes(`${info.name}.wav`, encodeWav(synthDemoClip(info.name), { format: 's16', seed: 1 }));

  const prepare = async (clipId: string, coilId: string, driverId: string, onProgress?: (f: number, s: string) => void) => {
    const key = `${clipId}/${coilId}@${coils.get(coilId)!.updatedAt}/${driverId}@${drivers.get(driverId)!.updatedAt}`;
    let p = prepared.get(key);
    if (!p) {
      const driver = drivers.get(driverId)!.profile;
      const job = await prepareLoadedJob(dir, clips.get(clipId)!.path, coilReportFor(coils.get(coilId)!.profile, driver), driver, 'mix', onProgress);
      // The planner keeps only its reductions; the charts need the whole analysis.
      p = Object.assign(job, { full: await analyzeFile(resolve(dir, clips.get(clipId)!.path)) });
      prepared.set(key, p);
    }
    return p;
  };
  const analysisFor = new Map<string, string>();

  app.get('/api/health', async () => ({ ok: true, database: 'ok', queueDepth: 0, running: 0 }));
  app.get('/api/cautions', async () => ({ summary: 'Resonant coils make high voltage and RF that can burn, injure or kill.', items: COIL_CAUTIONS.map((text, i) => ({ topic: (['high-voltage', 'high-voltage', 'ozone', 'radio', 'fire', 'hearing', 'mains'] as const)[i] ?? 'mains', text })) }));
  app.get('/api/jobs/:id', async (req, reply) => jobs.get((req.params as { id: string }).id) ?? problem(reply, 404, 'not-found', 'no such job'));
  app.get('/api/jobs/:id/events', (req, reply) => {
    const j = jobs.get((req.params as { id: string }).id);
    if (!j) return problem(reply, 404, 'not-found', 'no such job');
    reply.hijack();
    reply.raw.writeHead(200, { 'content-type': 'text/event-stream', 'cache-control': 'no-store', connection: 'keep-alive' });
    const tick = () => {
      const final = j.state === 'done' || j.state === 'failed';
      reply.raw.write(`event: ${final ? j.state : 'progress'}\ndata: ${JSON.stringify(j)}\n\n`);
      if (final) reply.raw.end();
      else setTimeout(tick, 100);
    };
    tick();
  });

  app.get('/api/clips', async () => ({ items: [...clips.values()].map(clipOut) }));
  app.get('/api/clips/:id', async (req, reply) => {
    const c = clips.get((req.params as { id: string }).id);
    return c ? clipOut(c) : problem(reply, 404, 'not-found', 'no such clip');
  });
  app.post('/api/clips', async (req, reply) => {
    const file = await req.file();
    if (!file) return problem(reply, 400, 'no-file', 'send the clip in a multipart field named file');
    const bytes = new Uint8Array(await file.toBuffer());
    const { clip, fresh } = addClipBytes(file.filename, bytes);
    return reply.code(fresh ? 201 : 200).send(clipOut(clip));
  });
  app.get('/api/clips/:id/audio', async (req, reply) => {
    const c = clips.get((req.params as { id: string }).id);
    if (!c) return problem(reply, 404, 'not-found', 'no such clip');
    const { readFileSync } = await import('node:fs');
    return reply.type('audio/wav').header('content-disposition', `attachment; filename="${c.name}"`).send(readFileSync(c.path));
  });

  app.post('/api/clips/:id/analyses', async (req, reply) => {
    const clipId = (req.params as { id: string }).id;
    const c = clips.get(clipId);
    if (!c) return problem(reply, 404, 'not-found', 'no such clip');
    const existing = analysisFor.get(clipId);
    if (existing) {
      const a = analyses.get(existing)!.row;
      return reply.code(200).send({ analysis: a, job: jobs.get(a.jobId as string) });
    }
    const id = randomUUID();
    const row: Record<string, unknown> = { id, clipId, settings: { channel: 'mix', frameMs: 1 }, engineVersion: 'fake', state: 'running', jobId: '', summary: null, createdAt: now() };
    const j = job('analysis', async (progress) => {
      const first = [...coils.keys()][0];
      const firstDriver = [...drivers.keys()][0];
      const p = await prepare(clipId, first, firstDriver, progress);
      Object.assign(row, { state: 'done', summary: analysisDocument(p.full) });
      return id;
    });
    row.jobId = j.id;
    analyses.set(id, { row, prepared: new Map() });
    analysisFor.set(clipId, id);
    return reply.code(202).send({ analysis: row, job: j });
  });
  app.get('/api/analyses/:id', async (req, reply) => analyses.get((req.params as { id: string }).id)?.row ?? problem(reply, 404, 'not-found', 'no such analysis'));
  app.get('/api/analyses/:id/display', async (req, reply) => {
    const a = analyses.get((req.params as { id: string }).id);
    if (!a) return problem(reply, 404, 'not-found', 'no such analysis');
    const q = req.query as { columns?: string; fromS?: string; toS?: string };
    const p = await prepare(a.row.clipId as string, [...coils.keys()][0], [...drivers.keys()][0]);
    const an = p.full;
    const f = an.frames;
    const fromS = q.fromS ? Number(q.fromS) : 0;
    const toS = q.toS ? Number(q.toS) : an.durationS;
    const k0 = Math.max(0, Math.floor(fromS / f.frameS));
    const k1 = Math.min(f.count, Math.ceil(toS / f.frameS));
    const edges = grid(k0, k1, Number(q.columns ?? 1000));
    const timeS: number[] = [];
    const peakMin: number[] = [];
    const peakMax: number[] = [];
    const rmsDbfs: (number | null)[] = [];
    for (let j = 0; j + 1 < edges.length; j++) {
      let lo = Infinity;
      let hi = -Infinity;
      let ms = 0;
      for (let k = edges[j]; k < edges[j + 1]; k++) {
        lo = Math.min(lo, f.min[k]);
        hi = Math.max(hi, f.max[k]);
        ms += f.meanSquare[k];
      }
      timeS.push(frameStart(edges[j], f.samplesPerFrame) / f.sampleRate);
      peakMin.push(lo);
      peakMax.push(hi);
      const m = ms / (edges[j + 1] - edges[j]);
      rmsDbfs.push(m > 0 ? 10 * Math.log10(m) + 3.0103 : null);
    }
    const w = an.spectrum.welch;
    const sg = an.spectrum.spectrogram;
    const powerDb: number[][] = [];
    for (let c = 0; c < sg.columns; c++) powerDb.push(Array.from(sg.db.subarray(c * sg.rows, (c + 1) * sg.rows)));
    return {
      fromS,
      toS,
      timeS,
      peakMin,
      peakMax,
      rmsDbfs,
      spectrum: { freqHz: Array.from(w.frequencyHz), powerDb: Array.from(w.psd, (x) => (x > 0 ? 10 * Math.log10(x) : -200)) },
      spectrogram: { timeS: Array.from(sg.timesS), freqHz: Array.from(sg.frequenciesHz), powerDb },
    };
  });

  for (const [kind, map, add, out] of [
    ['coils', coils, addCoil, coilOut],
    ['drivers', drivers, addDriver, (r: unknown) => r],
  ] as const) {
    const m = map as Map<string, Row<{ name: string; profile: unknown }>>;
    app.get(`/api/${kind}`, async () => ({ items: [...m.values()].map((r) => (out as (x: unknown) => unknown)(r)) }));
    app.post(`/api/${kind}`, async (req, reply) => reply.code(201).send((out as (x: unknown) => unknown)((add as (p: unknown) => unknown)(req.body))));
    app.put(`/api/${kind}/:id`, async (req, reply) => {
      const r = m.get((req.params as { id: string }).id);
      if (!r) return problem(reply, 404, 'not-found', `no such ${kind}`);
      const profile = kind === 'coils' ? parseCoilProfile(req.body) : parseDriverProfile(req.body);
      Object.assign(r, { profile, name: profile.name, updatedAt: new Date(Date.now() + 1).toISOString() });
      return (out as (x: unknown) => unknown)(r);
    });
    app.get(`/api/${kind}/:id/export`, async (req, reply) => {
      const r = m.get((req.params as { id: string }).id);
      if (!r) return problem(reply, 404, 'not-found', `no such ${kind}`);
      return reply.header('content-disposition', `attachment; filename="${r.name}.json"`).send(r.profile);
    });
  }

  const planOf = async (clipId: string, coilId: string, driverId: string, gainDb: number | null) => {
    const p = await prepare(clipId, coilId, driverId);
    const { document } = planClipDocument(p.plan, p.analysis, p.coilReport, p.driver, p.settings, gainDb === null ? {} : { gainDb });
    const id = randomUUID();
    const row = { id, clipId, coilId, driverId, analysisId: analysisFor.get(clipId) ?? '', coil: coils.get(coilId)!.profile, driver: p.driver, gainDb, document, createdAt: now(), job: p };
    plans.set(id, row);
    return row;
  };
  const planOut = ({ job: _j, ...r }: Record<string, unknown>) => r;
  app.post('/api/plans', async (req, reply) => {
    const b = req.body as { clipId: string; coilId: string; driverId: string; gainDb?: number | null };
    if (!clips.has(b.clipId) || !coils.has(b.coilId) || !drivers.has(b.driverId)) return problem(reply, 404, 'not-found', 'no such clip, coil or driver');
    return reply.code(201).send(planOut(await planOf(b.clipId, b.coilId, b.driverId, b.gainDb ?? null)));
  });
  app.get('/api/plans/:id', async (req, reply) => {
    const p = plans.get((req.params as { id: string }).id);
    return p ? planOut(p) : problem(reply, 404, 'not-found', 'no such plan');
  });
  app.post('/api/plans/:id/evaluate', async (req, reply) => {
    const p = plans.get((req.params as { id: string }).id);
    if (!p) return problem(reply, 404, 'not-found', 'no such plan');
    const { gainDb, columns = 1000 } = req.body as { gainDb: number; columns?: number };
    const j = p.job;
    const { document } = planClipDocument(j.plan, j.analysis, j.coilReport, j.driver, j.settings, { gainDb });
    const ev = evaluateAtGain(j.plan, coilAtResonance(j.coilReport), j.driver, gainDb, j.settings, { traces: true });
    const n = j.plan.frames.count;
    const edges = grid(0, n, columns);
    const f = j.plan.frames;
    return {
      document,
      temperatures: {
        timeS: edges.slice(0, -1).map((k) => frameStart(k, f.samplesPerFrame) / f.sampleRate),
        devices: ev.sim.devices.map((d) => {
          const tr = d.traces!.junctionC;
          const per = tr.length / n;
          const tj = j.driver.devices.find((x) => x.role === d.role)!.tjMaxC;
          return {
            role: d.role,
            junctionC: edges.slice(0, -1).map((k, i) => {
              let m = -Infinity;
              for (let x = Math.floor(k * per); x < Math.min(tr.length, Math.floor(edges[i + 1] * per)); x++) m = Math.max(m, tr[x]);
              return Number.isFinite(m) ? m : tr[Math.min(tr.length - 1, Math.floor(k * per))];
            }),
            limitC: tj - j.settings.marginK,
            tjMaxC: tj,
          };
        }),
      },
    };
  });
  app.get('/api/plans/:id/modulation', async (req, reply) => {
    const p = plans.get((req.params as { id: string }).id);
    if (!p) return problem(reply, 404, 'not-found', 'no such plan');
    const q = req.query as { columns?: string; fromS?: string; toS?: string; gainDb?: string };
    const j = p.job;
    const gainDb = q.gainDb !== undefined ? Number(q.gainDb) : ((p.document as { evaluatedGainDb: number }).evaluatedGainDb);
    const fromS = q.fromS ? Number(q.fromS) : 0;
    const toS = q.toS ? Number(q.toS) : j.plan.durationS;
    const columns = Number(q.columns ?? 1000);
    const whole = Math.min(j.plan.frames.count, Math.ceil((columns * j.plan.durationS) / Math.max(1e-3, toS - fromS)));
    const m = modulationPreview(j.plan, j.driver, gainDb, { maxColumns: whole, resonanceHz: j.coil.resonanceHz });
    const idx: number[] = [];
    for (let c = 0; c < m.columns; c++) if (m.edgesS[c + 1] >= fromS && m.edgesS[c] <= toS) idx.push(c);
    const pick = <T extends ArrayLike<number>>(a: T | undefined | null) => (a ? idx.map((i) => a[i]) : null);
    return {
      scheme: m.scheme,
      gainDb,
      supplyVoltageV: j.driver.supplyVoltageV,
      fromS,
      toS,
      timeS: idx.map((i) => m.edgesS[i]),
      railMinV: pick(m.rail?.minV),
      railMaxV: pick(m.rail?.maxV),
      pulseCount: pick(m.pulses?.count),
      maxOnTimeS: pick(m.pulses?.maxOnS),
      powerMeanW: pick(m.power.meanW),
      powerMaxW: pick(m.power.maxW),
    };
  });

  app.get('/api/sets', async () => ({ items: [...sets.values()] }));
  app.post('/api/sets', async (req, reply) => {
    const id = randomUUID();
    const s = { ...(req.body as object), id, createdAt: now(), updatedAt: now() };
    sets.set(id, s);
    return reply.code(201).send(s);
  });
  app.put('/api/sets/:id', async (req, reply) => {
    const s = sets.get((req.params as { id: string }).id);
    if (!s) return problem(reply, 404, 'not-found', 'no such set');
    Object.assign(s, req.body as object, { updatedAt: now() });
    return s;
  });
  app.get('/api/sets/:id', async (req, reply) => sets.get((req.params as { id: string }).id) ?? problem(reply, 404, 'not-found', 'no such set'));
  app.post('/api/sets/:id/plan', async (req, reply) => {
    const s = sets.get((req.params as { id: string }).id) as unknown as { id: string; coilId: string; driverId: string; items: { clipId: string; gapAfterS: number; gainDb: number | null }[] };
    if (!s) return problem(reply, 404, 'not-found', 'no such set');
    const j = job('set-plan', async (progress) => {
      const preps: PreparedJob[] = [];
      for (const [i, it] of s.items.entries()) {
        progress(i / s.items.length, `analysing clip ${i + 1}`);
        preps.push(await prepare(it.clipId, s.coilId, s.driverId));
      }
      const driver = preps[0].driver;
      const coil = coilAtResonance(preps[0].coilReport);
      const settings = planSettings(driver);
      const result = planSet(preps.map((p, i) => ({ clip: p.plan, gapAfterS: s.items[i].gapAfterS, gainDb: s.items[i].gainDb })), coil, driver, settings);
      // Temperatures across the set: each clip from the state the last one left, then its gap idling.
      const timeS: number[] = [];
      const traces: number[][] = driver.devices.map(() => []);
      const roles: string[] = [];
      const gaps: { fromS: number; toS: number }[] = [];
      let state: Float64Array[] | undefined;
      let t0 = 0;
      for (const [i, p] of preps.entries()) {
        const ev = evaluateAtGain(p.plan, coil, driver, result.items[i].gainDb, settings, { initial: state, traces: true });
        const n = ev.sim.devices[0].traces!.junctionC.length;
        const step = Math.max(1, Math.floor(n / 300));
        for (let k = 0; k < n; k += step) {
          timeS.push(t0 + (k / n) * p.plan.durationS);
          ev.sim.devices.forEach((d, di) => traces[di].push(d.traces!.junctionC[k]));
        }
        roles.splice(0, roles.length, ...ev.sim.devices.map((d) => d.role));
        state = ev.sim.finalState;
        t0 += p.plan.durationS;
        const gap = s.items[i].gapAfterS;
        if (gap > 0) {
          const idle = simulateSteady(driver, coil, { durationS: gap, frameS: Math.max(0.1, gap / 100), railV: driver.supplyVoltageV / 2, initial: state, ambientC: settings.ambientC });
          const m = idle.devices[0].traces!.junctionC.length;
          for (let k = 0; k < m; k++) {
            timeS.push(t0 + ((k + 1) / m) * gap);
            idle.devices.forEach((d, di) => traces[di].push(d.traces!.junctionC[k]));
          }
          gaps.push({ fromS: t0, toS: t0 + gap });
          state = idle.finalState;
          t0 += gap;
        }
      }
      setPlans.set(s.id, {
        result,
        temperatures: {
          timeS,
          devices: roles.map((role, di) => ({ role, junctionC: traces[di], limitC: driver.devices.find((d) => d.role === role)!.tjMaxC - settings.marginK })),
          gaps,
        },
      });
      return s.id;
    });
    return reply.code(202).send({ job: j });
  });
  app.get('/api/sets/:id/plan', async (req, reply) => setPlans.get((req.params as { id: string }).id) ?? problem(reply, 404, 'not-found', 'plan the set first'));

  app.post('/api/plans/:id/renders', async (req, reply) => {
    const p = plans.get((req.params as { id: string }).id);
    if (!p) return problem(reply, 404, 'not-found', 'no such plan');
    const b = req.body as { kind: 'render' | 'preview'; gainDb?: number | null };
    const id = randomUUID();
    const clip = clips.get(p.clipId as string)!;
    const base = clip.name.replace(/\.[^.]+$/, '');
    const row: Record<string, unknown> = { id, planId: p.id, kind: b.kind, state: 'running', jobId: '', safe: null, summary: null, createdAt: now() };
    const j = job(b.kind, async (progress) => {
      progress(0.2, b.kind === 'render' ? 'rendering' : 'previewing');
      const names = { clip: clip.name, out: `${base}-${b.kind === 'render' ? 'coil' : 'arcs'}.wav` };
      const gainDb = b.gainDb ?? undefined;
      if (b.kind === 'render') {
        const sink = new MemorySink();
        const r = await renderJob(p.job, { names, gainDb, format: 's16', ceilingDbfs: 0 }, sink);
        renders.set(id, { row, bytes: sink.bytes(), name: names.out });
        Object.assign(row, { state: 'done', safe: r.summary.closedLoop.ok, summary: r.summary });
      } else {
        const sink = new MemorySink();
        const r = previewJob(p.job, { names, gainDb, format: 's16' }, sink);
        renders.set(id, { row, bytes: sink.bytes(), name: names.out });
        Object.assign(row, { state: 'done', safe: null, summary: r.summary });
      }
      return id;
    });
    row.jobId = j.id;
    renders.set(id, { row, bytes: new Uint8Array(0), name: '' });
    return reply.code(202).send({ render: row, job: j });
  });
  app.get('/api/renders/:id', async (req, reply) => renders.get((req.params as { id: string }).id)?.row ?? problem(reply, 404, 'not-found', 'no such render'));
  app.get('/api/renders/:id/audio', async (req, reply) => {
    const r = renders.get((req.params as { id: string }).id);
    if (!r || r.bytes.length === 0) return problem(reply, 404, 'not-found', 'no such render');
    return reply.type('audio/wav').header('content-disposition', `attachment; filename="${r.name}"`).send(Buffer.from(r.bytes));
  });

  const dist = fileURLToPath(new URL('../../client/dist', import.meta.url));
  if (opts.serveClient !== false && existsSync(dist)) await app.register(fastifyStatic, { root: dist, prefix: '/' });
  return app;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const app = await buildFakeApi();
  await app.listen({ host: '127.0.0.1', port: Number(process.argv[2] ?? 8080) });
  console.log(`fake coilcue API on ${app.server.address() && JSON.stringify(app.server.address())}`);
}
