import { resolve } from 'node:path';
import type { AnalyzeOptions, ClipAnalysis } from '../../../shared/analysis/analyze-clip.ts';
import { type AnalysisSummary, summarizeAnalysis } from '../../../shared/analysis/summary.ts';
import { type ModulationChannel, modulationSource } from '../../../shared/audio/clip.ts';
import { InputError } from '../../../shared/errors.ts';
import { analyzeClipParallel, startAnalysisWorker } from '../../analysis/analyze-parallel.ts';
import { matchesModulationSource, sharedSourceWriter } from '../../analysis/shared-source.ts';
import { decodeAudioFile } from '../../audio/decode.ts';
import { choiceFlag, numberFlag, parseCommandArgs } from '../args.ts';
import type { CliIo, Command } from '../io.ts';
import { progressBar } from '../progress.ts';
import { alignRows } from '../format.ts';

const USAGE = 'coilcue analyze <file> [--json] [--channel mix|left|right] [--frame-ms N]';
const CHANNELS = ['mix', 'left', 'right'] as const;

/**
 * Decodes a file and analyses it on both cores (server/analysis/analyze-parallel.ts): the analysis
 * worker starts before decoding, so its start-up overlaps it, and the modulation source is written
 * into shared memory block by block as the file is decoded, so the worker starts on it at once.
 * The same analysis as analyzeClip. Decode progress is the first half of the bar. Shared by other
 * commands, which keep the clip's samples; `source` is the modulation source the analysis read
 * (modulationSource(clip, channel), bit for bit), so they need not mix the channels again.
 */
export async function loadAndAnalyze(
  file: string,
  io: CliIo,
  opts: Omit<AnalyzeOptions, 'onProgress'> = {},
): Promise<{ clip: Awaited<ReturnType<typeof decodeAudioFile>>; analysis: ClipAnalysis; source: Float32Array }> {
  const { clip, analysis, shared } = await decodeAndAnalyze(file, io, opts, false);
  return { clip, analysis, source: shared ?? modulationSource(clip, opts.channel ?? 'mix') };
}

/**
 * The analysis of a file when its samples are not needed afterwards (the analyze command): the
 * channels are decoded into shared memory and the mix is written over channel 0 once the channel
 * tasks have read it (analyzeClipParallel's donateChannels), which spares a whole copy of the
 * source: 50 MiB for 5 minutes of stereo. A little slower than loadAndAnalyze, since the source
 * tasks wait for the channel tasks.
 */
export async function analyzeFile(file: string, io: CliIo, opts: Omit<AnalyzeOptions, 'onProgress'> = {}): Promise<ClipAnalysis> {
  return (await decodeAndAnalyze(file, io, opts, true)).analysis;
}

async function decodeAndAnalyze(
  file: string,
  io: CliIo,
  opts: Omit<AnalyzeOptions, 'onProgress'>,
  giveUpSamples: boolean,
): Promise<{ clip: Awaited<ReturnType<typeof decodeAudioFile>>; analysis: ClipAnalysis; shared: Float32Array | null }> {
  const bar = progressBar(io, 'analysing');
  const worker = startAnalysisWorker();
  try {
    const source = giveUpSamples ? null : sharedSourceWriter(opts.channel ?? 'mix');
    const clip = await decodeAudioFile(resolve(io.cwd, file), {
      onProgress: (f) => bar.update(0.5 * f, 'decoding'),
      onFrames: source?.onFrames,
      sharedChannels: giveUpSamples,
    });
    if (opts.channel === 'right' && clip.channels.length < 2) {
      throw new InputError('bad-arguments', `--channel right asked of a mono file (${file}); use --channel mix or left`);
    }
    const shared = source?.source() ?? null;
    const analysis = await analyzeClipParallel(clip, {
      ...opts,
      worker,
      sharedSource: shared ?? undefined,
      donateChannels: giveUpSamples,
      onProgress: (f, stage) => bar.update(0.5 + 0.5 * f, stage),
    });
    return { clip, analysis, shared: shared !== null && matchesModulationSource(clip, opts.channel ?? 'mix', shared) ? shared : null };
  } finally {
    void worker.terminate();
    bar.done();
  }
}

