/**
 * Documents for the component tests, made by the engine itself (no hand-written numbers): a short
 * synthesised clip analysed and planned on a demo coil and driver, exactly as the server's plan
 * routes make them (server/services/plan.ts planClipDocument).
 */
import { analyzeClip } from '../../shared/analysis/analyze-clip.ts';
import { modulationSource } from '../../shared/audio/clip.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR } from '../../shared/demo/drivers.ts';
import { planSettings } from '../../shared/plan/evaluate.ts';
import { toPlanClip } from '../../shared/plan/plan-clip.ts';
import { coilReportFor } from '../../server/services/profiles.ts';
import { planClipDocument, type PlanDocument } from '../../server/services/plan.ts';
import type { Plan } from '../../client/api.ts';

/** 4 s of a 220 Hz tone swelling from silence to −1 dBFS and back (stereo, 44.1 kHz). */
export function swellClip() {
  const fs = 44100;
  const n = 4 * fs;
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = 0.89 * Math.sin((Math.PI * i) / n) * Math.sin((2 * Math.PI * 220 * i) / fs);
  return { sampleRate: fs, channels: [x, x.slice()] };
}

export function planFixture() {
  const clip = swellClip();
  const analysis = analyzeClip(clip);
  const driver = DEMO_DRIVER_LINEAR;
  const coil = coilReportFor(DEMO_COILS['desk-lantern'], driver);
  const planClip = toPlanClip('swell.wav', analysis, modulationSource(clip, 'mix'), driver);
  const settings = planSettings(driver);
  const at = (gainDb?: number): PlanDocument => planClipDocument(planClip, analysis, coil, driver, settings, gainDb === undefined ? {} : { gainDb }).document;
  const document = JSON.parse(JSON.stringify(at())) as PlanDocument;
  const plan: Plan = {
    id: 'plan-1',
    clipId: 'clip-1',
    coilId: 'coil-1',
    driverId: 'driver-1',
    analysisId: 'analysis-1',
    coil: DEMO_COILS['desk-lantern'],
    driver,
    gainDb: null,
    document,
    createdAt: new Date(0).toISOString(),
  };
  return { plan, at, coil, driver };
}
