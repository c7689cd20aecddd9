/**
 * Decoding and analysing a clip file: the one way the command line and the server do it.
 * The file is analysed in one pass as it is decoded, on both cores, without the clip ever being
 * held whole (server/analysis/analyze-stream.ts), and the result is the one
 * shared/analysis/analyze-clip.ts's analyzeClip gives on the whole clip, which the browser runs as is.
 */
import type { AnalyzeOptions, ClipAnalysis } from '../../shared/analysis/analyze-clip.ts';
import { type AnalysisSummary, summarizeAnalysis } from '../../shared/analysis/summary.ts';
import type { PulseEvents } from '../../shared/plan/pulse-train.ts';
import { analyzeFileStream } from '../analysis/analyze-stream.ts';
import { ZeroCrossingStream } from '../render/plan-reducer.ts';

/** Analysis settings plus a progress callback: fraction 0…1 of the whole job and the stage's name. */
export type AnalyzeFileOptions = Omit<AnalyzeOptions, 'onProgress'> & {
  onProgress?: (fraction: number, stage: string) => void;
};

/** A clip's analysis and the zero-crossing pulse candidates of its modulation source. */
export interface LoadedClip {
  analysis: ClipAnalysis;
  /** zeroCrossingEvents of the modulation source (shared/plan/pulse-train.ts), gathered as it streamed past. */
  pulseEvents: PulseEvents;
}

/**
 * Decodes a file (absolute path) and analyses it (the server's analysis job), gathering the
 * zero-crossing pulse candidates of the modulation source in the same pass, so the source need
 * not be kept or mixed again.
 */
export async function loadAndAnalyze(path: string, opts: AnalyzeFileOptions = {}): Promise<LoadedClip> {
  let crossings: ZeroCrossingStream | null = null;
  const { analysis } = await analyzeFileStream(path, {
    ...opts,
    sourceReducer: (shape) => {
      const z = (crossings = new ZeroCrossingStream(shape.sampleRate));
      return (block) => z.add(block);
    },
  });
  return { analysis, pulseEvents: (crossings ?? new ZeroCrossingStream(analysis.sampleRate)).result() };
}

/** The analysis of a file (the analyze command). */
export async function analyzeFile(path: string, opts: AnalyzeFileOptions = {}): Promise<ClipAnalysis> {
  return (await analyzeFileStream(path, opts)).analysis;
}

/** The analysis as a person or a program reads it: `coilcue analyze --json` and the API's analysis result. */
export function analysisDocument(analysis: ClipAnalysis): AnalysisSummary {
  return summarizeAnalysis(analysis);
}
