import { resolve } from 'node:path';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import type { ModulationChannel } from '../../../shared/audio/clip.ts';
import { InputError } from '../../../shared/errors.ts';
import type { LimitCheck } from '../../../shared/plan/evaluate.ts';
import { toPlanClip } from '../../../shared/plan/plan-clip.ts';
import { finiteOrNull } from '../../../shared/units.ts';
import { DEFAULT_MAX_BYTES, DEFAULT_MAX_DURATION_S, decodeAudioBytes } from '../../audio/decode.ts';
import { type WavSampleFormat, writeWavAtomic } from '../../audio/wav.ts';
import { type ClosedLoopReport, closedLoopCheck, formatLimitValue, limitLabel } from '../../render/closed-loop.ts';
import { type GainChoice, RENDER_CAUTION, chooseGain, prepareJob, refuseOverwriteOfInput, requireFiles } from '../../render/prepare.ts';
import { type PreEmphasis, type RenderedModulation, encodeRender, renderGraph, renderModulation } from '../../render/render-clip.ts';
import { choiceFlag, numberFlag, parseCommandArgs } from '../args.ts';
import { EXIT_OK, type CliIo, type Command } from '../io.ts';
import { alignRows } from '../format.ts';

// Registered together with `preview` from one import line in ./index.ts.

const USAGE =
  'coilcue render --clip <audio> --coil <coil.json> --driver <driver.json> --out <file.wav> [--gain-db G] [--format s16|s24|f32] [--channel mix|left|right] [--pre-emphasis-db G] [--pre-emphasis-hz F] [--ceiling-dbfs C] [--json]';
const CHANNELS = ['mix', 'left', 'right'] as const;
const FORMATS = ['s16', 's24', 'f32'] as const;

/** Everything `render --json` prints. ±Infinity levels are null. */
export interface RenderSummary {
  clip: string;
  out: string;
  format: WavSampleFormat;
  sampleRate: number;
  durationS: number;
  channel: ModulationChannel;
  scheme: string;
  gainDb: number;
  gainFrom: 'advised' | 'given';
  advice: { advisedGainDb: number | null; binding: Pick<LimitCheck, 'limit' | 'role' | 'value' | 'allowed' | 'unit'> | null } | null;
  preEmphasis: PreEmphasis | null;
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
    limits: ClosedLoopReport['limits'];
    failures: string[];
  };
  caution: string;
}

function bindingOf(b: LimitCheck | null) {
  return b ? { limit: b.limit, role: b.role, value: b.value, allowed: b.allowed, unit: b.unit } : null;
}

function summary(
  files: { clip: string; out: string },
  format: WavSampleFormat,
  r: RenderedModulation,
  scheme: string,
  choice: GainChoice,
  loop: ClosedLoopReport,
): RenderSummary {
  return {
    clip: files.clip,
    out: files.out,
    format,
    sampleRate: r.sampleRate,
    durationS: r.samples.length / r.sampleRate,
    channel: r.channel,
    scheme,
    gainDb: choice.gainDb,
    gainFrom: choice.from,
    advice: choice.advice ? { advisedGainDb: choice.advice.advisedGainDb, binding: bindingOf(choice.advice.binding) } : null,
    preEmphasis: r.preEmphasis,
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
      limits: loop.limits,
      failures: loop.failures,
    },
    caution: RENDER_CAUTION,
  };
}

const dB = (x: number | null, digits = 2): string => (x === null || !Number.isFinite(x) ? '-inf' : `${x >= 0 ? '+' : ''}${x.toFixed(digits)}`);

/** The readable report of a render. */
export function formatRender(s: RenderSummary): string {
  const rows: [string, string][] = [
    ['output', `${s.out} (${s.format}, ${s.sampleRate} Hz, mono, ${s.durationS.toFixed(2)} s)`],
    ['modulation source', `${s.channel} of ${s.clip}`],
    [
      'gain',
      `${dB(s.gainDb, 1)} dB (${s.gainFrom}${s.advice?.binding ? `; above it ${limitLabel(s.advice.binding)} binds` : ''})`,
    ],
    ['pre-emphasis', s.preEmphasis ? `${dB(s.preEmphasis.shelfGainDb, 1)} dB high shelf, half of it at ${s.preEmphasis.cornerHz.toFixed(0)} Hz` : 'none'],
  ];
  const l = s.limiter;
  if (l) {
    rows.push([
      'limiter ceiling',
      `${dB(l.ceilingDbfs)} dBFS on ${l.truePeak ? 'sample and true peak' : 'sample peak'} (works to ${dB(l.workingCeilingDbfs, 4)} dBFS for the ${s.format} quantisation margin)`,
    ]);
    rows.push([
      'limited',
      `${(l.deepFraction * 100).toFixed(3)} % of samples by more than 1 dB (${(l.limitedFraction * 100).toFixed(1)} % at all, as the gain recovers), at most ${l.maxReductionDb.toFixed(2)} dB`,
    ]);
  }
  rows.push(['before the limiter', `${dB(s.levels.beforeLimiter.samplePeakDbfs)} dBFS sample peak, ${dB(s.levels.beforeLimiter.truePeakDbtp)} dBTP true peak`]);
  rows.push(['render', `${dB(s.levels.render.samplePeakDbfs)} dBFS sample peak, ${dB(s.levels.render.truePeakDbtp)} dBTP true peak (0 dBFS = the rail at its ends)`]);
  const lines = [`Render for the coil (${s.scheme} scheme)`, ...alignRows(rows, '  '), '', 'Closed loop', `  ${s.closedLoop.explanation}`];
  const table: string[][] = [['limit', 'planned', 'render', 'allowed', '']];
  for (const x of s.closedLoop.limits) {
    table.push([limitLabel(x), formatLimitValue(x.planned, x.unit), formatLimitValue(x.rendered, x.unit), formatLimitValue(x.allowed, x.unit), x.holds ? 'holds' : 'DOES NOT HOLD']);
  }
  const widths = table[0].map((_, c) => Math.max(...table.map((r) => r[c].length)));
  for (const r of table) lines.push(`  ${r.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ')}`.trimEnd());
  lines.push('');
  if (s.closedLoop.ok) {
    lines.push(s.gainFrom === 'advised' ? 'Every limit the advice promised holds on the render.' : 'Every limit holds on the render.');
  } else {
    lines.push('NOT SAFE AS RENDERED: the file was written, but do not play it on the coil as it is:');
    for (const f of s.closedLoop.failures) lines.push(`  ! ${f}`);
    lines.push(s.gainFrom === 'given' ? '  Lower --gain-db (or leave it out for the advised gain) and render again.' : '  Lower the gain below the advised value (--gain-db) and render again.');
  }
  lines.push(s.caution, '');
  return lines.join('\n');
}

