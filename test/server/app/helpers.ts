import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../../server/app.ts';
import { type ServerConfig, defaultConfig } from '../../../server/config.ts';
import { encodeWav } from '../../../server/audio/wav.ts';

/** A temporary data folder. */
export function tempDataDir(): { dir: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'coilcue-app-'));
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

export async function appOn(dir: string, over: Partial<ServerConfig> = {}): Promise<FastifyInstance> {
  const app = await buildApp(defaultConfig(dir, { seedDemo: false, rateLimitPerMinute: 0, clientDir: join(dir, 'no-client'), ...over }));
  await app.ready();
  return app;
}

/** A short stereo test clip: a 220 Hz tone with a 3 Hz tremolo, `seconds` long at 8 kHz, as WAV bytes. */
export function toneWav(seconds = 1.5, sampleRate = 8000, amp = 0.5): Uint8Array {
  const n = Math.round(seconds * sampleRate);
  const l = new Float32Array(n);
  const r = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / sampleRate;
    const env = 0.6 + 0.4 * Math.sin(2 * Math.PI * 3 * t);
    l[i] = amp * env * Math.sin(2 * Math.PI * 220 * t);
    r[i] = amp * env * Math.sin(2 * Math.PI * 330 * t);
  }
  return encodeWav({ sampleRate, channels: [l, r] }, { format: 's16', seed: 1 });
}

/** A multipart body with the given files (field, name, bytes). */
export function multipart(files: { field?: string; name: string; bytes: Uint8Array }[]): { payload: Buffer; headers: Record<string, string> } {
  const boundary = '----coilcue-test-boundary';
  const parts: Buffer[] = [];
  for (const f of files) {
    parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${f.field ?? 'file'}"; filename="${f.name}"\r\nContent-Type: audio/wav\r\n\r\n`));
    parts.push(Buffer.from(f.bytes));
    parts.push(Buffer.from('\r\n'));
  }
  parts.push(Buffer.from(`--${boundary}--\r\n`));
  return { payload: Buffer.concat(parts), headers: { 'content-type': `multipart/form-data; boundary=${boundary}` } };
}

/** Waits for a job to end (polling its row). */
export async function waitJob(app: FastifyInstance, id: string, timeoutMs = 60_000): Promise<{ state: string; resultId: string | null; error: unknown }> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const j = (await app.inject({ method: 'GET', url: `/api/jobs/${id}` })).json();
    if (j.state === 'done' || j.state === 'failed') return j;
    if (Date.now() > end) throw new Error(`job ${id} still ${j.state}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
