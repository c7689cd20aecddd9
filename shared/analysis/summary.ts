/**
 * The JSON-safe summary of a clip analysis: scalar figures, band fractions and the pitch summary,
 * without the long series (frames, spectrogram), which stay in memory for the models and the UI.
 * JSON has no ±Infinity: levels of digital silence (−∞ dB) are written as null.
 */
import { finiteOrNull } from '../units.ts';
import type { ClipAnalysis, LevelFigures } from './analyze-clip.ts';

export interface LevelSummary {
  samplePeakDbfs: number | null;
  truePeakDbtp: number | null;
  rmsDbfs: number | null;
  crestDb: number | null;
  dcOffset: number;
  clippedSamples: number;
  clippedRuns: number;
  nearSilenceFraction: number;
}

export interface AnalysisSummary {
  sampleRate: number;
  channels: number;
  durationS: number;
  modulationChannel: string;
  level: LevelSummary & { perChannel: LevelSummary[]; modulation: LevelSummary };
  loudness: { integratedLufs: number | null; loudnessRangeLu: number; maxMomentaryLufs: number | null; maxShortTermLufs: number | null };
  spectrum: {
    centroidHz: number | null;
    rolloff95Hz: number | null;
    dominantHz: number | null;
    bands: { name: string; lowHz: number; highHz: number; fraction: number }[];
    pitchMedianHz: number | null;
    voicedFraction: number;
    welchSize: number;
    welchSegments: number;
  };
  frames: { frameS: number; count: number };
}

const levelSummary = (l: LevelFigures): LevelSummary => ({
  samplePeakDbfs: finiteOrNull(l.samplePeakDbfs),
  truePeakDbtp: finiteOrNull(l.truePeakDbtp),
  rmsDbfs: finiteOrNull(l.rmsDbfs),
  crestDb: finiteOrNull(l.crestDb),
  dcOffset: l.dcOffset,
  clippedSamples: l.clippedSamples,
  clippedRuns: l.clippedRuns,
  nearSilenceFraction: l.nearSilenceFraction,
});

/** Summary of `a` fit for JSON.stringify (module comment). */
export function summarizeAnalysis(a: ClipAnalysis): AnalysisSummary {
  const s = a.spectrum;
  return {
    sampleRate: a.sampleRate,
    channels: a.channels,
    durationS: a.durationS,
    modulationChannel: a.modulationChannel,
    level: {
      ...levelSummary(a.level),
      perChannel: a.level.perChannel.map(levelSummary),
      modulation: levelSummary(a.level.modulation),
    },
    loudness: {
      integratedLufs: finiteOrNull(a.loudness.integratedLufs),
      loudnessRangeLu: a.loudness.loudnessRangeLu,
      maxMomentaryLufs: finiteOrNull(a.loudness.maxMomentaryLufs),
      maxShortTermLufs: finiteOrNull(a.loudness.maxShortTermLufs),
    },
    spectrum: {
      centroidHz: s.centroidHz,
      rolloff95Hz: s.rolloff95Hz,
      dominantHz: s.dominantHz,
      bands: s.bands.map((b) => ({ name: b.name, lowHz: b.lowHz, highHz: b.highHz, fraction: b.fraction })),
      pitchMedianHz: s.pitch.medianHz,
      voicedFraction: s.pitch.voicedFraction,
      welchSize: s.welch.size,
      welchSegments: s.welch.segments,
    },
    frames: { frameS: a.frames.frameS, count: a.frames.count },
  };
}
