import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { MAX_GAIN_DB, RESOLUTION_DB, adviseGain } from '../../../shared/plan/advise.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { planSet } from '../../../shared/plan/set.ts';
import { COIL, linearDriver, mosfet, planClip, pulseDriver, scaled, tone } from './fixtures.ts';

// Property tests over invented drivers and tones (fixtures.ts). Run counts are kept modest (each
// run is a few gain searches over a 1 s clip) so the file stays around a second or two.

/** A rail-linear driver whose bridge sink and Rds(on) coefficient vary; the pass sink may be weak. */
const linearArb = fc.record({
  bridgeSaKPerW: fc.double({ min: 0.5, max: 25, noNaN: true }),
  passSaKPerW: fc.double({ min: 0.2, max: 3.5, noNaN: true }),
  alphaPerK: fc.double({ min: 0, max: 0.01, noNaN: true }),
  sinkJPerK: fc.constantFrom(0, 0.5),
});
type LinearArgs = { bridgeSaKPerW: number; passSaKPerW: number; alphaPerK: number; sinkJPerK: number };
const linear = (p: LinearArgs) =>
  linearDriver(
    mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: p.bridgeSaKPerW, sinkHeatCapacityJPerK: p.sinkJPerK }, { rdsOnOhm: 1, rdsOnTempCoeffPerK: p.alphaPerK }),
    mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: p.passSaKPerW }),
  );
/** null (no safe gain) ranks below every gain. */
const rank = (db: number | null) => (db === null ? -Infinity : db);

