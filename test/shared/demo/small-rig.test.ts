// The demo small rig (shared/demo/small-rig.ts) planned end to end: a demo clip on one bipolar
// switch in free air with a series MOSFET on the rail, each with its own junction temperature,
// steady idle included.
import { describe, expect, it } from 'vitest';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';
import { synthDemoClip } from '../../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVERS } from '../../../shared/demo/drivers.ts';
import { DEMO_SMALL_COIL, DEMO_SMALL_DRIVER, DEMO_SMALL_RIG } from '../../../shared/demo/small-rig.ts';
import { analyzeCoil } from '../../../shared/physics/coil/analyze.ts';
import { TRANSITION_SHARE_LIMIT } from '../../../shared/physics/driver/transition.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { toPlanClip } from '../../../shared/plan/plan-clip.ts';
import { planClipReport } from '../../../shared/plan/report.ts';
import { planSet } from '../../../shared/plan/set.ts';
import { parseCoilProfile } from '../../../shared/schemas/coil.ts';

const coilReport = analyzeCoil(DEMO_SMALL_COIL);
const coil = { resonanceHz: coilReport.resonanceHz, qualityFactor: coilReport.qualityFactor, modulationCornerHz: coilReport.modulationCornerHz };
const audio = synthDemoClip('harbour-lights');
const analysis = analyzeClip(audio);
const clip = toPlanClip('harbour-lights', analysis, modulationSource(audio, analysis.modulationChannel), DEMO_SMALL_DRIVER);
const settings = planSettings(DEMO_SMALL_DRIVER);

describe('demo small rig', () => {
  it('is exported with the other demo profiles, so every front door that seeds demos has it', () => {
    expect(DEMO_SMALL_RIG).toEqual({ coil: DEMO_SMALL_COIL, driver: DEMO_SMALL_DRIVER });
    expect(DEMO_COILS.thimble).toBe(DEMO_SMALL_COIL);
    expect(DEMO_DRIVERS).toContain(DEMO_SMALL_DRIVER);
    expect(parseCoilProfile(JSON.parse(JSON.stringify(DEMO_SMALL_COIL)))).toEqual(DEMO_SMALL_COIL);
    // One bipolar switch that follows the coil, a MOSFET pass device, the switch in free air.
    expect(DEMO_SMALL_DRIVER.topology).toBe('single-switch');
    expect(DEMO_SMALL_DRIVER.scheme).toBe('rail-linear');
    expect(DEMO_SMALL_DRIVER.devices.map((d) => [d.role, d.kind])).toEqual([
      ['bridge', 'bjt'],
      ['pass', 'mosfet'],
    ]);
    expect(DEMO_SMALL_DRIVER.devices[0].thermal.caseToSinkKPerW).toBe(0);
  });

  it('plans the demo clip end to end with a finite gain bound by the bipolar switch', () => {
    const { report, evaluation } = planClipReport(clip, coil, DEMO_SMALL_DRIVER, settings, { spectrum: analysis.spectrum.welch });
    expect(report.advisedGainDb).not.toBeNull();
    expect(Number.isFinite(report.advisedGainDb!)).toBe(true);
    expect(report.binding).toMatchObject({ limit: 'junction-temperature', role: 'bridge' });
    // Every limit holds at the advice and the binding one fails 0.1 dB above it.
    expect(evaluation.gainDb).toBe(report.advisedGainDb);
    expect(evaluation.ok).toBe(true);
    const above = evaluateAtGain(clip, coil, DEMO_SMALL_DRIVER, Math.round(report.advisedGainDb! * 10 + 1) / 10, settings);
    expect(above.limits.find((l) => l.limit === 'junction-temperature' && l.role === 'bridge')!.ok).toBe(false);
    // Each transistor has its own junction temperature; the switch is fast enough for this coil.
    const [bjt, pass] = report.devices;
    expect(bjt.role).toBe('bridge');
    expect(pass.role).toBe('pass');
    expect(bjt.peakJunctionC).toBeLessThanOrEqual(bjt.limitC + 1e-9);
    expect(pass.peakJunctionC).toBeGreaterThan(settings.ambientC);
    expect(pass.peakJunctionC).not.toBeCloseTo(bjt.peakJunctionC, 0);
    expect(bjt.transitionShare!).toBeGreaterThan(0.1);
    expect(bjt.transitionShare!).toBeLessThan(TRANSITION_SHARE_LIMIT);
    expect(bjt.tooSlow).toBe(false);
  });

  it('gives the steady idle of both devices against hand values, and warns that the switch cannot idle for ever', () => {
    const { report } = planClipReport(clip, coil, DEMO_SMALL_DRIVER, settings);
    const [bjt, pass] = report.idle;
    // Pass MOSFET at idle: g·V_s²/4 = (0.97/24)·24²/4 = 5.82 W on R_th(j-a) = 0.15 + 0.6 + 0.9 + 0.8 + 11 = 13.45 K/W
    // → 25 + 5.82·13.45 = 103.279 °C (a linear pass loss does not depend on Tj). Closed form: 1e-9.
    expect(pass.lossW).toBeCloseTo(5.82, 9);
    expect(pass.steadyJunctionC).toBeCloseTo(103.279, 9);
    expect(pass.reachesLimitAfterS).toBeNull();
    // Bipolar switch at idle, rail 12 V, I_s = 0.485 A (class-E single switch: I_avg = I_s, k_pk = 1 + √(1 + π²/4)):
    // V_CE(sat)·I + V_BE(sat)·I/β + ½·k_pk·V·I·(t_r + t_f + t_s)·f0 + ½·C_oss·V²·f0, on 75 K/W (free air).
    const kpk = 1 + Math.sqrt(1 + Math.PI ** 2 / 4);
    const f0 = coil.resonanceHz;
    const p = 0.35 * 0.485 + (0.95 * 0.485) / 10 + 0.5 * kpk * 12 * 0.485 * 330e-9 * f0 + 0.5 * 40e-12 * 144 * f0;
    expect(bjt.lossW).toBeCloseTo(p, 9);
    expect(bjt.steadyJunctionC).toBeCloseTo(25 + 75 * p, 6);
    expect(bjt.steadyJunctionC).toBeGreaterThan(bjt.limitC);
    expect(bjt.steadyJunctionC).toBeLessThan(DEMO_SMALL_DRIVER.devices[0].tjMaxC);
    // It gets there in tens of seconds (package time constant 0.21 J/K · 70.8 K/W ≈ 15 s).
    expect(bjt.reachesLimitAfterS!).toBeGreaterThan(5);
    expect(bjt.reachesLimitAfterS!).toBeLessThan(120);
    expect(report.warnings.join(' ')).toMatch(/bridge switch: idling \(supply on, no music: rail at 12\.0 V.*above its 125 °C limit/);
  });

  it('in a set the idle gap carries the heat into the next clip, so the switch starts warmer', () => {
    const s = planSet(
      [
        { clip, gapAfterS: 20, gainDb: null },
        { clip, gapAfterS: 0, gainDb: null },
      ],
      coil,
      DEMO_SMALL_DRIVER,
      settings,
    );
    const start = (i: number) => s.items[i].startJunctionC.find((d) => d.role === 'bridge')!.junctionC;
    expect(start(0)).toBeCloseTo(settings.ambientC, 9);
    expect(start(1)).toBeGreaterThan(start(0) + 50);
    // Starting that warm, the same clip is advised lower (or not at all).
    const second = s.items[1].advisedGainDb;
    expect(second === null || second < s.items[0].advisedGainDb!).toBe(true);
  });
});
