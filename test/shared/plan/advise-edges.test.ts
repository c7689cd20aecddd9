/**
 * The gain search (shared/plan/advise.ts) at the edges of its range, MIN_GAIN_DB … MAX_GAIN_DB:
 * the over-modulation bound for an empty clip, a clip quiet enough to pass at the top gain, a clip
 * so hot that it over-modulates at the bottom gain, and no over-modulation allowed at all; the scan
 * that finds the top gain safe, the climb above the bound, a safe gain only at the very bottom, the
 * pulse scheme's cheap refusals (counted by `evaluations`), and silence from a warm start. Each
 * expected value is derived in the test (a closed form, or a trace of the documented search by hand).
 */
import { describe, expect, it } from 'vitest';
import { fractionAbove } from '../../../shared/dsp/histogram.ts';
import { MAX_GAIN_DB, MIN_GAIN_DB, adviseGain, overModulationBoundDb } from '../../../shared/plan/advise.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { ampToDb, dbToAmp } from '../../../shared/units.ts';
import { COIL, linearDriver, mosfet, planClip, pulseDriver, silence, tone } from './fixtures.ts';

// Invented drivers (fixtures.ts). STRONG: rail-linear with strong sinks (bridge ΣR = 2 K/W, pass
// ΣR = 1.5 K/W): at a full swing of the rail (g·|x| = 1) every junction holds, so only over-modulation
// binds (test/shared/plan/advise.test.ts, "over-modulation (strong sinks)").
const STRONG = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 1 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
);

/** Over-modulated share at gain `db`, exactly as the evaluation's limit reads it (shared/plan/evaluate.ts). */
const overModShare = (clip: ReturnType<typeof planClip>, db: number) => fractionAbove(clip.histogram, 1 / dbToAmp(db));

describe('overModulationBoundDb at the ends of the gain range', () => {
  it('gives the top of the range for a clip with no samples at all (nothing to over-modulate)', () => {
    const empty = planClip('empty', new Float32Array(0));
    expect(empty.histogram.total).toBe(0);
    expect(overModulationBoundDb(empty, 0.001)).toBe(MAX_GAIN_DB);
    expect(overModulationBoundDb(empty, 0)).toBe(MAX_GAIN_DB);
  });

  it('gives exactly the top of the range, +40 dB, for a clip whose peak stays under full scale there', () => {
    // Peak ≈ 0.005·cos(0.3) = 0.00478 (−46.4 dBFS): at +40 dB (×100) the highest sample reaches 0.48.
    const quiet = planClip('quiet', tone(1000, 0.005, 0.5));
    expect(-ampToDb(quiet.histogram.peak)).toBeGreaterThan(MAX_GAIN_DB);
    expect(overModulationBoundDb(quiet, 0.001)).toBe(MAX_GAIN_DB);
    expect(overModulationBoundDb(quiet, 0)).toBe(MAX_GAIN_DB);
  });

  it('gives exactly the bottom of the range, −60 dB, for a clip that over-modulates even there, with or without an allowance', () => {
    // A float clip peaking at 2000 (+66 dBFS): at −60 dB (×0.001) it still swings to 2 × full scale.
    const hot = planClip('hot', tone(1000, 2000, 0.5, 8000, Math.PI / 2));
    expect(hot.histogram.peak).toBe(2000);
    expect(overModShare(hot, MIN_GAIN_DB)).toBeGreaterThan(0.001);
    expect(overModulationBoundDb(hot, 0.001)).toBe(MIN_GAIN_DB);
    // Not the gain that would put this peak at full scale (−66 dB): that lies outside the searched range.
    expect(overModulationBoundDb(hot, 0)).toBe(MIN_GAIN_DB);
  });
});

