/**
 * Demo data on first start: our invented scenario (the demo coils and drivers of shared/demo, the
 * synthesised demo clips written as WAV, and one set of them), seeded once into an empty data
 * folder so a fresh clone shows something real at once. The database records that it was seeded,
 * so what the person deletes never comes back.
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { DEMO_CLIPS, synthDemoClip } from '../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVERS } from '../../shared/demo/drivers.ts';
import { parseCoilProfile } from '../../shared/schemas/coil.ts';
import { encodeWav } from '../audio/wav.ts';
import { commitFile, tempPath } from '../storage/files.ts';

export const DEMO_SEEDED_KEY = 'demo-seeded';

/** Seeds the demo data when the folder is empty and was never seeded; returns true when it did. */
export async function seedDemo(app: FastifyInstance): Promise<boolean> {
  const { store, paths } = app;
  if (store.getMeta(DEMO_SEEDED_KEY) !== null || !store.isEmpty()) {
    if (store.getMeta(DEMO_SEEDED_KEY) === null) store.setMeta(DEMO_SEEDED_KEY, 'skipped: the data folder held data');
    return false;
  }
  const clips: { name: string; sha256: string; sizeBytes: number; durationS: number; sampleRate: number; channels: number }[] = [];
  for (const c of DEMO_CLIPS) {
    const audio = synthDemoClip(c.name);
    const bytes = encodeWav(audio, { format: 's16', seed: 1 });
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    const final = join(paths.clips, sha256);
    if (!existsSync(final)) {
      const tmp = tempPath(paths);
      await writeFile(tmp, bytes);
      await commitFile(tmp, final);
    }
    clips.push({ name: `${c.name}.wav`, sha256, sizeBytes: bytes.length, durationS: audio.channels[0].length / audio.sampleRate, sampleRate: audio.sampleRate, channels: audio.channels.length });
  }
  store.db.transaction(() => {
    const coilIds = Object.values(DEMO_COILS).map((p) => store.insertProfile('coil', parseCoilProfile(JSON.parse(JSON.stringify(p)))).id);
    const driverIds = DEMO_DRIVERS.map((d) => store.insertProfile('driver', d).id);
    const clipRows = clips.map((c) => store.clipBySha(c.sha256) ?? store.insertClip({ name: c.name, sha256: c.sha256, sizeBytes: c.sizeBytes, format: 'wav', sampleRate: c.sampleRate, channels: c.channels, durationS: c.durationS }));
    store.insertSet({
      name: 'Demo evening',
      coilId: coilIds[0],
      driverId: driverIds[0],
      items: clipRows.map((c, i) => ({ clipId: c.id, gapAfterS: i === clipRows.length - 1 ? 0 : 20, gainDb: null })),
      commonGain: false,
    });
    store.setMeta(DEMO_SEEDED_KEY, new Date().toISOString());
  })();
  return true;
}

export default fp(
  async (app: FastifyInstance) => {
    if (app.config.seedDemo && (await seedDemo(app))) app.log.info('demo data seeded into the empty data folder');
  },
  { name: 'demo', dependencies: ['storage'] },
);
