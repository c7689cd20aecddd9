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
import { type DecodedClip, decodeAudioFile } from '../audio/decode.ts';

/** Analysis settings plus a progress callback: fraction 0…1 of the whole job and the stage's name. */
export type AnalyzeFileOptions = Omit<AnalyzeOptions, 'onProgress'> & {
  onProgress?: (fraction: number, stage: string) => void;
};

/** A clip's analysis and the modulation source the analysis read. */
export interface LoadedClip {
  analysis: ClipAnalysis;
  /** modulationSource(clip, channel), bit for bit: later steps need not mix the channels again. */
  source: Float32Array;
}

/**
 * Decodes a file (absolute path) and analyses it on both cores, and keeps the modulation source
 * the analysis read (the server's analysis job takes its pulse candidates from it). The channels
 * are given up as in analyzeFile: decoded into shared memory, the mix then written over channel 0
 * (no array of its own: 4 bytes a frame less, and no fresh memory to fault in). Decoding is the
 * first half of the progress.
 */
export async function loadAndAnalyze(path: string, opts: AnalyzeFileOptions = {}): Promise<LoadedClip> {
  let read: Float32Array | null = null;
  const { clip, analysis } = await decodeAndAnalyze(path, opts, (s) => (read = s));
  // Without the source handed over (the analysis fell back to one thread, channels untouched) mix here.
  return { analysis, source: read ?? modulationSource(clip, opts.channel ?? 'mix') };
}

/**
 * The analysis of a file whose samples are not needed afterwards (the analyze command, the
 * server's analysis job): the channels are decoded into shared memory and the mix is written over
 * channel 0 once the channel tasks have read it (analyzeClipParallel's donateChannels), which
 * spares a whole copy of the source: 50 MiB for 5 minutes of stereo.
 */
export async function analyzeFile(path: string, opts: AnalyzeFileOptions = {}): Promise<ClipAnalysis> {
  return (await decodeAndAnalyze(path, opts)).analysis;
}

/** The analysis as a person or a program reads it: `coilcue analyze --json` and the API's analysis result. */
export function analysisDocument(analysis: ClipAnalysis): AnalysisSummary {
  return summarizeAnalysis(analysis);
}

async function decodeAndAnalyze(
  path: string,
  opts: AnalyzeFileOptions,
  onSource?: (source: Float32Array) => void,
): Promise<{ clip: DecodedClip; analysis: ClipAnalysis }> {
  const { onProgress, ...settings } = opts;
  const progress = onProgress ?? (() => {});
  const worker = startAnalysisWorker();
  try {
    const clip = await decodeAudioFile(path, {
      onProgress: (f) => progress(0.5 * f, 'decoding'),
      sharedChannels: true,
    });
    if (settings.channel === 'right' && clip.channels.length < 2) {
      throw new InputError('bad-channel', 'channel "right" asked of a mono file; choose the mix or the left channel', 'channel');
    }
    const analysis = await analyzeClipParallel(clip, {
      ...settings,
      worker,
      donateChannels: true,
      onSource,
      onProgress: (f, stage) => progress(0.5 + 0.5 * f, stage),
    });
    return { clip, analysis };
  } finally {
    void worker.terminate();
  }
}
