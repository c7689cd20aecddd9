/** A stored plan keeps its gain search, including the silent case's −Infinity gain that JSON cannot hold. */
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { GainSearch } from '../../../shared/plan/advise.ts';
import { Store } from '../../../server/storage/store.ts';
import { tempDataDir } from '../app/helpers.ts';

describe('stored plans', () => {
  const data = tempDataDir();
  afterAll(() => data.cleanup());

  it('give back the gain search they were stored with, −Infinity included', () => {
    const store = new Store(join(data.dir, 'plans.sqlite'));
    store.db.exec(`INSERT INTO clips (id, name, sha256, size_bytes, format, sample_rate, channels, duration_s, created_at) VALUES ('c1', 'a.wav', '${'b'.repeat(64)}', 10, 'wav', 8000, 1, 1, '2026-01-01T00:00:00Z');
      INSERT INTO analyses (id, clip_id, channel, frame_ms, engine_version, state, created_at) VALUES ('a1', 'c1', 'mix', 1, 'x', 'done', '2026-01-01T00:00:00Z')`);
    const search: GainSearch = {
      advisedGainDb: null,
      binding: { limit: 'junction-temperature', role: 'pass', value: 130, allowed: 125, unit: 'C', headroom: -5, ok: false, atS: 0.5 },
      atAdvisedGainDb: -Infinity,
      evaluations: 62,
      unsafeOnSilence: true,
      overModulationBoundDb: 12.3,
    };
    const base = { clipId: 'c1', analysisId: 'a1', coilId: 'k', driverId: 'd', coil: {}, driver: {}, gainDb: null, settings: {}, document: {} } as const;
    const p = store.insertPlan({ ...base, search } as unknown as Parameters<Store['insertPlan']>[0]);
    expect(store.getPlan(p.id)!.search).toEqual(search);
    const q = store.insertPlan({ ...base, search: null } as unknown as Parameters<Store['insertPlan']>[0]);
    expect(store.getPlan(q.id)!.search).toBeNull();
    store.setPlanSearch(q.id, { ...search, advisedGainDb: 3.2, atAdvisedGainDb: 3.2, unsafeOnSilence: false });
    expect(store.getPlan(q.id)!.search).toMatchObject({ advisedGainDb: 3.2, atAdvisedGainDb: 3.2 });
    store.close();
  });
});
