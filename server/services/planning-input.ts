/**
 * Reading a clip for planning only (plan, render, preview, the server's plans): the file is decoded
 * block by block and reduced as it arrives to what the planner reads (frame statistics, histogram,
 * pulse candidates, the averaged spectrum), giving the modulation source only when asked: for a
 * WAV file as a reader of the file (server/render/wav-source.ts, read again for each pass), so
 * that the source is never whole in memory; for FLAC, Ogg Vorbis and MP3 (decoded whole by the
 * decoder anyway) as the decoded source kept in memory. Apart from ./analysis.ts so that the
 * analyze command does not load the planner.
 */
import { PITCH_HOP_S, PITCH_MAX_HZ } from '../../shared/analysis/tasks.ts';
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import type { PitchTrack } from '../../shared/dsp/pitch.ts';
import { yinPitchTrack } from '../../shared/dsp/pitch.ts';
import { type WelchSpectrum, welchPsd } from '../../shared/dsp/welch.ts';
import { InputError } from '../../shared/errors.ts';
import type { PlanClip } from '../../shared/plan/evaluate.ts';
import { type PulseSource, toPlanClip } from '../../shared/plan/plan-clip.ts';
import { writeModulationSource } from '../analysis/modulation-source.ts';
import { type SampleBlocks, arraySamples } from '../../shared/preview/sample-blocks.ts';
import { type DecodedClip, decodeAudioFile } from '../audio/decode.ts';
import { PlanReducer } from '../render/closed-loop.ts';
import { RENDER_BLOCK } from '../render/block-render.ts';
import { openWavSource } from '../render/wav-source.ts';
import { ReductionThread } from './reduction-thread.ts';

/** A decoded file's description without its samples. */
export type ClipInfo = Omit<DecodedClip, 'channels'> & { channelCount: number; sampleCount: number };

/** What planning reads of a clip besides its reductions: the averaged spectrum (pre-emphasis advice) and, for pitch-locked pulses, the pitch track. */
export interface PlanningAnalysis {
  sampleRate: number;
  channels: number;
  sampleCount: number;
  durationS: number;
  modulationChannel: ModulationChannel;
  /** Welch's averaged spectrum (null when not asked for: the preview needs none) and the pitch track (pitch-locked pulses). */
  spectrum: { welch: WelchSpectrum | null; pitch: PitchTrack | null };
}

/** A clip reduced to what planning needs, and its modulation source when asked for. */
export interface PlanningInput {
  clip: ClipInfo;
  analysis: PlanningAnalysis;
  planClip: PlanClip;
  /**
   * modulationSource(clip, channel) block by block when `keepSource` was asked for (render,
   * preview), else null: a WAV file read again (close it when done), or the decoded source.
   */
  source: SampleBlocks | null;
}

/**
 * Decodes a file (absolute path) and reduces it to what planning needs, in one pass as the file is
 * read: a WAV file's channels are never held whole (decodeAudioFile's `discardSamples`); each block
 * is mixed into the modulation source and reduced at once (PlanReducer: 1 ms frame statistics,
 * magnitude histogram, zero-crossing pulse candidates for the pulse scheme; WelchStream: Welch's
 * averaged spectrum, the analysis's own within rounding; skipped with `spectrum: false`). With
 * `keepSource` (render and preview) the source is handed back as SampleBlocks: a reader of the WAV
 * file (opened before the decoding and checked to be the same file after it), or, for the
 * compressed formats and clips too short to stream, the source kept whole. It is kept whole too for
 * pitch-locked pulses (the pitch track reads it); otherwise planning holds one block of it and the
 * reductions.
 * The planner's figures equal those built from the full analysis (toPlanClip). InputError
 * `bad-channel` for the right channel of a mono file; the decoder's InputErrors pass through.
 *
 * @example const { planClip } = await loadForPlanning('/clips/song.wav', { name: 'song.wav', pulses: false })
 */
