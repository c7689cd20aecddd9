import { resolve } from 'node:path';
import type { ModulationChannel } from '../../../shared/audio/clip.ts';
import { InputError } from '../../../shared/errors.ts';
import { type ArcSound, type LevelTriple, arcSound } from '../../../shared/preview/arc-sound.ts';
import { DEFAULT_MAX_COLUMNS, type ModulationPreview, modulationPreview } from '../../../shared/preview/modulation.ts';
import { ampToDb, finiteOrNull } from '../../../shared/units.ts';
import { type WavSampleFormat, encodeWav, writeWavAtomic } from '../../audio/wav.ts';
import { quantisationMargin } from '../../render/render-clip.ts';
import { RENDER_CAUTION, chooseGain, prepareJob, refuseOverwriteOfInput, requireFiles } from '../../render/prepare.ts';
import { choiceFlag, numberFlag, parseCommandArgs } from '../args.ts';
import { EXIT_OK, type CliIo, type Command } from '../io.ts';
import { alignRows } from '../format.ts';

const USAGE =
  'coilcue preview --clip <audio> --coil <coil.json> --driver <driver.json> --out <file.wav> [--gain-db G] [--channel mix|left|right] [--format s16|s24|f32] [--columns N] [--json]';
const CHANNELS = ['mix', 'left', 'right'] as const;
const FORMATS = ['s16', 's24', 'f32'] as const;

const levelsDb = (l: LevelTriple) => ({
  samplePeakDbfs: finiteOrNull(ampToDb(l.samplePeak)),
  truePeakDbtp: finiteOrNull(ampToDb(l.truePeak)),
  rmsDbfs: finiteOrNull(ampToDb(l.rms)),
});

/** Everything `preview --json` prints: the modulation preview's grid and ranges (not every column) and the arc sound's levels. */
export interface PreviewSummary {
  clip: string;
  out: string;
  format: WavSampleFormat;
  sampleRate: number;
  durationS: number;
  channel: ModulationChannel;
  scheme: string;
  gainDb: number;
  gainFrom: 'advised' | 'given';
  modulation: Pick<ModulationPreview, 'columns' | 'framesPerColumn' | 'columnS' | 'range'> & { supplyVoltageV: number; fullPowerW: number };
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

const num = (x: number | null, d: number): string => (x === null ? '—' : x.toFixed(d));
const dB = (x: number | null): string => (x === null ? '-inf' : x.toFixed(2));

/** The readable report of a preview. */
export function formatPreview(s: PreviewSummary): string {
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
  return [`Preview on the coil (${s.scheme} scheme)`, ...alignRows(rows, '  '), s.caution, ''].join('\n');
}

/** `coilcue preview`: what the coil will make of a clip — the arc sound as a WAV, the modulation in figures. */
export const previewCommand: Command = {
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
        channel: { type: 'string' },
        format: { type: 'string' },
        columns: { type: 'string' },
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
    const columns = numberFlag(values.columns, 'columns', { min: 1, max: 100000 }) ?? DEFAULT_MAX_COLUMNS;
    if (!Number.isInteger(columns)) throw new InputError('bad-arguments', `--columns must be a whole number, got ${columns}`);

    const job = await prepareJob(io, files, channel);
    const choice = chooseGain(job.plan, job, gainDb);
    const mod = modulationPreview(job.plan, job.driver, choice.gainDb, { maxColumns: columns });
    const arc = arcSound(job.source, job.clip.sampleRate, job.driver, job.coil, choice.gainDb, {
      pulseEvents: job.plan.pulseEvents,
      peakMargin: quantisationMargin(format),
    });
    const bytes = encodeWav({ sampleRate: arc.sampleRate, channels: [arc.samples] }, { format, seed: 1 });
    await writeWavAtomic(resolve(io.cwd, files.out), bytes);
    const s: PreviewSummary = {
      clip: files.clip,
      out: files.out,
      format,
      sampleRate: arc.sampleRate,
      durationS: arc.samples.length / arc.sampleRate,
      channel,
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
    io.out(values.json ? `${JSON.stringify(s, null, 2)}\n` : formatPreview(s));
    return EXIT_OK;
  },
};