describe('overModulationBoundDb with no over-modulation allowed', () => {
  // With a zero allowance the edge is where the highest sample reaches full scale: g·peak = 1,
  // G_edge = −20·log10(peak). The bisection works to 0.01 dB and never goes above G_edge.
  const amps = Array.from({ length: 40 }, (_, i) => 0.101 + 0.0131 * i);

  it('lies within 0.01 dB below −20·log10(peak), and nothing over-modulates at the bound itself', () => {
    for (const a of amps) {
      const clip = planClip(`tone ${a}`, tone(997, a, 0.05));
      const edge = -ampToDb(clip.histogram.peak);
      const bound = overModulationBoundDb(clip, 0);
      expect(bound).toBeLessThanOrEqual(edge);
      expect(bound).toBeGreaterThan(edge - 0.01);
      // The bound is a gain the limit allows: not a single sample above full scale there.
      expect(overModShare(clip, bound)).toBe(0);
    }
  });

  it('agrees with the evaluation: over-modulation holds at the bound and fails 0.01 dB above the edge', () => {
    const clip = planClip('tone', tone(1000, 0.5, 0.5));
    const s = planSettings(STRONG, { allowedShare: 0 });
    const bound = overModulationBoundDb(clip, 0);
    const om = (db: number) => evaluateAtGain(clip, COIL, STRONG, db, s).limits.find((l) => l.limit === 'over-modulation')!;
    expect(om(bound).ok).toBe(true);
    expect(om(-ampToDb(clip.histogram.peak) + 0.01).ok).toBe(false);
  });
});

describe('adviseGain at the top of the range', () => {
  it('advises exactly +40 dB with nothing binding when the clip holds every limit there (one evaluation)', () => {
    // The bound is +40 dB, the scan's first probe (+40 dB) holds, and nothing is searched above the range.
    const quiet = planClip('quiet', tone(1000, 0.005, 0.5));
    const a = adviseGain(quiet, COIL, STRONG, planSettings(STRONG));
    expect(a.overModulationBoundDb).toBe(MAX_GAIN_DB);
    expect(a.advisedGainDb).toBe(MAX_GAIN_DB);
    expect(a.atAdvisedGainDb).toBe(MAX_GAIN_DB);
    expect(a.atAdvised.gainDb).toBe(MAX_GAIN_DB);
    expect(a.atAdvised.ok).toBe(true);
    expect(a.binding).toBeNull();
    expect(a.evaluations).toBe(1);
    expect(a.unsafeOnSilence).toBe(false);
  });

  it('advises +40 dB for digital silence too', () => {
    const a = adviseGain(planClip('silence', silence(0.5)), COIL, STRONG, planSettings(STRONG));
    expect(a.advisedGainDb).toBe(MAX_GAIN_DB);
    expect(a.binding).toBeNull();
    expect(a.evaluations).toBe(1);
  });
});

describe('adviseGain: the climb above the over-modulation bound', () => {
  it('probes only upwards from the first safe tenth (three evaluations for a bound just under a tenth)', () => {
    // The regression clip of advise.test.ts: peak −6.1008 dBFS, bound 6.095 dB → scan starts at the
    // tenth 6.0 dB (holds); the climb then probes 6.1 dB (holds: 6.1 < 6.1008) and 6.2 dB (fails
    // over-modulation): 6.0, 6.1, 6.2 = three evaluations, and the advice is 6.1 dB.
    const clip = planClip('edge', tone(1000, Math.pow(10, -6.1008 / 20), 1, 8000, Math.PI / 2));
    const a = adviseGain(clip, COIL, STRONG, planSettings(STRONG));
    expect(a.overModulationBoundDb).toBeGreaterThan(6.0);
    expect(a.overModulationBoundDb).toBeLessThan(6.1);
    expect(a.advisedGainDb).toBeCloseTo(6.1, 12);
    expect(a.binding?.limit).toBe('over-modulation');
    expect(a.evaluations).toBe(3);
  });
});

