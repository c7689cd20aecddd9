/**
 * The closed loop (server/render/closed-loop.ts): a render at the advised gain, read back from its
 * WAV bytes, analysed and planned again at 0 dB, keeps every limit the advice promised — with the
 * demo coil and each demo driver from shared/demo. And when a limit does not hold, the report says
 * which. The limits and their allowed values are the planner's (shared/plan/evaluate.ts).
 */
import { describe, expect, it } from 'vitest';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { type AudioClip, modulationSource } from '../../../shared/audio/clip.ts';
import { synthDemoClip } from '../../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';
import { analyzeCoil } from '../../../shared/physics/coil/analyze.ts';
import { adviseGain } from '../../../shared/plan/advise.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { toPlanClip } from '../../../shared/plan/plan-clip.ts';
import type { DriverProfile } from '../../../shared/schemas/driver.ts';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import { closedLoopCheck } from '../../../server/render/closed-loop.ts';
import { encodeRender, renderModulation } from '../../../server/render/render-clip.ts';

const report = analyzeCoil(DEMO_COILS['desk-lantern']);
const coil = { resonanceHz: report.resonanceHz, qualityFactor: report.qualityFactor };

/** 2 s of the demo tune around its crescendo (12–14 s), stereo, 44.1 kHz. */
const full = synthDemoClip('harbour-lights');
const clip: AudioClip = { sampleRate: full.sampleRate, channels: full.channels.map((c) => c.slice(12 * 44100, 14 * 44100)) };

async function roundTrip(driver: DriverProfile, gainDb?: number) {
  const analysis = analyzeClip(clip);
  const plan = toPlanClip('excerpt', analysis, modulationSource(clip, 'mix'), driver);
  const settings = planSettings(driver);
  const advice = adviseGain(plan, coil, driver, settings);
  const chosen = gainDb ?? advice.advisedGainDb!;
  const promised = gainDb === undefined ? advice.atAdvised : evaluateAtGain(plan, coil, driver, chosen, settings);
  const r = await renderModulation(clip, { gainDb: chosen, format: 's16' });
  const back = await decodeAudioBytes(encodeRender(r, 's16'));
  const loop = closedLoopCheck({ sampleRate: back.sampleRate, channels: back.channels }, 'render', coil, driver, settings, promised);
  return { advice, loop, r };
}

describe('render at the advised gain, planned again at 0 dB', () => {
  it.each([
    ['rail-linear', DEMO_DRIVER_LINEAR],
    ['rail-switched', DEMO_DRIVER_BUCK],
    ['pulse', DEMO_DRIVER_PULSE],
  ] as const)('%s demo driver: every promised limit holds on the render', async (_name, driver) => {
    const { advice, loop } = await roundTrip(driver);
    expect(advice.advisedGainDb).not.toBeNull();
    expect(loop.gainDbApplied).toBe(0);
    expect(loop.ok).toBe(true);
    expect(loop.promiseKept).toBe(true);
    expect(loop.failures).toEqual([]);
    // The same limits as the plan (every device, over-modulation, supply current; pulses add two).
    expect(loop.limits.map((l) => l.limit)).toEqual(advice.atAdvised.limits.map((l) => l.limit));
    for (const l of loop.limits) {
      expect(l.rendered).toBeLessThanOrEqual(l.allowed);
      expect(Number.isFinite(l.planned)).toBe(true);
    }
    // The limiter holds every sample at or below full scale: nothing left to over-modulate.
    expect(loop.limits.find((l) => l.limit === 'over-modulation')!.rendered).toBe(0);
  });

  it('rail-linear: the render loads the driver as the plan said (junction temperatures within 1 K, supply current within 5 %)', async () => {
    // The limiter only touches the few peaks the plan allowed to over-modulate (≤ 0.1 % of samples),
    // so the thermal and current figures move little; 1 K and 5 % are generous bounds for that.
    const { loop } = await roundTrip(DEMO_DRIVER_LINEAR);
    for (const l of loop.limits) {
      if (l.unit === 'C') expect(Math.abs(l.rendered - l.planned)).toBeLessThan(1);
      if (l.unit === 'A') expect(Math.abs(l.rendered - l.planned) / l.planned).toBeLessThan(0.05);
    }
  });
});

describe('a render that breaks a limit is reported plainly', () => {
  it('a supply too weak for the gain: the supply-current limit does not hold, and the report names it', async () => {
    // The demo linear driver draws up to 3 A at the full rail; a 1.5 A supply cannot follow loud passages.
    const weak: DriverProfile = { ...DEMO_DRIVER_LINEAR, supplyCurrentLimitA: 1.5 };
    const { loop } = await roundTrip(weak, 6);
    expect(loop.ok).toBe(false);
    const supply = loop.limits.find((l) => l.limit === 'supply-current')!;
    expect(supply.holds).toBe(false);
    expect(supply.plannedOk).toBe(false);
    expect(supply.rendered).toBeGreaterThan(1.5);
    // The promise itself was broken at this gain, so the render keeps "the promise" only vacuously.
    expect(loop.promiseKept).toBe(true);
    expect(loop.failures.join(' ')).toMatch(/supply current does NOT hold on the render: \d+\.\d\d A against 1\.50 A allowed/);
  });
});
