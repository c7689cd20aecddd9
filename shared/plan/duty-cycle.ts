/**
 * The duty cycle a pulse driver really runs at, beside the shares of clamped pulses: the on-time
 * fraction over the averaging window the driver's duty limit uses. In this planner that window is
 * one pulse period (shared/plan/pulse-train.ts: on-time ≤ maxDuty · (start − previous start)), so
 * the worst duty is the largest on_i / (start_i − start_{i−1}); the mean is Σ on-time / clip length.
 * Both against the profile's maxDuty.
 */
import type { PulseTrain } from './pulse-train.ts';

export interface DutyCycleFigures {
  /** The averaging window of the duty limit, in words. */
  window: string;
  /** Σ on-time / clip length (0…1). */
  meanDuty: number;
  /** Largest on-time / pulse period (0…1); 0 with fewer than two pulses. */
  worstDuty: number;
  /** Start of the pulse with the worst duty, s; null with fewer than two pulses. */
  worstAtS: number | null;
  /** The driver profile's maximum duty (0…1). */
  maxDuty: number;
}

export const DUTY_WINDOW = 'one pulse period (start to next start), the window the duty limit is applied over';

/**
 * Duty-cycle figures of a pulse train over a clip of `durationS` s.
 * @example dutyCycleFigures({ startS: [0, 0.01], onS: [1e-4, 1e-4], count: 2, … }, 0.02, 0.08).worstDuty // 0.01
 */
export function dutyCycleFigures(train: Pick<PulseTrain, 'startS' | 'onS' | 'count'>, durationS: number, maxDuty: number): DutyCycleFigures {
  let total = 0;
  let worst = 0;
  let worstAtS: number | null = null;
  for (let i = 0; i < train.count; i++) {
    total += train.onS[i];
    if (i > 0) {
      const period = train.startS[i] - train.startS[i - 1];
      const d = period > 0 ? train.onS[i] / period : 1;
      if (d > worst) {
        worst = d;
        worstAtS = train.startS[i];
      }
    }
  }
  return { window: DUTY_WINDOW, meanDuty: durationS > 0 ? total / durationS : 0, worstDuty: worst, worstAtS, maxDuty };
}
