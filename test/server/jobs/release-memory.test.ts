import { describe, expect, it } from 'vitest';
import { releaseMemory } from '../../../server/jobs/release-memory.ts';

describe('releaseMemory', () => {
  it('frees a dropped clip-sized buffer at once, without waiting for the next allocation', () => {
    // A 64 MiB buffer, touched so its pages are resident, then dropped.
    let clip: Float32Array | null = new Float32Array(16 << 20).fill(0.25);
    const held = process.memoryUsage().arrayBuffers;
    expect(clip[123]).toBe(0.25);
    clip = null;
    releaseMemory();
    const after = process.memoryUsage().arrayBuffers;
    expect(held - after).toBeGreaterThanOrEqual(60 << 20);
  });
});
