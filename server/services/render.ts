/**
 * The coil-ready render and the arc-sound preview of a prepared job: what `coilcue render` and
 * `coilcue preview` do and what the server's render jobs do, built once. Each writes the WAV file's
 * bytes as they are made into a ByteSink (a StagedFile: server/render/staged-file.ts, which the
 * caller commits under the final name or discards once it has the verdict) and returns the JSON
 * document the command prints with --json. Nothing the length of the clip is held in memory: the
 * source is read block by block (job.source), the bytes go to the sink, and only the 1 ms plan
 * reductions of the render (the closed loop) grow with the clip.
 */
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import { InputError } from '../../shared/errors.ts';
import type { LimitCheck } from '../../shared/plan/evaluate.ts';
import { type PlanCautions, planCautions } from '../../shared/plan/cautions.ts';
import { limitLabel, limitValueText } from '../../shared/plan/limit-labels.ts';
import { type LimitingNote, limitingNote } from '../../shared/plan/quality.ts';
import { preEmphasisAdvice } from '../../shared/plan/report.ts';
import { type ArcSound, type LevelTriple, arcSoundBlocks } from '../../shared/preview/arc-sound.ts';
import { type ModulationGrid, modulationGrid } from '../../shared/preview/grid.ts';
import { DEFAULT_MAX_COLUMNS, type ModulationPreview, modulationPreview } from '../../shared/preview/modulation.ts';
import { ampToDb, finiteOrNull } from '../../shared/units.ts';
import type { SampleBlocks } from '../../shared/preview/sample-blocks.ts';
import type { WavSampleFormat } from '../audio/wav.ts';
import { GraphStream, RENDER_BLOCK, WavBlockEncoder } from '../render/block-render.ts';
import type { ByteSink } from '../render/staged-file.ts';
import { type ClosedLoopReport, PlanReducer, closedLoopCheck } from '../render/closed-loop.ts';
import { ReductionThread } from './reduction-thread.ts';
import type { PlanClip } from '../../shared/plan/evaluate.ts';
import { type PreEmphasis, type RenderedModulation, type RenderedModulationFigures, quantisationMargin, renderModulationWav } from '../render/render-clip.ts';
import { type GainChoice, type PreparedJob, chooseGain } from './plan.ts';

/** The safety line both commands print once, and the API returns beside every render. */
export const RENDER_CAUTION =
  'Caution: resonant coils make high voltage and RF that can burn, injure or kill; follow local codes and licensed practice. Hearing: keep preview volume moderate.';

/** What the render and the preview documents both begin with: the file written and the gain behind it. */
export interface OutputHead {
  clip: string;
  out: string;
  format: WavSampleFormat;
  sampleRate: number;
  durationS: number;
  channel: ModulationChannel;
  scheme: string;
  gainDb: number;
  gainFrom: 'advised' | 'given';
}

/** Everything `render --json` prints. ±Infinity levels are null. */
export interface RenderSummary extends OutputHead {
  advice: { advisedGainDb: number | null; binding: (Pick<LimitCheck, 'limit' | 'role' | 'value' | 'allowed' | 'unit'> & { label: string }) | null } | null;
  /** The shelf applied (null: none). */
  preEmphasis: PreEmphasis | null;
  /** Where the pre-emphasis came from: the plan's advice ("auto", the default), a given number, or off (0, or auto with none advised). */
  preEmphasisFrom: 'advised' | 'given' | 'off';
  /** What was applied and why, in one sentence. */
  preEmphasisNote: string;
  limiter: RenderedModulation['limiter'];
  levels: {
    beforeLimiter: { samplePeakDbfs: number | null; truePeakDbtp: number | null };
    render: { samplePeakDbfs: number | null; truePeakDbtp: number | null };
  };
  closedLoop: {
    ok: boolean;
    promiseKept: boolean;
    gainDbApplied: 0;
    explanation: string;
    /** Every limit, planned against rendered, with the name a person reads (the plan's `label`). */
    limits: (ClosedLoopReport['limits'][number] & { label: string })[];
    failures: string[];
  };
  /**
   * The safety verdict: false when the re-plan of the render breaks a limit (exit code 3 on the
   * command line, and the file is not kept unless asked).
   */
  safe: boolean;
  /** One line naming the broken limit when not safe, else null. */
  unsafeReason: string | null;
  /** Quality note apart from safety: heavy peak limiting, measured by the limiter. */
  limiting: LimitingNote | null;
  /** What the advice rests on (estimated figures and how to measure them) and the keep-out with interlock and emergency stop. */
  cautions: PlanCautions;
  caution: string;
}