describe('adviseGain: properties', () => {
  it('never advises more when the ambient rises or the margin grows', () => {
    // Every junction temperature rises with ambient (linear network plus a loss that grows with Tj), and
    // a larger margin lowers every allowed value: the safe set shrinks, so the advice cannot rise.
    fc.assert(
      fc.property(
        linearArb,
        fc.double({ min: 0.1, max: 0.9, noNaN: true }),
        fc.double({ min: 0, max: 40, noNaN: true }),
        fc.double({ min: 0, max: 20, noNaN: true }),
        fc.double({ min: 0, max: 30, noNaN: true }),
        fc.double({ min: 0, max: 20, noNaN: true }),
        (p, amp, ambientC, dAmbientK, marginK, dMarginK) => {
          const d = linear(p);
          const clip = planClip('t', tone(1000, amp, 1));
          const base = adviseGain(clip, COIL, d, planSettings(d, { ambientC, marginK })).advisedGainDb;
          const hotter = adviseGain(clip, COIL, d, planSettings(d, { ambientC: ambientC + dAmbientK, marginK })).advisedGainDb;
          const wider = adviseGain(clip, COIL, d, planSettings(d, { ambientC, marginK: marginK + dMarginK })).advisedGainDb;
          expect(rank(hotter)).toBeLessThanOrEqual(rank(base));
          expect(rank(wider)).toBeLessThanOrEqual(rank(base));
        },
      ),
      { numRuns: 15, seed: 20240611 },
    );
  });

  it('advises d dB less for a clip made d dB louder (to the 0.1 dB grid and one histogram bin)', () => {
    // Gain only ever multiplies the signal, so g·(x·10^(d/20)) at G − d dB is the same drive as g·x at G:
    // the safe edge moves by exactly d. Both answers are that edge rounded down to the 0.1 dB grid, so
    // they differ from d by less than 0.1 dB; the over-modulation edge is read from 0.01 dB histogram
    // bins of the float32-rounded louder samples: one more bin. Tolerance 0.1 + 0.01 dB. The pass sink
    // is kept strong here, so every limit is monotone in gain (non-monotone cases are tested apart).
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 25, noNaN: true }),
        fc.double({ min: 0.05, max: 0.5, noNaN: true }),
        fc.double({ min: -12, max: 5, noNaN: true }),
        (bridgeSaKPerW, amp, dDb) => {
          const d = linear({ bridgeSaKPerW, passSaKPerW: 1, alphaPerK: 0.005, sinkJPerK: 0 });
          const x = tone(1000, amp, 1);
          const s = planSettings(d);
          const quiet = adviseGain(planClip('q', x), COIL, d, s).advisedGainDb!;
          const loud = adviseGain(planClip('l', scaled(x, Math.pow(10, dDb / 20))), COIL, d, s).advisedGainDb!;
          expect(Math.abs(loud - (quiet - dDb))).toBeLessThan(RESOLUTION_DB + 0.01);
        },
      ),
      { numRuns: 20, seed: 7 },
    );
  });

  it('returns a gain where every limit holds and 0.1 dB above which one fails (rail and pulse schemes)', () => {
    // The search's own claim (shared/plan/advise.ts): the advice is the largest safe gain on the 0.1 dB
    // grid below the first failure the scan meets. Checked by evaluating both gains independently.
    const pulseArb = fc.record({
      saKPerW: fc.double({ min: 0.5, max: 20, noNaN: true }),
      maxDuty: fc.double({ min: 0.005, max: 0.2, noNaN: true }),
      hz: fc.constantFrom(100, 200, 400),
    });
    fc.assert(
      fc.property(fc.oneof(linearArb, pulseArb), fc.double({ min: 0.1, max: 0.9, noNaN: true }), (p, amp) => {
        const isPulse = 'maxDuty' in p;
        const d = isPulse
          ? pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: p.saKPerW }, { rdsOnOhm: 1 }), { maxDuty: p.maxDuty })
          : linear(p);
        const clip = planClip('t', tone(isPulse ? p.hz : 1000, amp, 1), { pulses: isPulse });
        const s = planSettings(d);
        const a = adviseGain(clip, COIL, d, s);
        if (a.advisedGainDb === null) {
          expect(evaluateAtGain(clip, COIL, d, -60, s).ok).toBe(false);
          return;
        }
        expect(evaluateAtGain(clip, COIL, d, a.advisedGainDb, s).ok).toBe(true);
        if (a.advisedGainDb < MAX_GAIN_DB) {
          const above = evaluateAtGain(clip, COIL, d, Math.round((a.advisedGainDb + RESOLUTION_DB) * 10) / 10, s);
          expect(above.ok).toBe(false);
          expect(a.binding?.limit).toBe(above.worst?.limit);
        }
      }),
      { numRuns: 40, seed: 99 },
    );
  });
});

describe('planSet: property', () => {
  it("never runs a later clip cooler than the same clip alone from cold, at the same gain", () => {
    // The thermal network is linear with a non-negative free response (an RC ladder: its system matrix
    // is Metzler), and the loss grows with Tj: a warm start can only add heat. 1e-9 K for round-off.
    fc.assert(
      fc.property(
        linearArb,
        fc.double({ min: -12, max: 6, noNaN: true }),
        fc.double({ min: -12, max: 6, noNaN: true }),
        fc.double({ min: 0, max: 5, noNaN: true }),
        (p, g0, g1, gapS) => {
          const d = linear({ ...p, sinkJPerK: 0.5 });
          const first = planClip('first', tone(1000, 0.4, 0.5));
          const second = planClip('second', tone(1000, 0.3, 0.5));
          const s = planSettings(d);
          const set = planSet([{ clip: first, gapAfterS: gapS, gainDb: g0 }, { clip: second, gapAfterS: 0, gainDb: g1 }], COIL, d, s);
          const alone = evaluateAtGain(second, COIL, d, g1, s);
          alone.sim.devices.forEach((dev, i) => {
            expect(set.items[1].devices[i].peakJunctionC).toBeGreaterThanOrEqual(dev.peakJunctionC - 1e-9);
            expect(set.items[1].startJunctionC[i].junctionC).toBeGreaterThanOrEqual(25 - 1e-9);
          });
        },
      ),
      { numRuns: 8, seed: 3 },
    );
  });
});
