// The analysis worker as the command line holds it (server/analysis/worker-handle.ts): a worker
// started early is the one the next analysis takes, once.
import { describe, expect, it } from 'vitest';
import { prestartAnalysisWorker, startAnalysisWorker } from '../../../server/analysis/worker-handle.ts';

describe('prestartAnalysisWorker', () => {
  it('starts one worker that the next startAnalysisWorker() hands over, and only once', async () => {
    prestartAnalysisWorker();
    prestartAnalysisWorker(); // idempotent: still the same one waiting
    const first = startAnalysisWorker();
    const second = startAnalysisWorker();
    expect(second).not.toBe(first);
    expect(await first.ready).toBe(true);
    expect(first.available).toBe(true);
    await first.terminate();
    await second.terminate();
  });

  it('without a prestart, each call starts a worker of its own', async () => {
    const a = startAnalysisWorker();
    const b = startAnalysisWorker();
    expect(b).not.toBe(a);
    expect(await a.ready).toBe(true);
    await a.terminate();
    expect(a.available).toBe(false);
    expect(b.available).toBe(true);
    await b.terminate();
  });
});