function bindingOf(b: LimitCheck | null) {
  return b ? { limit: b.limit, label: limitLabel(b), role: b.role, value: b.value, allowed: b.allowed, unit: b.unit } : null;
}

function renderSummary(
  files: { clip: string; out: string },
  format: WavSampleFormat,
  r: RenderedModulationFigures,
  job: PreparedJob,
  choice: GainChoice,
  loop: ClosedLoopReport,
  emphasis: { from: RenderSummary['preEmphasisFrom']; note: string },
  histogram: PreparedJob['plan']['histogram'],
): RenderSummary {
  const scheme = job.driver.scheme;
  const broken = loop.limits.find((l) => !l.holds);
  return {
    clip: files.clip,
    out: files.out,
    format,
    sampleRate: r.sampleRate,
    durationS: r.sampleCount / r.sampleRate,
    channel: r.channel,
    scheme,
    gainDb: choice.gainDb,
    gainFrom: choice.from,
    advice: choice.advice ? { advisedGainDb: choice.advice.advisedGainDb, binding: bindingOf(choice.advice.binding) } : null,
    preEmphasis: r.preEmphasis,
    preEmphasisFrom: emphasis.from,
    preEmphasisNote: emphasis.note,
    limiter: r.limiter,
    levels: {
      beforeLimiter: { samplePeakDbfs: finiteOrNull(r.beforeLimiter.samplePeakDbfs), truePeakDbtp: finiteOrNull(r.beforeLimiter.truePeakDbtp) },
      render: { samplePeakDbfs: finiteOrNull(r.samplePeakDbfs), truePeakDbtp: finiteOrNull(r.truePeakDbtp) },
    },
    closedLoop: {
      ok: loop.ok,
      promiseKept: loop.promiseKept,
      gainDbApplied: 0,
      explanation: loop.explanation,
      limits: loop.limits.map((l) => ({ ...l, label: limitLabel(l) })),
      failures: loop.failures,
    },
    safe: loop.ok,
    unsafeReason: broken ? unsafeLine(broken) : null,
    limiting: r.limiter ? limitingNote(histogram, choice.gainDb, r.limiter.ceilingDbfs, r.limiter.deepFraction) : null,
    cautions: planCautions(job.coilReport, job.driver),
    caution: RENDER_CAUTION,
  };
}

/** The one line the command line prints when a render is not safe. */
function unsafeLine(l: ClosedLoopReport['limits'][number]): string {
  return `${limitLabel(l)} breaks on the render: ${limitValueText(l.rendered, l.unit, l.limit)} against ${limitValueText(l.allowed, l.unit)} allowed${l.atS === null ? '' : ` at ${l.atS.toFixed(2)} s`}`;
}

/** What a render is asked for. */
export interface RenderOptions {
  /** Names shown in the document: the clip as the person named it, and the output. */
  names: { clip: string; out: string };
  gainDb?: number;
  format: WavSampleFormat;
  /**
   * High-shelf gain, dB: 'auto' (or absent) applies the plan's advised pre-emphasis when the plan
   * advises one (the coil's envelope corner costs more than 1 dB of the clip's power), a number
   * overrides it, 0 turns it off.
   */
  preEmphasisDb?: number | 'auto';
  /** The shelf's corner; default the advice's corner ('auto') or the coil's modulation corner (a given shelf gain). */
  preEmphasisHz?: number;
  ceilingDbfs: number;
}

/**
 * The coil-ready clip: gain (given or advised for the signal that reaches the coil), optional
 * pre-emphasis, the look-ahead limiter, encoded block by block into `out`; the samples the bytes
 * hold (as a reader decodes them) are planned again at 0 dB (the closed loop). The summary's `safe`
 * is the verdict on which the caller keeps or drops the file. InputError when the pre-emphasis
 * corner is not below half the sample rate or no gain is safe.
 */
