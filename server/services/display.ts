/**
 * Chart data of a stored analysis on the grid a display asks for (GET /api/analyses/:id/display):
 * the modulation source's envelope (frame minima and maxima, exact sample extremes) and RMS level
 * per column, the Welch spectrum and the display spectrogram, all from the reductions (no samples).
 */
import type { ClipAnalysis } from '../../shared/analysis/analyze-clip.ts';
import { frameStart } from '../../shared/dsp/frame-stats.ts';
import { finiteOrNull, powerToDb } from '../../shared/units.ts';

/** Most display columns when the client does not say. */
export const DEFAULT_DISPLAY_COLUMNS = 1000;

/**
 * The display grid over [fromS, toS] (clamped to the clip): column j covers whole analysis frames
 * from timeS[j]; peakMin/peakMax are the lowest and highest sample, linear full scale; rmsDbfs is
 * 10·log10 of the sample-weighted mean square (null for digital silence). The spectrum is the
 * Welch PSD in dB re 1 FS²/Hz; the spectrogram keeps its columns whose centre lies in the range,
 * at most `columns` of them (the highest value per row when several merge).
 */
export function displayOf(a: ClipAnalysis, columns: number, fromS?: number, toS?: number) {
  const f = a.frames;
  const from = Math.max(0, Math.min(fromS ?? 0, a.durationS));
  const to = Math.max(from, Math.min(toS ?? a.durationS, a.durationS));
  const k0 = Math.min(Math.max(0, f.count - 1), Math.floor(from / f.frameS));
  const k1 = Math.max(k0 + 1, Math.min(f.count, Math.ceil(to / f.frameS)));
  const per = Math.max(1, Math.ceil((k1 - k0) / columns));
  const timeS: number[] = [];
  const peakMin: number[] = [];
  const peakMax: number[] = [];
  const rmsDbfs: (number | null)[] = [];
  const spf = f.samplesPerFrame;
  for (let k = k0; k < k1; k += per) {
    const e = Math.min(k1, k + per);
    let lo = Infinity;
    let hi = -Infinity;
    let acc = 0;
    const s0 = frameStart(k, spf);
    let s = s0;
    for (let i = k; i < e; i++) {
      const end = i + 1 === f.count ? f.sampleCount : frameStart(i + 1, spf);
      if (f.min[i] < lo) lo = f.min[i];
      if (f.max[i] > hi) hi = f.max[i];
      acc += (end - s) * f.meanSquare[i];
      s = end;
    }
    timeS.push(s0 / f.sampleRate);
    peakMin.push(lo);
    peakMax.push(hi);
    rmsDbfs.push(s > s0 ? finiteOrNull(powerToDb(acc / (s - s0))) : null);
  }
  const w = a.spectrum.welch;
  const sg = a.spectrum.spectrogram;
  const inRange: number[] = [];
  for (let j = 0; j < sg.columns; j++) if (sg.timesS[j] >= from && sg.timesS[j] <= to) inRange.push(j);
  const sgPer = Math.max(1, Math.ceil(inRange.length / columns));
  const sgTime: number[] = [];
  const sgPower: number[][] = [];
  for (let c = 0; c < inRange.length; c += sgPer) {
    const group = inRange.slice(c, c + sgPer);
    const col: number[] = new Array(sg.rows).fill(-Infinity);
    for (const j of group) for (let r = 0; r < sg.rows; r++) col[r] = Math.max(col[r], sg.db[j * sg.rows + r]);
    sgTime.push(sg.timesS[group[0]]);
    sgPower.push(col);
  }
  return {
    fromS: timeS.length ? timeS[0] : from,
    toS: k1 === f.count ? f.sampleCount / f.sampleRate : frameStart(k1, spf) / f.sampleRate,
    timeS,
    peakMin,
    peakMax,
    rmsDbfs,
    spectrum: { freqHz: Array.from(w.frequencyHz), powerDb: Array.from(w.psd, (p) => (p > 0 ? powerToDb(p) : -400)) },
    spectrogram: { timeS: sgTime, freqHz: Array.from(sg.frequenciesHz), powerDb: sgPower },
  };
}
