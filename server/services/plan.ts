/**
 * Planning a clip on a coil and driver: what `coilcue plan`, `render`, `preview` and the server's
 * plan routes share. The plan's JSON document is built here once, so the command line and the
 * API cannot drift.
 */
import { resolve } from 'node:path';
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import { InputError } from '../../shared/errors.ts';
import type { CoilReport } from '../../shared/physics/coil/analyze.ts';
import type { CoilAtResonance } from '../../shared/physics/driver/types.ts';
import { type Advice, type GainSearch, adviseGain } from '../../shared/plan/advise.ts';
import { type Evaluation, type PlanClip, type PlanSettings, evaluateAtGain, planSettings } from '../../shared/plan/evaluate.ts';
import type { PulseSource } from '../../shared/plan/plan-clip.ts';
import { type PlanCautions, planCautions } from '../../shared/plan/cautions.ts';
import { type PlanReport, planClipReport } from '../../shared/plan/report.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import type { WelchSpectrum } from '../../shared/dsp/welch.ts';
import type { SampleBlocks } from '../../shared/preview/sample-blocks.ts';
import { type ClipInfo, type PlanningAnalysis, loadForPlanning } from './planning-input.ts';
import { coilAtResonance, loadCoil, loadDriver } from './profiles.ts';

/** The coil's voltage bound, arc reach and keep-out distance, for the cautions. */
export const keepOutFigures = (coil: CoilReport) => ({
  topVoltageBoundV: coil.voltage.topVoltageBoundV,
  breakdownGapM: coil.voltage.breakdownGapM,
  arcReachM: coil.voltage.arcReachM,
  keepOutM: coil.keepOutM,
  keepOutSetBy: coil.keepOutSetBy,
  breakdownFieldVPerM: coil.voltage.breakdownFieldVPerM,
  inputPowerW: coil.voltage.inputPowerW,
  inputPowerBasis: coil.voltage.inputPowerBasis,
  basis: coil.voltage.basis,
});

/**
 * `coilcue plan --json`'s document and the API's plan result: the report, the keep-out figures, and
 * the cautions (what the advice rests on; interlock and emergency stop beside the keep-out).
 */
export type PlanDocument = PlanReport & { keepOut: ReturnType<typeof keepOutFigures>; cautions: PlanCautions };

/** JSON has no ±Infinity or NaN: write them as null. */
export const jsonReplacer = (_k: string, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v);

/**
 * The plan of one clip: the report at the given gain (or the advised one), and the evaluation and
 * gain search behind it. `opts.advice` reuses a gain search made earlier for the same clip, coil,
 * driver and settings (the server's re-evaluation at another gain reuses the one its plan stored).
 */
export function planClipDocument(
  planClip: PlanClip,
  analysis: { spectrum: { welch: WelchSpectrum | null } },
  coil: CoilReport,
  driver: DriverProfile,
  settings: PlanSettings,
  opts: { gainDb?: number; traces?: boolean; advice?: Advice | GainSearch } = {},
): { document: PlanDocument; evaluation: Evaluation; advice: Advice | GainSearch } {
  const { report, evaluation, advice } = planClipReport(planClip, coil, driver, settings, {
    gainDb: opts.gainDb,
    spectrum: analysis.spectrum.welch ?? undefined,
    traces: opts.traces ?? false,
    advice: opts.advice,
  });
  return { document: { ...report, keepOut: keepOutFigures(coil), cautions: planCautions(coil, driver) }, evaluation, advice };
}

/**
 * Decodes a clip file (absolute path) into the planner's input, keeping only what planning needs
 * (the reductions, pulse candidates and averaged spectrum: services/analysis.ts loadForPlanning),
 * not the samples.
 */
export async function loadPlanClip(
  path: string,
  driver: DriverProfile,
  channel: ModulationChannel,
  pulseSource: PulseSource,
  onProgress?: (fraction: number, stage: string) => void,
): Promise<{ planClip: PlanClip; analysis: PlanningAnalysis }> {
  const { planClip, analysis } = await loadForPlanning(path, { name: path, pulses: driver.scheme === 'pulse', channel, pulseSource, onProgress });
  return { planClip, analysis };
}

/** Everything render and preview share about one clip on one coil and driver. */
export interface PreparedJob {
  clipPath: string;
  /** The decoded file's description (its samples are not kept: only the modulation source is). */
  clip: ClipInfo;
  /** What planning read of the clip (averaged spectrum; pitch track for pitch-locked pulses). */
  analysis: PlanningAnalysis;
  channel: ModulationChannel;
  /**
   * The modulation source (mono), linear full scale, read block by block: a WAV file read again for
   * each pass, or the decoded source of a compressed file. `source.close()` when the job is done.
   */
  source: SampleBlocks;
  coilReport: CoilReport;
  coil: CoilAtResonance;
  driver: DriverProfile;
  settings: PlanSettings;
  plan: PlanClip;
}

/** What a job is prepared for: `spectrum: false` skips Welch's averaged spectrum (the preview reads none; the render's pre-emphasis advice does). */
export interface PrepareOptions {
  spectrum?: boolean;
}

/**
 * Reads the profiles (first, so a bad profile fails before any decoding), then decodes the clip
 * into its plan view and a reader of its modulation source (loadForPlanning: the decoded channels
 * are not kept, and a WAV file's source is read again from the file). Paths relative to `cwd`.
 * InputErrors from every step pass through. Close `job.source` when done.
 */
export async function prepareJob(
  cwd: string,
  files: { clip: string; coil: string; driver: string },
  channel: ModulationChannel,
  onProgress?: (fraction: number, stage: string) => void,
  opts: PrepareOptions = {},
): Promise<PreparedJob> {
  const driver = await loadDriver(files.driver, cwd);
  // With the driver, the coil report carries the voltage bound and keep-out the cautions name.
  const coilReport = await loadCoil(files.coil, cwd, driver);
  return prepareLoadedJob(cwd, files.clip, coilReport, driver, channel, onProgress, opts);
}

/** prepareJob for profiles already read (the server keeps them as rows). */
export async function prepareLoadedJob(
  cwd: string,
  clipPath: string,
  coilReport: CoilReport,
  driver: DriverProfile,
  channel: ModulationChannel,
  onProgress?: (fraction: number, stage: string) => void,
  opts: PrepareOptions = {},
): Promise<PreparedJob> {
  const p = await loadForPlanning(resolve(cwd, clipPath), { name: clipPath, pulses: driver.scheme === 'pulse', channel, keepSource: true, spectrum: opts.spectrum, onProgress });
  return { clipPath, clip: p.clip, analysis: p.analysis, channel, source: p.source!, coilReport, coil: coilAtResonance(coilReport), driver, settings: planSettings(driver), plan: p.planClip };
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