export async function renderJob(job: PreparedJob, o: RenderOptions, out: ByteSink): Promise<{ summary: RenderSummary }> {
  const fs = job.clip.sampleRate;
  const n = job.source.length;
  // The closed loop's reductions on the second core while this thread renders; the thread loads
  // while the gain is chosen.
  const loopReduction = new ReductionThread<PlanClip>();
  try {
    return await render();
  } catch (e) {
    loopReduction.close();
    throw e;
  }

  async function render(): Promise<{ summary: RenderSummary }> {
    let preEmphasis: PreEmphasis | null = null;
    let plan = job.plan;
    const emphasis = chooseEmphasis(job, o.preEmphasisDb ?? 'auto');
    if (emphasis.shelfDb !== 0) {
      const cornerHz = o.preEmphasisHz ?? emphasis.cornerHz;
      if (!(cornerHz < fs / 2)) {
        throw new InputError('bad-pre-emphasis', `the pre-emphasis corner ${cornerHz.toFixed(0)} Hz is not below half the sample rate (${fs / 2} Hz); give a lower corner frequency`, 'preEmphasisHz');
      }
      preEmphasis = { cornerHz, shelfGainDb: emphasis.shelfDb };
      // The advice must be for the signal that reaches the coil: plan the emphasised source (block by
      // block through the shelf, reduced to what planning reads as it goes).
      plan = emphasisedPlan(job.source, fs, preEmphasis, job.clipPath, job.driver.scheme === 'pulse');
    }
    const choice = chooseGain(plan, job, o.gainDb);
    // Block by block into the file, and (closed loop) the samples the file holds as a reader decodes
    // them into the planner's reductions. The header goes out last (patched over zeros), so a file cut
    // short never reads as a whole WAV.
    loopReduction.start({ kind: 'plan', sampleCount: n, sampleRate: fs, pulses: job.driver.scheme === 'pulse', name: o.names.out });
    const file = headerLastSink(out);
    const rendered = renderModulationWav(
      job.source,
      fs,
      job.channel,
      { gainDb: choice.gainDb, preEmphasis, ceilingDbfs: o.ceilingDbfs, format: o.format },
      {
        onChunk: (b) => file.write(b),
        onDecoded: (x) => loopReduction.add(x),
        onRestart: () => {
          file.rewind();
          loopReduction.restart();
        },
      },
    );
    file.finish();
    const loop = closedLoopCheck(await loopReduction.result(), o.names.out, job.coil, job.driver, job.settings, choice.promised);
    const note =
      preEmphasis === null
        ? emphasis.note
        : `${emphasis.note}: a first-order high shelf of ${preEmphasis.shelfGainDb >= 0 ? '+' : ''}${preEmphasis.shelfGainDb.toFixed(1)} dB from ${preEmphasis.cornerHz.toFixed(0)} Hz`;
    return { summary: renderSummary(o.names, o.format, rendered, job, choice, loop, { from: emphasis.from, note }, plan.histogram) };
  }
}

/**
 * A WavBlockEncoder's chunks into `out` with the header (its first chunk) written as zeros and
 * patched in by `finish`: until then the file is no valid WAV.
 */
function headerLastSink(out: ByteSink) {
  let header: Uint8Array | null = null;
  let written = 0;
  return {
    write(b: Uint8Array) {
      if (written === 0) {
        header = b.slice();
        out.write(new Uint8Array(b.length));
      } else out.write(b);
      written += b.length;
    },
    rewind() {
      out.rewind();
      written = 0;
      header = null;
    },
    finish() {
      if (header === null) throw new RangeError('headerLastSink.finish: nothing was written');
      out.patch(0, header);
    },
  };
}

/**
 * The shelf a render applies: the plan's advice for 'auto' (the one that holds across the
 * modulation corner's range when Q is not measured: shared/plan/report.ts preEmphasisAdvice), else
 * the number given (0: off) from the coil's modulation corner.
 */
function chooseEmphasis(job: PreparedJob, asked: number | 'auto'): { shelfDb: number; cornerHz: number; from: RenderSummary['preEmphasisFrom']; note: string } {
  const cornerHz = job.coilReport.modulationCornerHz;
  if (asked !== 'auto') {
    return asked === 0 ? { shelfDb: 0, cornerHz, from: 'off', note: 'no pre-emphasis (turned off with 0 dB)' } : { shelfDb: asked, cornerHz, from: 'given', note: 'pre-emphasis as given' };
  }
  const welch = job.analysis.spectrum.welch;
  const advice = welch === null ? null : preEmphasisAdvice(welch, job.coilReport.modulationCornerRangeHz);
  if (advice === null || !advice.advised || advice.shelfGainDb === 0) {
    const why = advice === null ? 'the clip has no spectrum to judge by' : `the coil's envelope corner costs the clip only ${advice.envelopeLossDb.toFixed(1)} dB across its range`;
    return { shelfDb: 0, cornerHz, from: 'off', note: `no pre-emphasis: none advised (${why})` };
  }
  return { shelfDb: advice.shelfGainDb, cornerHz: advice.cornerHz, from: 'advised', note: `pre-emphasis as the plan advises (${advice.basis})` };
}

