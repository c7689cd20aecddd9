/**
 * Decoding and analysing a clip file: the one way the command line and the server do it.
 * The analysis runs on both cores (server/analysis/analyze-parallel.ts) and gives the same result
 * as shared/analysis/analyze-clip.ts's analyzeClip, which the browser runs as is.
 */
import type { AnalyzeOptions, ClipAnalysis } from '../../shared/analysis/analyze-clip.ts';
import { type AnalysisSummary, summarizeAnalysis } from '../../shared/analysis/summary.ts';
import { modulationSource } from '../../shared/audio/clip.ts';
import { InputError } from '../../shared/errors.ts';
import { analyzeClipParallel, startAnalysisWorker } from '../analysis/analyze-parallel.ts';
import { matchesModulationSource, sharedSourceWriter } from '../analysis/shared-source.ts';
import { type DecodedClip, decodeAudioFile } from '../audio/decode.ts';

/** Analysis settings plus a progress callback: fraction 0…1 of the whole job and the stage's name. */
export type AnalyzeFileOptions = Omit<AnalyzeOptions, 'onProgress'> & {
  onProgress?: (fraction: number, stage: string) => void;
};

/** A decoded clip, its analysis and the modulation source the analysis read. */
export interface LoadedClip {
  clip: DecodedClip;
  analysis: ClipAnalysis;
  /** modulationSource(clip, channel), bit for bit: later steps need not mix the channels again. */
  source: Float32Array;
}

/**
 * Decodes a file (absolute path) and analyses it on both cores, keeping the samples for later
 * steps (plan, render, preview): the analysis worker starts before decoding, so its start-up
 * overlaps it, and the modulation source is written into shared memory block by block as the file
 * is decoded, so the worker starts on it at once. Decoding is the first half of the progress.
 */
export async function loadAndAnalyze(path: string, opts: AnalyzeFileOptions = {}): Promise<LoadedClip> {
  const { clip, analysis, shared } = await decodeAndAnalyze(path, opts, false);
  return { clip, analysis, source: shared ?? modulationSource(clip, opts.channel ?? 'mix') };
}

/**
 * The analysis of a file whose samples are not needed afterwards (the analyze command, the
 * server's analysis job): the channels are decoded into shared memory and the mix is written over
 * channel 0 once the channel tasks have read it (analyzeClipParallel's donateChannels), which
 * spares a whole copy of the source: 50 MiB for 5 minutes of stereo.
 */
export async function analyzeFile(path: string, opts: AnalyzeFileOptions = {}): Promise<ClipAnalysis> {
  return (await decodeAndAnalyze(path, opts, true)).analysis;
}

/** The analysis as a person or a program reads it: `coilcue analyze --json` and the API's analysis result. */
export function analysisDocument(analysis: ClipAnalysis): AnalysisSummary {
  return summarizeAnalysis(analysis);
}

async function decodeAndAnalyze(
  path: string,
  opts: AnalyzeFileOptions,
  giveUpSamples: boolean,
): Promise<{ clip: DecodedClip; analysis: ClipAnalysis; shared: Float32Array | null }> {
  const { onProgress, ...settings } = opts;
  const progress = onProgress ?? (() => {});
  const worker = startAnalysisWorker();
  try {
    const source = giveUpSamples ? null : sharedSourceWriter(settings.channel ?? 'mix');
    const clip = await decodeAudioFile(path, {
      onProgress: (f) => progress(0.5 * f, 'decoding'),
      onFrames: source?.onFrames,
      sharedChannels: giveUpSamples,
    });
    if (settings.channel === 'right' && clip.channels.length < 2) {
      throw new InputError('bad-channel', 'channel "right" asked of a mono file; choose the mix or the left channel', 'channel');
    }
    const shared = source?.source() ?? null;
    const analysis = await analyzeClipParallel(clip, {
      ...settings,
      worker,
      sharedSource: shared ?? undefined,
      donateChannels: giveUpSamples,
      onProgress: (f, stage) => progress(0.5 + 0.5 * f, stage),
    });
    return { clip, analysis, shared: shared !== null && matchesModulationSource(clip, settings.channel ?? 'mix', shared) ? shared : null };
  } finally {
    void worker.terminate();
  }
}
