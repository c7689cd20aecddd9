import { resolve } from 'node:path';
import type { AnalysisSummary } from '../../../shared/analysis/summary.ts';
import type { ModulationChannel } from '../../../shared/audio/clip.ts';
import { analysisDocument, analyzeFile } from '../../services/analysis.ts';
import type { Command } from '../io.ts';
import { ANALYZE_OPTIONS } from './tables.ts';
import { withProgress } from '../progress.ts';
import { alignRows } from '../format.ts';

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

export const analyzeCommand: Command<typeof ANALYZE_OPTIONS.options> = {
  options: ANALYZE_OPTIONS,
  async run({ values, positionals }, io) {
    const channel: ModulationChannel = values.channel;
    const frameMs = values['frame-ms'];
    const analysis = await withProgress(io, 'analysing', (onProgress) =>
      analyzeFile(resolve(io.cwd, positionals[0]), { channel, frameS: frameMs / 1000, onProgress }),
    );
    const summary = analysisDocument(analysis);
    io.out(values.json ? JSON.stringify(summary, null, 2) + '\n' : formatAnalysis(positionals[0], summary));
    return 0;
  },
};
