/**
 * The closed loop of a render: the samples the written file holds (as a reader decodes them) are
 * reduced to what planning reads (frame statistics, magnitude histogram, pulse candidates; PlanReducer,
 * fed block by block while the file is written) and planned again (evaluateAtGain) AT 0 dB, because the gain is now inside the file — played at
 * unity, its samples are the modulation itself (1.0 = the rail's ends, or the longest on-time).
 * Every limit the plan checked at the chosen gain on the source is compared with the same limit on
 * the render; the report says plainly which hold and which do not.
 *
 * Why it can differ from the promise: the limiter lowers peaks (less over-modulation, less peak
 * current) but keeps a linear pass device nearer its hottest point (rail near half supply); a
 * pre-emphasis shelf changes the spectrum and the level; 16-bit dither adds noise that can make
 * pulses where the source had digital silence. Only the re-plan shows the net effect.
 */
import type { AudioClip } from '../../shared/audio/clip.ts';
import { PlanReducer } from './plan-reducer.ts';
import type { CoilAtResonance } from '../../shared/physics/driver/types.ts';
import { type Evaluation, type LimitCheck, type LimitName, type PlanClip, type PlanSettings, evaluateAtGain } from '../../shared/plan/evaluate.ts';
import { limitLabel as sharedLimitLabel, limitValueText } from '../../shared/plan/limit-labels.ts';
import type { DeviceRole, DriverProfile } from '../../shared/schemas/driver.ts';

/** One limit: what the plan promised at the chosen gain, and what the render gives at 0 dB. */
export interface LimitOutcome {
  limit: LimitName;
  role: DeviceRole | null;
  unit: LimitCheck['unit'];
  allowed: number;
  /** Value at the chosen gain on the source (the promise). */
  planned: number;
  plannedOk: boolean;
  /** Value at 0 dB on the rendered file. */
  rendered: number;
  holds: boolean;
  /** Time of the render's value (closest to or past its edge), s; null when it never comes near. */
  atS: number | null;
}

/** The closed loop's verdict: every limit on the render at 0 dB beside the plan's promise. */
export interface ClosedLoopReport {
  /** Every limit holds on the render. */
  ok: boolean;
  /** Every limit that held in the plan holds on the render. */
  promiseKept: boolean;
  /** The gain the render was re-planned at, dB (always 0: the gain is in the file). */
  gainDbApplied: 0;
  explanation: string;
  limits: LimitOutcome[];
  /** The re-plan itself. */
  evaluation: Evaluation;
  /** One plain sentence per limit that does not hold on the render. */
  failures: string[];
}

/** Why the re-plan is at 0 dB, in the words the command prints. */
export const CLOSED_LOOP_EXPLANATION =
  'The render was analysed and planned again at 0 dB: its gain is already inside the file, so played at unity its samples are the modulation (1.0 = the rail at its ends, or the longest on-time).';

/** "junction temperature (pass)", "pulses clamped by the duty limit", … (the planner's names, shared/plan/limit-labels.ts). */
export const limitLabel = sharedLimitLabel;

/** A value in the limit's unit, as a person reads it: °C, A, or a share with its base ("% of pulses"). */
export function formatLimitValue(value: number, unit: LimitCheck['unit'], limit?: LimitName): string {
  return limitValueText(value, unit, limit);
}

// The reducer that feeds the closed loop lives in ./plan-reducer.ts (light to load in a thread).
export { PlanReducer, ZeroCrossingStream } from './plan-reducer.ts';

/**
 * Re-plans a rendered (mono, output-referred) signal at 0 dB and compares each limit with
 * `promised` (the evaluation at the chosen gain on the source). `render` is the plan view of the
 * file's samples as a reader gets them back: a PlanReducer fed while the file was written, or an
 * AudioClip of the decoded file (zero-crossing pulse candidates, as the promise was planned with).
 *
 * @example closedLoopCheck(reducer.result('song'), 'song', coil, driver, planSettings(driver), advice.atAdvised).ok
 */
export function closedLoopCheck(
  render: PlanClip | AudioClip,
  name: string,
  coil: CoilAtResonance,
  driver: DriverProfile,
  settings: PlanSettings,
  promised: Evaluation,
): ClosedLoopReport {
  let plan: PlanClip;
  if ('channels' in render) {
    if (render.channels.length !== 1) throw new RangeError(`closedLoopCheck: a render is mono, got ${render.channels.length} channels`);
    const x = render.channels[0];
    const reducer = new PlanReducer(x.length, render.sampleRate, driver.scheme === 'pulse');
    reducer.add(x);
    plan = reducer.result(name);
  } else {
    plan = render;
  }
  const evaluation = evaluateAtGain(plan, coil, driver, 0, settings);
  const limits: LimitOutcome[] = evaluation.limits.map((r) => {
    const p = promised.limits.find((q) => q.limit === r.limit && q.role === r.role);
    return {
      limit: r.limit,
      role: r.role,
      unit: r.unit,
      allowed: r.allowed,
      planned: p ? p.value : NaN,
      plannedOk: p ? p.ok : false,
      rendered: r.value,
      holds: r.ok,
      atS: r.atS,
    };
  });
  const failures = limits
    .filter((l) => !l.holds)
    .map((l) => {
      const when = l.atS === null ? '' : ` (at ${l.atS.toFixed(2)} s)`;
      return `${limitLabel(l)} does NOT hold on the render: ${formatLimitValue(l.rendered, l.unit, l.limit)} against ${formatLimitValue(l.allowed, l.unit)} allowed${when}; the plan said ${formatLimitValue(l.planned, l.unit, l.limit)}.`;
    });
  return {
    ok: limits.every((l) => l.holds),
    promiseKept: limits.every((l) => l.holds || !l.plannedOk),
    gainDbApplied: 0,
    explanation: CLOSED_LOOP_EXPLANATION,
    limits,
    evaluation,
    failures,
  };
}
