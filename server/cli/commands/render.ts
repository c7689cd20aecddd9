import { resolve } from 'node:path';
import type { ModulationChannel } from '../../../shared/audio/clip.ts';
import type { WavSampleFormat } from '../../audio/wav.ts';
import { StagedFile, writeStaged } from '../../render/staged-file.ts';
import { limitLabel, limitValueText } from '../../../shared/plan/limit-labels.ts';
import { prepareJob } from '../../services/plan.ts';
import { type RenderSummary, renderJob } from '../../services/render.ts';
import { refuseOverwriteOfInput } from '../file-args.ts';
import { RENDER_OPTIONS } from './tables.ts';
import { EXIT_OK, EXIT_UNSAFE, type CliIo, type Command } from '../io.ts';
import { alignRows, cautionLines } from '../format.ts';
import { withProgress } from '../progress.ts';

export type { RenderSummary };

// Registered together with `preview` from one import line in ./index.ts.

const dB = (x: number | null, digits = 2): string => (x === null || !Number.isFinite(x) ? '-inf' : `${x >= 0 ? '+' : ''}${x.toFixed(digits)}`);

/** What 0 dBFS means in a render for this scheme. */
export const fullScaleMeaning = (scheme: string): string => (scheme === 'pulse' ? '0 dBFS = the longest on-time' : '0 dBFS = the rail at its ends');

/** The readable report of a render. `written`: whether the file is under its name (an unsafe render is not, unless kept). */
export function formatRender(s: RenderSummary, written = true): string {
  const rows: [string, string][] = [
    ['output', `${s.out} (${s.format}, ${s.sampleRate} Hz, mono, ${s.durationS.toFixed(2)} s)${written ? '' : ' — NOT WRITTEN'}`],
    ['modulation source', `${s.channel} of ${s.clip}`],
    [
      'gain',
      `${dB(s.gainDb, 1)} dB (${s.gainFrom}${s.advice?.binding ? `; above it ${s.advice.binding.label} binds` : ''})`,
    ],
    ['pre-emphasis', s.preEmphasisNote],
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
  rows.push(['render', `${dB(s.levels.render.samplePeakDbfs)} dBFS sample peak, ${dB(s.levels.render.truePeakDbtp)} dBTP true peak (${fullScaleMeaning(s.scheme)})`]);
  const lines = [`Render for the coil (${s.scheme} scheme)`, ...alignRows(rows, '  '), '', 'Closed loop', `  ${s.closedLoop.explanation}`];
  const table: string[][] = [['limit', 'planned', 'render', 'allowed', '']];
  for (const x of s.closedLoop.limits) {
    table.push([limitLabel(x), limitValueText(x.planned, x.unit, x.limit), limitValueText(x.rendered, x.unit, x.limit), limitValueText(x.allowed, x.unit), x.holds ? 'holds' : 'DOES NOT HOLD']);
  }
  const widths = table[0].map((_, c) => Math.max(...table.map((r) => r[c].length)));
  for (const r of table) lines.push(`  ${r.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ')}`.trimEnd());
  lines.push('');
  if (s.closedLoop.ok) {
    lines.push(s.gainFrom === 'advised' ? 'Every limit the advice promised holds on the render.' : 'Every limit holds on the render.');
  } else {
    lines.push(
      written
        ? 'NOT SAFE AS RENDERED: the file was kept (--keep-unsafe), but do not play it on the coil as it is:'
        : `NOT SAFE AS RENDERED: nothing was written to ${s.out}; do not play this render on the coil:`,
    );
    for (const f of s.closedLoop.failures) lines.push(`  ! ${f}`);
    lines.push(s.gainFrom === 'given' ? '  Lower --gain-db (or leave it out for the advised gain) and render again.' : '  Lower the gain below the advised value (--gain-db) and render again.');
  }
  if (s.limiting?.note) lines.push(`Quality: ${s.limiting.note}`);
  lines.push('', ...cautionLines(s.cautions), s.caution, '');
  return lines.join('\n');
}

/** `coilcue render`: the coil-ready WAV of a clip, limited to the ceiling and checked in a closed loop. */
export const renderCommand: Command<typeof RENDER_OPTIONS.options> = {
  options: RENDER_OPTIONS,
  async run({ values }, io: CliIo): Promise<number> {
    const files = { clip: values.clip, coil: values.coil, driver: values.driver, out: values.out };
    refuseOverwriteOfInput(io.cwd, files.clip, files.out);
    const format: WavSampleFormat = values.format;
    const channel: ModulationChannel = values.channel;
    const shelfDb = values['pre-emphasis-db'];
    const shelfHz = values['pre-emphasis-hz'];

    const job = await withProgress(io, 'analysing', (onProgress) => prepareJob(io.cwd, files, channel, onProgress));
    let s: RenderSummary;
    let write: boolean;
    try {
      // The file is written as it is rendered, under a temporary name beside the output; an unsafe
      // render is not handed over under the output name unless asked (exit code 3 either way).
      const made = await writeStaged(
        StagedFile.create(resolve(io.cwd, files.out)),
        (out) => renderJob(job, { names: files, gainDb: values['gain-db'], format, preEmphasisDb: shelfDb, preEmphasisHz: shelfHz, ceilingDbfs: values['ceiling-dbfs'] }, out),
        (r) => r.summary.safe || values['keep-unsafe'],
      );
      s = made.summary;
      write = s.safe || values['keep-unsafe'];
    } finally {
      job.source.close();
    }
    io.out(values.json ? `${JSON.stringify({ ...s, fileWritten: write }, null, 2)}\n` : formatRender(s, write));
    if (!s.safe) {
      io.err(`coilcue render: unsafe: ${s.unsafeReason}; ${write ? `${files.out} was kept (--keep-unsafe): do not play it on the coil` : `nothing was written to ${files.out}`}\n`);
      return EXIT_UNSAFE;
    }
    return EXIT_OK;
  },
};