/** `coilcue render`: the coil-ready WAV of a clip, limited to the ceiling and checked in a closed loop. */
export const renderCommand: Command = {
  usage: USAGE,
  async run(argv: string[], io: CliIo): Promise<number> {
    const { values, positionals } = parseCommandArgs(
      argv,
      {
        clip: { type: 'string' },
        coil: { type: 'string' },
        driver: { type: 'string' },
        out: { type: 'string' },
        'gain-db': { type: 'string' },
        format: { type: 'string' },
        channel: { type: 'string' },
        'pre-emphasis-db': { type: 'string' },
        'pre-emphasis-hz': { type: 'string' },
        'ceiling-dbfs': { type: 'string' },
        json: { type: 'boolean' },
      },
      USAGE,
    );
    if (positionals.length) throw new InputError('bad-arguments', `unexpected argument "${positionals[0]}"; every input is a flag. Usage: ${USAGE}`);
    const files = requireFiles(values, USAGE);
    refuseOverwriteOfInput(io.cwd, files.clip, files.out);
    const format: WavSampleFormat = choiceFlag(values.format, 'format', FORMATS) ?? 's16';
    const channel: ModulationChannel = choiceFlag(values.channel, 'channel', CHANNELS) ?? 'mix';
    const gainDb = numberFlag(values['gain-db'], 'gain-db', { min: -60, max: 40 });
    const shelfDb = numberFlag(values['pre-emphasis-db'], 'pre-emphasis-db', { min: -24, max: 24 });
    const shelfHz = numberFlag(values['pre-emphasis-hz'], 'pre-emphasis-hz', { min: 1 });
    if (shelfHz !== undefined && shelfDb === undefined) throw new InputError('bad-arguments', '--pre-emphasis-hz needs --pre-emphasis-db (the shelf gain)');
    const ceilingDbfs = numberFlag(values['ceiling-dbfs'], 'ceiling-dbfs', { min: -40, max: 0 }) ?? 0;

    const job = await prepareJob(io, files, channel);
    const fs = job.clip.sampleRate;
    let preEmphasis: PreEmphasis | null = null;
    let plan = job.plan;
    if (shelfDb !== undefined && shelfDb !== 0) {
      const cornerHz = shelfHz ?? job.coilReport.modulationCornerHz;
      if (!(cornerHz < fs / 2)) {
        throw new InputError('bad-arguments', `the pre-emphasis corner ${cornerHz.toFixed(0)} Hz is not below half the sample rate (${fs / 2} Hz); give a lower --pre-emphasis-hz`);
      }
      preEmphasis = { cornerHz, shelfGainDb: shelfDb };
      // The advice must be for the signal that reaches the coil: plan the emphasised source.
      const emphasised = await renderGraph(job.source, fs, 0, preEmphasis);
      plan = toPlanClip(files.clip, analyzeClip({ sampleRate: fs, channels: [emphasised] }), emphasised, job.driver);
    }
    const choice = chooseGain(plan, job, gainDb);
    const rendered = await renderModulation(job.clip, { channel, gainDb: choice.gainDb, preEmphasis, ceilingDbfs, format });
    const bytes = encodeRender(rendered, format);
    // Closed loop on what the file holds: decoded from the very bytes written (our own file: no size or length limit).
    const decoded = await decodeAudioBytes(bytes, { maxBytes: Math.max(DEFAULT_MAX_BYTES, bytes.length), maxDurationS: Math.max(DEFAULT_MAX_DURATION_S, 2 * rendered.samples.length / fs) });
    const loop = closedLoopCheck({ sampleRate: decoded.sampleRate, channels: decoded.channels }, files.out, job.coil, job.driver, job.settings, choice.promised);
    await writeWavAtomic(resolve(io.cwd, files.out), bytes);
    const s = summary(files, format, rendered, job.driver.scheme, choice, loop);
    io.out(values.json ? `${JSON.stringify(s, null, 2)}\n` : formatRender(s));
    return EXIT_OK;
  },
};