const db = (x: number | null, digits = 1) => (x === null ? '-inf' : x.toFixed(digits));

/** The readable table of an analysis summary. */
export function formatAnalysis(file: string, s: AnalysisSummary): string {
  const rows: [string, string][] = [
    ['file', file],
    ['format', `${s.sampleRate} Hz, ${s.channels} channel${s.channels === 1 ? '' : 's'}, ${s.durationS.toFixed(2)} s`],
    ['sample peak', `${db(s.level.samplePeakDbfs, 2)} dBFS`],
    ['true peak', `${db(s.level.truePeakDbtp, 2)} dBTP`],
    ['RMS', `${db(s.level.rmsDbfs, 2)} dBFS (full-scale sine = -3.01)`],
    ['crest factor', `${db(s.level.crestDb, 2)} dB`],
    ['DC offset', `${(s.level.dcOffset * 100).toFixed(4)} % of full scale`],
    ['clipped samples', `${s.level.clippedSamples} in ${s.level.clippedRuns} runs`],
    ['near silence', `${(s.level.nearSilenceFraction * 100).toFixed(1)} % of the time`],
    ['integrated loudness', `${db(s.loudness.integratedLufs)} LUFS`],
    ['loudness range', `${s.loudness.loudnessRangeLu.toFixed(1)} LU`],
    ['max momentary', `${db(s.loudness.maxMomentaryLufs)} LUFS`],
    ['max short-term', `${db(s.loudness.maxShortTermLufs)} LUFS`],
    ['modulation source', `${s.modulationChannel}: peak ${db(s.level.modulation.samplePeakDbfs, 2)} dBFS, RMS ${db(s.level.modulation.rmsDbfs, 2)} dBFS, crest ${db(s.level.modulation.crestDb, 2)} dB`],
    ['spectral centroid', s.spectrum.centroidHz === null ? 'n/a' : `${s.spectrum.centroidHz.toFixed(0)} Hz`],
    ['95 % roll-off', s.spectrum.rolloff95Hz === null ? 'n/a' : `${s.spectrum.rolloff95Hz.toFixed(0)} Hz`],
    ['dominant frequency', s.spectrum.dominantHz === null ? 'n/a' : `${s.spectrum.dominantHz.toFixed(1)} Hz`],
    ['median pitch', s.spectrum.pitchMedianHz === null ? 'none found' : `${s.spectrum.pitchMedianHz.toFixed(1)} Hz (${(s.spectrum.voicedFraction * 100).toFixed(0)} % of frames pitched)`],
  ];
  for (const b of s.spectrum.bands) {
    rows.push([`  ${b.name} ${b.lowHz}-${b.highHz} Hz`, `${(b.fraction * 100).toFixed(1)} % of energy`]);
  }
  return alignRows(rows).join('\n') + '\n';
}

export const analyzeCommand: Command = {
  usage: USAGE,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(
      argv,
      { json: { type: 'boolean' }, channel: { type: 'string' }, 'frame-ms': { type: 'string' } },
      USAGE,
    );
    if (positionals.length !== 1) throw new InputError('bad-arguments', `give exactly one audio file. Usage: ${USAGE}`);
    const channel: ModulationChannel = choiceFlag(values.channel, 'channel', CHANNELS) ?? 'mix';
    const frameMs = numberFlag(values['frame-ms'], 'frame-ms', { min: 0.1, max: 1000 }) ?? 1;
    const analysis = await analyzeFile(positionals[0], io, { channel, frameS: frameMs / 1000 });
    const summary = summarizeAnalysis(analysis);
    io.out(values.json ? JSON.stringify(summary, null, 2) + '\n' : formatAnalysis(positionals[0], summary));
    return 0;
  },
};
