/**
 * What `coilcue render` and `coilcue preview` both do before their own work: read the coil and
 * driver profiles (JSON files, through the plan command's loaders so every command words its
 * errors alike), decode and analyse the clip, build the planner's view of it, and
 * pick the gain (given, or advised by shared/plan/advise.ts).
 */
import { resolve } from 'node:path';
import type { ClipAnalysis } from '../../shared/analysis/analyze-clip.ts';
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import { InputError } from '../../shared/errors.ts';
import type { CoilReport } from '../../shared/physics/coil/analyze.ts';
import type { CoilAtResonance } from '../../shared/physics/driver/types.ts';
import { type Advice, adviseGain } from '../../shared/plan/advise.ts';
import { type Evaluation, type PlanClip, type PlanSettings, evaluateAtGain, planSettings } from '../../shared/plan/evaluate.ts';
import { toPlanClip } from '../../shared/plan/plan-clip.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import type { DecodedClip } from '../audio/decode.ts';
import { loadAndAnalyze } from '../cli/commands/analyze.ts';
import { loadCoil, loadDriver } from '../cli/commands/plan.ts';
import type { CliIo } from '../cli/io.ts';

/** The safety line both commands print once. */
export const RENDER_CAUTION =
  'Caution: resonant coils make high voltage and RF that can burn, injure or kill; follow local codes and licensed practice. Hearing: keep preview volume moderate.';

/** Everything the two commands share about one clip on one coil and driver. */
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
 * analyses the clip and builds its plan view. InputErrors from every step pass through.
 */
export async function prepareJob(
  io: CliIo,
  files: { clip: string; coil: string; driver: string },
  channel: ModulationChannel,
): Promise<PreparedJob> {
  const coilReport = await loadCoil(files.coil, io.cwd);
  const driver = await loadDriver(files.driver, io.cwd);
  const coil: CoilAtResonance = { resonanceHz: coilReport.resonanceHz, qualityFactor: coilReport.qualityFactor };
  const { clip, analysis, source } = await loadAndAnalyze(files.clip, io, { channel });
  const plan = toPlanClip(files.clip, analysis, source, driver);
  return { clipPath: files.clip, clip, analysis, channel, source, coilReport, coil, driver, settings: planSettings(driver), plan };
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
 * The given gain, or the advised one, for `plan` (the job's plan, or that of a pre-emphasised
 * source: the advice must be for the signal that reaches the coil). InputError `no-safe-gain` when no gain was given and no
 * gain down to −60 dB keeps every limit (the message names the binding limit).
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
    throw new InputError('no-safe-gain', `no safe gain for this clip on this coil and driver: ${what} binds and ${why}; check the driver profile, or give --gain-db to render anyway`);
  }
  return { gainDb: advice.advisedGainDb, from: 'advised', advice, promised: advice.atAdvised };
}

/** The options every file-writing command checks the same way: required paths, a .wav output that is not the input. */
export function requireFiles(values: Record<string, unknown>, usage: string): { clip: string; coil: string; driver: string; out: string } {
  const missing = ['clip', 'coil', 'driver', 'out'].filter((k) => typeof values[k] !== 'string' || (values[k] as string).trim() === '');
  if (missing.length) throw new InputError('bad-arguments', `missing ${missing.map((m) => `--${m}`).join(', ')}. Usage: ${usage}`);
  const [clip, coil, driver, out] = (['clip', 'coil', 'driver', 'out'] as const).map((k) => values[k] as string);
  if (!/\.wav$/i.test(out)) throw new InputError('bad-arguments', `--out must name a .wav file (the output is a WAV file), got "${out}"`);
  return { clip, coil, driver, out };
}

/** Refuses to write over the input clip. */
export function refuseOverwriteOfInput(cwd: string, clip: string, out: string): void {
  if (resolve(cwd, clip) === resolve(cwd, out)) {
    throw new InputError('bad-arguments', `--out is the input clip itself (${clip}); choose another output file so the original is kept`);
  }
}