/** The plan of `source` through the pre-emphasis shelf at 0 dB, without keeping the emphasised samples. */
function emphasisedPlan(source: SampleBlocks, fs: number, preEmphasis: PreEmphasis, name: string, pulses: boolean) {
  const graph = new GraphStream(fs, 0, preEmphasis);
  const reducer = new PlanReducer(source.length, fs, pulses);
  const block = new Float32Array(Math.min(RENDER_BLOCK, source.maxBlock, Math.max(1, source.length)));
  for (let a = 0; a < source.length; a += block.length) {
    const b = block.subarray(0, Math.min(block.length, source.length - a));
    graph.process(source.read(a, b.length), b);
    reducer.add(b);
  }
  return reducer.result(name);
}

const levelsDb = (l: LevelTriple) => ({
  samplePeakDbfs: finiteOrNull(ampToDb(l.samplePeak)),
  truePeakDbtp: finiteOrNull(ampToDb(l.truePeak)),
  rmsDbfs: finiteOrNull(ampToDb(l.rms)),
});

/** Everything `preview --json` prints: the modulation preview's display grid and ranges, and the arc sound's levels. */
export interface PreviewSummary extends OutputHead {
  modulation: Pick<ModulationPreview, 'columns' | 'framesPerColumn' | 'columnS' | 'range'> & {
    supplyVoltageV: number;
    fullPowerW: number;
    /** Pulse scheme: the driver's longest on-time, s (the full scale of maxOnTimeS); null for rail schemes. */
    maxOnTimeLimitS: number | null;
    /** The display grid itself, per column (shared/preview/grid.ts). */
    grid: ModulationGrid;
  };
  arcSound: {
    cornerHz: number | null;
    pulseCount: number | null;
    limitedBy: ArcSound['limitedBy'];
    scale: number;
    source: ReturnType<typeof levelsDb>;
    output: ReturnType<typeof levelsDb>;
  };
  caution: string;
}

/** What a preview is asked for. */
export interface PreviewOptions {
  names: { clip: string; out: string };
  gainDb?: number;
  format: WavSampleFormat;
  /** Columns of the modulation preview's display grid; default DEFAULT_MAX_COLUMNS. */
  columns?: number;
}

/** The arc-sound WAV (into `out`, block by block) and the modulation preview of a prepared job at the given (or advised) gain. */
export function previewJob(job: PreparedJob, o: PreviewOptions, out: ByteSink): { summary: PreviewSummary; modulation: ModulationPreview } {
  const choice = chooseGain(job.plan, job, o.gainDb);
  const mod = modulationPreview(job.plan, job.driver, choice.gainDb, { maxColumns: o.columns ?? DEFAULT_MAX_COLUMNS, resonanceHz: job.coil.resonanceHz });
  // Block by block from the source into the file (the preview's samples are never whole).
  const file = headerLastSink(out);
  const enc = new WavBlockEncoder(job.clip.sampleRate, job.source.length, o.format, 1, (b) => file.write(b));
  const arc = arcSoundBlocks(
    job.source,
    job.clip.sampleRate,
    job.driver,
    job.coil,
    choice.gainDb,
    { pulseEvents: job.plan.pulseEvents, peakMargin: quantisationMargin(o.format) },
    (b) => enc.write(b),
  );
  enc.finish();
  file.finish();
  const summary: PreviewSummary = {
    clip: o.names.clip,
    out: o.names.out,
    format: o.format,
    sampleRate: arc.sampleRate,
    durationS: arc.sampleCount / arc.sampleRate,
    channel: job.channel,
    scheme: job.driver.scheme,
    gainDb: choice.gainDb,
    gainFrom: choice.from,
    modulation: {
      columns: mod.columns,
      framesPerColumn: mod.framesPerColumn,
      columnS: mod.columnS,
      range: mod.range,
      supplyVoltageV: job.driver.supplyVoltageV,
      fullPowerW: job.driver.supplyVoltageV * job.driver.fullRailCurrentA,
      maxOnTimeLimitS: job.driver.scheme === 'pulse' ? (job.driver.pulse?.maxOnTimeS ?? null) : null,
      grid: modulationGrid(mod),
    },
    arcSound: {
      cornerHz: arc.cornerHz,
      pulseCount: arc.pulseCount,
      limitedBy: arc.limitedBy,
      scale: arc.scale,
      source: levelsDb(arc.source),
      output: levelsDb(arc.output),
    },
    caution: RENDER_CAUTION,
  };
  return { summary, modulation: mod };
}
