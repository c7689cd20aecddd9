/**
 * Planning a clip on a coil and driver: what `coilcue plan`, `render`, `preview` and the server's
 * plan routes share. The plan's JSON document is built here once, so the command line and the
 * API cannot drift.
 */
import { resolve } from 'node:path';
import type { ClipAnalysis } from '../../shared/analysis/analyze-clip.ts';
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import { InputError } from '../../shared/errors.ts';
import type { CoilReport } from '../../shared/physics/coil/analyze.ts';
import type { CoilAtResonance } from '../../shared/physics/driver/types.ts';
import { type Advice, adviseGain } from '../../shared/plan/advise.ts';
import { type Evaluation, type PlanClip, type PlanSettings, evaluateAtGain, planSettings } from '../../shared/plan/evaluate.ts';
import { type PulseSource, toPlanClip } from '../../shared/plan/plan-clip.ts';
import { type PlanReport, planClipReport } from '../../shared/plan/report.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import type { DecodedClip } from '../audio/decode.ts';
import { loadAndAnalyze } from './analysis.ts';
import { coilAtResonance, loadCoil, loadDriver } from './profiles.ts';

/** The coil's voltage bound, arc reach and keep-out distance, for the cautions. */
export const keepOutFigures = (coil: CoilReport) => ({
  topVoltageBoundV: coil.voltage.topVoltageBoundV,
  breakdownGapM: coil.voltage.breakdownGapM,
  arcReachM: coil.voltage.arcReachM,
  keepOutM: coil.keepOutM,
  basis: coil.voltage.basis,
});

/** `coilcue plan --json`'s document and the API's plan result: the report and the keep-out figures. */
export type PlanDocument = PlanReport & { keepOut: ReturnType<typeof keepOutFigures> };

/** JSON has no ±Infinity or NaN: write them as null. */
export const jsonReplacer = (_k: string, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v);

/**
 * The plan of one clip: the report at the given gain (or the advised one), and the evaluation and
 * gain search behind it. `opts.advice` reuses a gain search made earlier for the same clip, coil,
 * driver and settings (the server's re-evaluation at another gain).
 */
export function planClipDocument(
  planClip: PlanClip,
  analysis: Pick<ClipAnalysis, 'spectrum'>,
  coil: CoilReport,
  driver: DriverProfile,
  settings: PlanSettings,
  opts: { gainDb?: number; traces?: boolean; advice?: Advice } = {},
): { document: PlanDocument; evaluation: Evaluation; advice: Advice } {
  const { report, evaluation, advice } = planClipReport(planClip, coil, driver, settings, {
    gainDb: opts.gainDb,
    spectrum: analysis.spectrum.welch,
    traces: opts.traces ?? false,
    advice: opts.advice,
  });
  return { document: { ...report, keepOut: keepOutFigures(coil) }, evaluation, advice };
}

/** Decodes and analyses a clip file (absolute path) and turns it into the planner's input. */
export async function loadPlanClip(
  path: string,
  driver: DriverProfile,
  channel: ModulationChannel,
  pulseSource: PulseSource,
  onProgress?: (fraction: number, stage: string) => void,
): Promise<{ planClip: PlanClip; analysis: ClipAnalysis }> {
  const { analysis, source } = await loadAndAnalyze(path, { channel, onProgress });
  return { planClip: toPlanClip(path, analysis, source, driver, pulseSource), analysis };
}

/** Everything render and preview share about one clip on one coil and driver. */
export interface PreparedJob {
  clipPath: string;
  clip: DecodedClip;
  analysis: ClipAnalysis;
  channel: ModulationChannel;
  /** The modulation source (mono), linear full scale. */
  source: Float32Array;
  coilReport: CoilReport;
  coil: CoilAtResonance;
  driver: DriverProfile;
  settings: PlanSettings;
  plan: PlanClip;
}

/**
 * Reads the profiles (first, so a bad profile fails before any decoding), then decodes and
 * analyses the clip and builds its plan view. Paths relative to `cwd`. InputErrors from every
 * step pass through.
 */
export async function prepareJob(
  cwd: string,
  files: { clip: string; coil: string; driver: string },
  channel: ModulationChannel,
  onProgress?: (fraction: number, stage: string) => void,
): Promise<PreparedJob> {
  const coilReport = await loadCoil(files.coil, cwd);
  const driver = await loadDriver(files.driver, cwd);
  return prepareLoadedJob(cwd, files.clip, coilReport, driver, channel, onProgress);
}

/** prepareJob for profiles already read (the server keeps them as rows). */
export async function prepareLoadedJob(
  cwd: string,
  clipPath: string,
  coilReport: CoilReport,
  driver: DriverProfile,
  channel: ModulationChannel,
  onProgress?: (fraction: number, stage: string) => void,
): Promise<PreparedJob> {
  const { clip, analysis, source } = await loadAndAnalyze(resolve(cwd, clipPath), { channel, onProgress });
  const plan = toPlanClip(clipPath, analysis, source, driver);
  return { clipPath, clip, analysis, channel, source, coilReport, coil: coilAtResonance(coilReport), driver, settings: planSettings(driver), plan };
}

/** The gain a command uses and where it came from. */
export interface GainChoice {
  gainDb: number;
  from: 'advised' | 'given';
  /** The advice (null when the gain was given). */
  advice: Advice | null;
  /** The plan at the chosen gain: what the render promises. */
  promised: Evaluation;
}

/**
 * The given gain, or the advised one (the job's plan, or that of a pre-emphasised source: the
 * advice must be for the signal that reaches the coil). InputError `no-safe-gain` when no gain was
 * given and no gain down to −60 dB keeps every limit (the message names the binding limit).
 */
export function chooseGain(
  plan: PlanClip,
  job: Pick<PreparedJob, 'coil' | 'driver' | 'settings'>,
  givenDb: number | undefined,
): GainChoice {
  if (givenDb !== undefined) {
    return { gainDb: givenDb, from: 'given', advice: null, promised: evaluateAtGain(plan, job.coil, job.driver, givenDb, job.settings) };
  }
  const advice = adviseGain(plan, job.coil, job.driver, job.settings);
  if (advice.advisedGainDb === null) {
    const b = advice.binding;
    const what = b ? `${b.limit}${b.role ? ` (${b.role})` : ''}` : 'a limit';
    const why = advice.unsafeOnSilence ? 'even with no signal the driver fails it' : 'no gain down to −60 dB keeps it';
    throw new InputError('no-safe-gain', `no safe gain for this clip on this coil and driver: ${what} binds and ${why}; check the driver profile, or give a gain to render anyway`, 'gainDb');
  }
  return { gainDb: advice.advisedGainDb, from: 'advised', advice, promised: advice.atAdvised };
}
