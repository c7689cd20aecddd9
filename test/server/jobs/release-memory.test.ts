import { setTimeout as sleep } from 'node:timers/promises';
import { describe, expect, it } from 'vitest';
import { releaseMemory } from '../../../server/jobs/release-memory.ts';

describe('releaseMemory', () => {
  it('frees a dropped clip-sized buffer without waiting for the next allocation', async () => {
    // A 64 MiB buffer, touched so its pages are resident, then dropped.
    let clip: Float32Array | null = new Float32Array(16 << 20).fill(0.25);
    const held = process.memoryUsage().arrayBuffers;
    expect(clip[123]).toBe(0.25);
    clip = null;
    releaseMemory();
    // V8 frees the backing stores of collected array buffers on a background sweeper thread, which
    // on a busy machine may not have run by the time the collection returns: give it up to 5 s,
    // allocating nothing meanwhile (without the collection nothing would free the buffer at all).
    let after = process.memoryUsage().arrayBuffers;
    for (let i = 0; i < 100 && held - after < 60 << 20; i++) {
      await sleep(50);
      after = process.memoryUsage().arrayBuffers;
    }
    expect(held - after).toBeGreaterThanOrEqual(60 << 20);
  });
});