describe('adviseGain at the bottom of the range', () => {
  it('advises exactly −60 dB when only the bottom of the range keeps the peak under full scale', () => {
    // Peak 10^(59.95/20) = 992.3 (a float clip, +59.95 dBFS), no over-modulation allowed: the edge is
    // −59.95 dB, so −60 dB holds (g·peak = 0.9923) and −59.9 dB fails (g·peak = 1.0012). The strong
    // sinks hold at any swing up to full scale.
    const amp = Math.pow(10, 59.95 / 20);
    const clip = planClip('hot', tone(1000, amp, 0.5, 8000, Math.PI / 2));
    const s = planSettings(STRONG, { allowedShare: 0 });
    expect(-ampToDb(clip.histogram.peak)).toBeCloseTo(-59.95, 6);
    const a = adviseGain(clip, COIL, STRONG, s);
    expect(a.advisedGainDb).toBe(MIN_GAIN_DB);
    expect(a.atAdvised.ok).toBe(true);
    expect(a.binding?.limit).toBe('over-modulation');
    expect(evaluateAtGain(clip, COIL, STRONG, -59.9, s).ok).toBe(false);
  });

  it('gives no advice, evaluates silence, and reports it safe when the clip over-modulates even at −60 dB', () => {
    const hot = planClip('hot', tone(1000, 2000, 0.5, 8000, Math.PI / 2));
    const a = adviseGain(hot, COIL, STRONG, planSettings(STRONG));
    expect(a.advisedGainDb).toBeNull();
    expect(a.unsafeOnSilence).toBe(false);
    expect(a.binding?.limit).toBe('over-modulation');
    // Silence is safe, so the evaluation returned is the lowest gain tried, −60 dB.
    expect(a.atAdvisedGainDb).toBe(MIN_GAIN_DB);
  });
});

describe('adviseGain: pulse-limit refusals cost no evaluation', () => {
  it('evaluates only the gains whose pulse limits hold, plus the binding one', () => {
    // The duty case of advise.test.ts: 200 Hz tone (A = 0.5), duty cap 1 %: duty edge −3.52 dB,
    // over-modulation bound ≈ 6.02 dB. Search by hand (module comment of advise.ts):
    //   scan 6.0, 5.0, …, −3.0 dB: duty fails → refused from the pulse train alone (0 evaluations);
    //   −4.0 dB holds (1); bisection in tenths between −40 and −30: −3.5 refused, −3.8 (2), −3.7 (3),
    //   −3.6 (4) hold; advice −3.6 dB; the binding limit needs the full evaluation at −3.5 dB (5).
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), { maxDuty: 0.01 });
    const clip = planClip('p', tone(200, 0.5, 2), { pulses: true });
    const level = Math.max(...clip.pulseEvents!.level);
    const edge = ampToDb(1 / (3 * level));
    expect(edge).toBeGreaterThan(-3.6);
    expect(edge).toBeLessThan(-3.5);
    const a = adviseGain(clip, COIL, d, planSettings(d));
    expect(a.advisedGainDb).toBeCloseTo(-3.6, 12);
    expect(a.binding?.limit).toBe('duty');
    expect(a.evaluations).toBe(5);
  });
});

describe('adviseGain: silence is evaluated from the same starting state', () => {
  it('calls a driver that starts above its allowed junction temperature unsafe even on silence', () => {
    // Pulse current 10 A against an 8 A supply: every gain fails (advise.test.ts). From cold, silence is
    // safe; from a start 110 K above ambient (135 °C > 150 − 25 = 125 °C allowed) it is not.
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), {}, { supplyCurrentLimitA: 8 });
    const clip = planClip('p', tone(200, 0.5, 0.5), { pulses: true });
    const s = planSettings(d);
    const cold = adviseGain(clip, COIL, d, s);
    expect(cold.advisedGainDb).toBeNull();
    expect(cold.unsafeOnSilence).toBe(false);
    const nodes = evaluateAtGain(clip, COIL, d, -Infinity, s).sim.finalState[0].length;
    const hot = [new Float64Array(nodes).fill(110)];
    const warm = adviseGain(clip, COIL, d, s, { initial: hot });
    expect(warm.advisedGainDb).toBeNull();
    expect(warm.unsafeOnSilence).toBe(true);
    expect(warm.binding).toMatchObject({ limit: 'junction-temperature', role: 'bridge', allowed: 125 });
    expect(warm.binding!.value).toBeGreaterThanOrEqual(135 - 1e-9);
    expect(warm.atAdvisedGainDb).toBe(-Infinity);
  });
});