export async function loadForPlanning(
  path: string,
  o: {
    name: string;
    /** The driver uses the pulse scheme: pulse candidates are needed. */
    pulses: boolean;
    channel?: ModulationChannel;
    pulseSource?: PulseSource;
    keepSource?: boolean;
    /** Welch's averaged spectrum (default true; render's pre-emphasis advice reads it). */
    spectrum?: boolean;
    fftSize?: number;
    onProgress?: (fraction: number, stage: string) => void;
  },
): Promise<PlanningInput> {
  const channel = o.channel ?? 'mix';
  const pulseSource = o.pulseSource ?? 'zero-crossing';
  const progress = o.onProgress ?? (() => {});
  const size = o.fftSize ?? 4096;
  const pitchLocked = o.pulses && pulseSource === 'pitch-locked';
  const wantSpectrum = o.spectrum ?? true;
  // A WAV file is read again for each pass of the render and the preview instead of being kept.
  const file = o.keepSource ? openWavSource(path, channel, RENDER_BLOCK) : null;
  // Welch's spectrum on the second core, its thread loading while the file is opened and decoded.
  const offThread = wantSpectrum ? new ReductionThread<WelchSpectrum>() : null;
  try {
    return await load();
  } catch (e) {
    file?.close();
    offThread?.close();
    throw e;
  }

  /** The decoding and the reductions (the body of loadForPlanning, with `file` closed by the caller on error). */
  async function load(): Promise<PlanningInput> {
    let reducer: PlanReducer | null = null;
    /** Welch's spectrum block by block on the other thread; null when the source is kept whole (computed at the end) or no spectrum is wanted. */
    let welch: ReductionThread<WelchSpectrum> | null = null;
    /** The whole source (kept when asked for, for the pitch track, or when too short to stream Welch), else one block. */
    let source = new Float32Array(0);
    let whole = false;
    let at = 0;
    const decoded = await decodeAudioFile(path, {
      discardSamples: true,
      onProgress: (f) => progress(0.9 * f, 'decoding'),
      onStart: (n, channels, fs) => {
        if (channel === 'right' && channels < 2) {
          throw new InputError('bad-channel', 'channel "right" asked of a mono file; choose the mix or the left channel', 'channel');
        }
        whole = (o.keepSource === true && file === null) || pitchLocked || (wantSpectrum && n < 4 * size);
        source = new Float32Array(whole ? n : 0);
        reducer = new PlanReducer(n, fs, o.pulses && pulseSource === 'zero-crossing');
        if (!whole && offThread) {
          welch = offThread;
          welch.start({ kind: 'welch', sampleRate: fs, size });
        } else offThread?.close();
        at = 0;
      },
      onFrames: (chs, from, to) => {
        const len = to - from;
        if (!whole && source.length < len) source = new Float32Array(len);
        // the block lands at `at` in a whole source, at 0 in a block buffer
        const base = whole ? at : 0;
        writeModulationSource(chs, channel, source.subarray(base - from), from, to);
        const block = source.subarray(base, base + len);
        welch?.add(block); // copied into the other thread's ring first, so the two threads overlap
        reducer!.add(block);
        at += len;
      },
    });
    const fs = decoded.sampleRate;
    const n = at;
    progress(0.9, 'spectrum');
    const spectrum = !wantSpectrum ? null : welch !== null ? await (welch as ReductionThread<WelchSpectrum>).result() : welchPsd(source, fs, { size });
    const frames = reducer!.result(o.name);
    let pitch: PitchTrack | null = null;
    let planClip = frames;
    if (pitchLocked) {
      progress(0.95, 'pitch');
      pitch = yinPitchTrack(source, fs, { hopS: PITCH_HOP_S, maxHz: Math.min(PITCH_MAX_HZ, fs / 4) });
      planClip = toPlanClip(o.name, { durationS: frames.durationS, sampleRate: fs, frames: frames.frames, histogram: frames.histogram, spectrum: { pitch } }, source, { scheme: 'pulse' }, 'pitch-locked');
    }
    const welchSpectrum = spectrum;
    progress(1, 'done');
    const { channels, ...rest } = decoded;
    const analysis: PlanningAnalysis = { sampleRate: fs, channels: channels.length, sampleCount: n, durationS: n / fs, modulationChannel: channel, spectrum: { welch: welchSpectrum, pitch } };
    let kept: SampleBlocks | null = null;
    if (o.keepSource) {
      if (file !== null && !whole) {
        // the file read again must be the one just decoded
        file.reader.checkUnchanged();
        if (file.length !== n || file.reader.channelCount !== channels.length || file.reader.sampleRate !== fs) {
          throw new InputError('changed', `${path} changed while it was being read; leave the file alone while coilcue works and try again`);
        }
        kept = file;
      } else {
        file?.close();
        kept = arraySamples(source);
      }
    }
    return { clip: { ...rest, channelCount: channels.length, sampleCount: n }, analysis, planClip, source: kept };
  }
}
