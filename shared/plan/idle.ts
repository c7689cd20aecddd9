/**
 * Steady idle: the driver with its supply on and no music, for as long as it is left so. A rail
 * scheme's rail then sits at its bias, half the supply (docs/models.md, gain convention), so the
 * bridge switches keep running at half rail and a linear pass device dissipates its worst,
 * g·V_s²/4; a pulse scheme sends no pulses and idles cold.
 *
 * Per device, the junction temperature it settles at (the steady state of its whole thermal path,
 * T = T_amb + R_th(j-a)·P with the electrothermal fixed point of ../physics/driver/electrothermal.ts
 * steadyJunctionC), and, when that is above its limit (Tj max − margin), how long it takes to get
 * there idling from ambient (exact thermal network, ./steady.ts). A single-clip plan starts at
 * ambient; this says how long the rig may idle before the plan's starting point no longer holds.
 */
import { steadyJunctionC } from '../physics/driver/electrothermal.ts';
import { railThirdMomentBoundV3 } from '../physics/driver/losses.ts';
import { frameLossModel } from '../physics/driver/simulate-rail.ts';
import type { CoilAtResonance, DeviceTraces } from '../physics/driver/types.ts';
import { ROLES_FOR_SCHEME, type DeviceRole, type DriverProfile } from '../schemas/driver.ts';
import type { PlanSettings } from './evaluate.ts';
import { simulateSteady } from './steady.ts';

/** Longest idle searched for the time to reach the limit, s. */
export const MAX_IDLE_SEARCH_S = 3600;

/** One device at steady idle. */
export interface IdleFigures {
  role: DeviceRole;
  /** The rail while idling, V (half the supply). */
  railV: number;
  /** Loss per switch while idling, at the steady junction temperature, W. */
  lossW: number;
  /** Junction temperature it settles at, °C (Infinity: thermal runaway). */
  steadyJunctionC: number;
  /** Tj max − margin, °C. */
  limitC: number;
  /** Idle time from ambient until the junction reaches limitC, s; null when it never does (within MAX_IDLE_SEARCH_S). */
  reachesLimitAfterS: number | null;
}

/**
 * Steady-idle figures of every device a rail scheme uses (module note); [] for the pulse scheme.
 *
 * @example idleFigures(DEMO_SMALL_DRIVER, { resonanceHz: 493e3, qualityFactor: 70 }, planSettings(DEMO_SMALL_DRIVER))
 */
export function idleFigures(driver: DriverProfile, coil: CoilAtResonance, settings: PlanSettings): IdleFigures[] {
  if (driver.scheme === 'pulse') return [];
  const vs = driver.supplyVoltageV;
  const railV = vs / 2;
  const roles = ROLES_FOR_SCHEME[driver.scheme];
  let traces: DeviceTraces[] | null = null;
  return roles.map((role, i) => {
    const dev = driver.devices.find((d) => d.role === role)!;
    const model = frameLossModel(driver, role, coil.resonanceHz);
    const m = railV;
    const s = railV * railV;
    const a = model.rS * s + model.r3 * railThirdMomentBoundV3(m, s, vs);
    const b = model.oM * m + model.oS * s + model.oC;
    const alpha = dev.rdsOnTempCoeffPerK ?? 0;
    const th = dev.thermal;
    const rTotal = th.foster.reduce((sum, c) => sum + c.rKPerW, 0) + th.caseToSinkKPerW + th.sinkToAmbientKPerW;
    const tj = steadyJunctionC(a, b, alpha, rTotal, settings.ambientC);
    const lossW = Number.isFinite(tj) ? a * (1 + alpha * (tj - 25)) + b : Infinity;
    const limitC = dev.tjMaxC - settings.marginK;
    let reachesLimitAfterS: number | null = null;
    if (tj > limitC) {
      traces ??= simulateSteady(driver, coil, { durationS: MAX_IDLE_SEARCH_S, frameS: 0.5, railV, ambientC: settings.ambientC })
        .devices.map((d) => d.traces as DeviceTraces);
      const j = traces[i].junctionC;
      for (let k = 0; k < j.length; k++) {
        if (j[k] >= limitC) {
          // Linear interpolation within the half-second frame.
          const prev = k > 0 ? j[k - 1] : settings.ambientC;
          reachesLimitAfterS = 0.5 * (k + (limitC - prev) / Math.max(j[k] - prev, 1e-12));
          break;
        }
      }
    }
    return { role, railV, lossW, steadyJunctionC: tj, limitC, reachesLimitAfterS };
  });
}

/** The warning for a device whose steady idle is above its limit, or '' when it is not. */
export function idleWarning(f: IdleFigures): string {
  if (!(f.steadyJunctionC > f.limitC)) return '';
  const settles = Number.isFinite(f.steadyJunctionC) ? `settles at ${f.steadyJunctionC.toFixed(0)} °C` : 'runs away thermally';
  const when = f.reachesLimitAfterS === null ? '' : `, which it reaches after ${f.reachesLimitAfterS.toFixed(0)} s of idling from cold`;
  return (
    `${f.role} ${f.role === 'pass' ? 'device' : 'switch'}: idling (supply on, no music: rail at ${f.railV.toFixed(1)} V, ${f.lossW.toFixed(2)} W) it ${settles}, ` +
    `above its ${f.limitC.toFixed(0)} °C limit${when}. The plan starts from ambient: switch the supply off between clips, or improve the cooling.`
  );
}
