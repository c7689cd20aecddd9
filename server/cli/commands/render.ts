import { resolve } from 'node:path';
import type { ModulationChannel } from '../../../shared/audio/clip.ts';
import { InputError } from '../../../shared/errors.ts';
import { type WavSampleFormat, writeWavAtomic } from '../../audio/wav.ts';
import { formatLimitValue, limitLabel } from '../../render/closed-loop.ts';
import { prepareJob } from '../../services/plan.ts';
import { type RenderSummary, renderJob } from '../../services/render.ts';
import { choiceFlag, numberFlag, parseCommandArgs } from '../args.ts';
import { refuseOverwriteOfInput, requireFiles } from '../file-args.ts';
import { EXIT_OK, type CliIo, type Command } from '../io.ts';
import { alignRows } from '../format.ts';
import { withProgress } from '../progress.ts';

export type { RenderSummary };

// Registered together with `preview` from one import line in ./index.ts.

const USAGE =
  'coilcue render --clip <audio> --coil <coil.json> --driver <driver.json> --out <file.wav> [--gain-db G] [--format s16|s24|f32] [--channel mix|left|right] [--pre-emphasis-db G] [--pre-emphasis-hz F] [--ceiling-dbfs C] [--json]';
const CHANNELS = ['mix', 'left', 'right'] as const;
const FORMATS = ['s16', 's24', 'f32'] as const;

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

    const job = await withProgress(io, 'analysing', (onProgress) => prepareJob(io.cwd, files, channel, onProgress));
    const { bytes, summary: s } = await renderJob(job, { names: files, gainDb, format, preEmphasisDb: shelfDb, preEmphasisHz: shelfHz, ceilingDbfs });
    await writeWavAtomic(resolve(io.cwd, files.out), bytes);
    io.out(values.json ? `${JSON.stringify(s, null, 2)}\n` : formatRender(s));
    return EXIT_OK;
  },
};
