import { resolve } from 'node:path';
import type { ModulationChannel } from '../../../shared/audio/clip.ts';
import { gridChart, gridCsv } from '../../../shared/preview/grid.ts';
import { type WavSampleFormat, writeFileAtomic } from '../../audio/wav.ts';
import { StagedFile, writeStaged } from '../../render/staged-file.ts';
import { prepareJob } from '../../services/plan.ts';
import { type PreviewSummary, previewJob } from '../../services/render.ts';
import { refuseOverwriteOfInput } from '../file-args.ts';
import { PREVIEW_OPTIONS } from './tables.ts';
import { EXIT_OK, type CliIo, type Command } from '../io.ts';
import { alignRows } from '../format.ts';
import { withProgress } from '../progress.ts';

export type { PreviewSummary };

const num = (x: number | null, d: number): string => (x === null ? '—' : x.toFixed(d));
const dB = (x: number | null): string => (x === null ? '-inf' : x.toFixed(2));

/** The readable report of a preview. */
export function formatPreview(s: PreviewSummary, chartWidth = 72): string {
  const m = s.modulation;
  const r = m.range;
  const rows: [string, string][] = [
    ['arc sound', `${s.out} (${s.format}, ${s.sampleRate} Hz, mono, ${s.durationS.toFixed(2)} s)`],
    ['modulation source', `${s.channel} of ${s.clip}`],
    ['gain', `${s.gainDb >= 0 ? '+' : ''}${s.gainDb.toFixed(1)} dB (${s.gainFrom})`],
    ['display grid', `${m.columns} columns of ${(m.columnS * 1000).toFixed(1)} ms (${m.framesPerColumn} frames each)`],
  ];
  if (r.railMinV !== null) rows.push(['rail swing', `${num(r.railMinV, 1)} … ${num(r.railMaxV, 1)} V of ${m.supplyVoltageV} V`]);
  else rows.push(['pulses', `${r.pulseCount} pulses, longest on-time ${num(r.maxOnS === null ? null : r.maxOnS * 1e6, 1)} µs`]);
  rows.push(['power to the coil', `${r.meanPowerW.toFixed(1)} W mean, ${r.maxPowerW.toFixed(1)} W highest (full power ${m.fullPowerW.toFixed(0)} W)`]);
  const a = s.arcSound;
  rows.push([
    'arc-sound model',
    a.cornerHz !== null ? `power variation through the coil's envelope corner ${a.cornerHz.toFixed(0)} Hz (first-order low-pass)` : 'the pulse train at audio rate (rectangular pulses, mean removed)',
  ]);
  rows.push([
    'arc sound level',
    a.limitedBy === 'silence'
      ? 'silence: the drive does not vary at this gain'
      : `${dB(a.output.samplePeakDbfs)} dBFS peak, ${dB(a.output.rmsDbfs)} dBFS RMS (source ${dB(a.source.samplePeakDbfs)} / ${dB(a.source.rmsDbfs)}; set by the source's ${a.limitedBy})`,
  ]);
  const chart = gridChart(m.grid, { width: chartWidth, supplyV: m.supplyVoltageV, fullPowerW: m.fullPowerW, maxOnTimeS: m.maxOnTimeLimitS ?? undefined, durationS: s.durationS });
  return [`Preview on the coil (${s.scheme} scheme)`, ...alignRows(rows, '  '), '', 'Over the clip (each cell the extreme of the columns it covers)', ...chart, '', s.caution, ''].join('\n');
}

/** `coilcue preview`: what the coil will make of a clip — the arc sound as a WAV, the modulation in figures. */
export const previewCommand: Command<typeof PREVIEW_OPTIONS.options> = {
  options: PREVIEW_OPTIONS,
  async run({ values }, io: CliIo): Promise<number> {
    const files = { clip: values.clip, coil: values.coil, driver: values.driver, out: values.out };
    refuseOverwriteOfInput(io.cwd, files.clip, files.out);
    const format: WavSampleFormat = values.format;
    const channel: ModulationChannel = values.channel;

    // The preview reads no spectrum (its gain advice is the plan's; the pre-emphasis is the render's).
    const job = await withProgress(io, 'analysing', (onProgress) => prepareJob(io.cwd, files, channel, onProgress, { spectrum: false }));
    let s: PreviewSummary;
    try {
      // Written as it is made, under a temporary name beside the output, renamed when complete.
      s = (await writeStaged(StagedFile.create(resolve(io.cwd, files.out)), (out) => previewJob(job, { names: files, gainDb: values['gain-db'], format, columns: values.columns }, out))).summary;
    } finally {
      job.source.close();
    }
    if (values.trace !== undefined) await writeFileAtomic(resolve(io.cwd, values.trace), new TextEncoder().encode(gridCsv(s.modulation.grid)));
    io.out(values.json ? `${JSON.stringify(s, null, 2)}\n` : formatPreview(s, values['chart-width']));
    return EXIT_OK;
  },
};
