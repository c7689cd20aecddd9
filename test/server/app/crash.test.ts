// The server killed with SIGKILL (no handler runs) during an upload, an analysis, a render and a
// profile save, then started again on the same DATA_DIR. Right after each kill, before the restart
// can mend anything, the database passes SQLite's integrity check and no row names a missing file.
// After the restart and its start-up sweep: no file lies outside the records, the temporary folder
// is empty, and every interrupted job has ended (done, or failed with a reason), none left running.
import { type ChildProcess, spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { multipart, toneWav } from './helpers.ts';

const ROOT = fileURLToPath(new URL('../../../', import.meta.url));
const dataDir = mkdtempSync(join(tmpdir(), 'coilcue-crash-'));
afterAll(() => rmSync(dataDir, { recursive: true, force: true }));

const freePort = (): Promise<number> =>
  new Promise((done) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => done(port));
    });
  });

interface Running {
  child: ChildProcess;
  origin: string;
}

/** Starts `npm start`'s entry on the data folder (no demo seeding: the test makes its own rows). */
async function start(): Promise<Running> {
  const port = await freePort();
  const child = spawn(process.execPath, [join(ROOT, 'bin', 'coilcue-server.cjs')], {
    cwd: ROOT,
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATA_DIR: dataDir, COILCUE_DEMO: '0', COILCUE_LOG: 'warn', COILCUE_RATE_LIMIT: '0' },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr!.on('data', (d) => (stderr += d));
  const origin = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 90_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited with ${child.exitCode}: ${stderr}`);
    try {
      if ((await fetch(`${origin}/api/health`)).ok) return { child, origin };
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`no answer from ${origin} within 90 s: ${stderr}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

const exited = (child: ChildProcess) => new Promise<void>((done) => (child.exitCode !== null || child.signalCode !== null ? done() : child.once('exit', () => done())));

async function kill(s: Running): Promise<void> {
  s.child.kill('SIGKILL');
  await exited(s.child);
}

async function stop(s: Running): Promise<void> {
  s.child.kill('SIGTERM');
  const t = setTimeout(() => s.child.kill('SIGKILL'), 20_000);
  await exited(s.child);
  clearTimeout(t);
}

const files = (folder: string) => (existsSync(join(dataDir, folder)) ? readdirSync(join(dataDir, folder)) : []);

/** Rows and files as they are on disk, read with the server stopped. */
function inspect(): { integrity: string; missing: string[]; orphans: string[]; running: number; open: number; clips: number; failedWithoutReason: number } {
  const db = new Database(join(dataDir, 'coilcue.sqlite'), { readonly: true, fileMustExist: true });
  try {
    const integrity = String((db.prepare('PRAGMA integrity_check').get() as Record<string, unknown>).integrity_check);
    const col = (sql: string) => (db.prepare(sql).all() as { f: string }[]).map((r) => r.f);
    const rows = {
      clips: col('SELECT sha256 AS f FROM clips'),
      analyses: col('SELECT reductions AS f FROM analyses WHERE reductions IS NOT NULL'),
      renders: col('SELECT file AS f FROM renders WHERE file IS NOT NULL'),
    };
    const missing: string[] = [];
    const orphans: string[] = [];
    for (const [folder, names] of Object.entries(rows)) {
      const present = new Set(files(folder));
      for (const n of names) if (!present.has(n)) missing.push(`${folder}/${n}`);
      for (const f of present) if (!names.includes(f)) orphans.push(`${folder}/${f}`);
    }
    const running = (db.prepare("SELECT COUNT(*) AS n FROM jobs WHERE state = 'running'").get() as { n: number }).n;
    const open = (db.prepare("SELECT COUNT(*) AS n FROM jobs WHERE state IN ('queued', 'running')").get() as { n: number }).n;
    const failedWithoutReason = (db.prepare("SELECT COUNT(*) AS n FROM jobs WHERE state = 'failed' AND (error IS NULL OR error = '')").get() as { n: number }).n;
    return { integrity, missing, orphans, running, open, clips: rows.clips.length, failedWithoutReason };
  } finally {
    db.close();
  }
}

async function json(s: Running, method: string, path: string, body?: unknown): Promise<Record<string, unknown>> {
  const r = await fetch(`${s.origin}${path}`, { method, headers: body === undefined ? {} : { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
  return (await r.json()) as Record<string, unknown>;
}

/** Waits until every job has ended (the restarted server re-queues or fails what was interrupted). */
async function settle(s: Running): Promise<void> {
  const deadline = Date.now() + 120_000;
  const db = () => new Database(join(dataDir, 'coilcue.sqlite'), { readonly: true });
  for (;;) {
    const d = db();
    const open = (d.prepare("SELECT COUNT(*) AS n FROM jobs WHERE state IN ('queued', 'running')").get() as { n: number }).n;
    d.close();
    if (open === 0) return;
    if (Date.now() > deadline) throw new Error(`${open} jobs still open after 120 s`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The checks after a kill: before the restart, then after the restart has swept and settled. */
async function afterKill(what: string, expectInterrupted = false): Promise<ReturnType<typeof inspect>> {
  const raw = inspect();
  expect(raw.integrity, what).toBe('ok');
  // The kill landed while the job was still queued or running (else this case would test nothing).
  if (expectInterrupted) expect(raw.open, `${what}: open jobs at the kill`).toBeGreaterThan(0);
  expect(raw.missing, `${what}: rows naming missing files right after the kill`).toEqual([]);
  const s = await start();
  await settle(s);
  await stop(s);
  const swept = inspect();
  expect(swept.integrity, what).toBe('ok');
  expect(swept.missing, what).toEqual([]);
  expect(swept.orphans, `${what}: files outside the records after the sweep`).toEqual([]);
  expect(files('tmp'), `${what}: temporary files after the sweep`).toEqual([]);
  expect(swept.running, what).toBe(0);
  expect(swept.failedWithoutReason, what).toBe(0);
  return swept;
}

describe('the server killed mid-work, then started again', () => {
  // A 40 s clip: long enough that its analysis and render are still running when the kill comes.
  const long = toneWav(40, 44100, 0.5);

  it('during an upload', async () => {
    const s = await start();
    // Send the first half of a large upload, then kill the server while it streams.
    const body = multipart([{ name: 'half-sent.wav', bytes: long }]);
    const req = fetch(`${s.origin}/api/clips`, {
      method: 'POST',
      headers: body.headers,
      body: new ReadableStream({
        async start(c) {
          c.enqueue(new Uint8Array(body.payload.subarray(0, body.payload.length >> 1)));
          await new Promise((r) => setTimeout(r, 400));
          await kill(s);
          c.close();
        },
      }),
      duplex: 'half',
    } as RequestInit).catch(() => null);
    await req;
    const after = await afterKill('upload');
    expect(after.clips, 'a half-sent upload leaves no clip').toBe(0);
  });

  it('during an analysis, a render and a profile save', async () => {
    let s = await start();
    const up = await fetch(`${s.origin}/api/clips`, { method: 'POST', ...(() => { const m = multipart([{ name: 'long.wav', bytes: long }]); return { headers: m.headers, body: new Uint8Array(m.payload) }; })() });
    expect(up.status).toBeLessThan(300);
    const clip = (await up.json()) as { id: string };

    // Analysis: killed as soon as its job runs.
    const started = await json(s, 'POST', `/api/clips/${clip.id}/analyses`, {});
    expect(started.job).toBeDefined();
    await new Promise((r) => setTimeout(r, 300));
    await kill(s);
    await afterKill('analysis', true);

    // The restart finished (or failed) the analysis; plan on it, then kill during the render.
    s = await start();
    const coil = await json(s, 'POST', '/api/coils', DEMO_COILS['desk-lantern']);
    const drivers = (await json(s, 'GET', '/api/drivers')) as { items: { id: string }[] };
    let driverId = drivers.items[0]?.id;
    if (!driverId) {
      const { DEMO_DRIVER_LINEAR } = await import('../../../shared/demo/drivers.ts');
      driverId = (await json(s, 'POST', '/api/drivers', DEMO_DRIVER_LINEAR)).id as string;
    }
    let plan = await json(s, 'POST', '/api/plans', { clipId: clip.id, coilId: coil.id, driverId });
    if (plan.job) {
      const jobId = (plan.job as { id: string }).id;
      for (let i = 0; i < 600; i++) {
        const j = await json(s, 'GET', `/api/jobs/${jobId}`);
        if (j.state === 'done') {
          plan = await json(s, 'GET', `/api/plans/${j.resultId as string}`);
          break;
        }
        if (j.state === 'failed') throw new Error(`plan job failed: ${JSON.stringify(j.error)}`);
        await new Promise((r) => setTimeout(r, 200));
      }
    }
    expect(plan.id).toBeDefined();
    const render = await json(s, 'POST', `/api/plans/${plan.id as string}/renders`, { kind: 'render', gainDb: -20 });
    expect(render.job).toBeDefined();
    // Killed as soon as the render's job is running: on a quiet machine the whole render of the
    // 40 s clip takes well under a second, so a fixed wait could miss it.
    const renderJobId = (render.job as { id: string }).id;
    for (let i = 0; i < 1000; i++) {
      const j = await json(s, 'GET', `/api/jobs/${renderJobId}`);
      if (j.state !== 'queued') break;
      await new Promise((r) => setTimeout(r, 10));
    }
    await kill(s);
    await afterKill('render', true);

    // Profile save: the request is sent and the server killed at once.
    s = await start();
    const save = fetch(`${s.origin}/api/coils`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ ...DEMO_COILS['desk-lantern'], name: 'saved-while-killed' }) }).catch(() => null);
    await new Promise((r) => setTimeout(r, 5));
    await kill(s);
    await save;
    await afterKill('profile save');
  });
});
