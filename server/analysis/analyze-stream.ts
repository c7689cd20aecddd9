/**
 * A file's analysis in one pass as it is decoded, on both cores, without ever holding the clip:
 * the ClipAnalysis of analyzeClip (shared/analysis), exactly, in memory that does not grow with the
 * clip beyond its reductions (a 5-minute stereo clip decoded whole takes 106 MB).
 *
 * How the work is shared. decodeAudioFile hands over each block of frames as it is decoded (a WAV
 * file block by block; the compressed formats, decoded whole by their codec, in one block). This
 * thread mixes the block into the modulation source and feeds the channel part
 * (ChannelPartStream: the channels' levels, true peaks and loudness, the source's frame statistics,
 * envelopes and histogram), and copies the source block into a ring of shared slots
 * (sample-ring.ts) from which the analysis worker feeds the source part (SourcePartStream: the
 * source's own levels and true peak, Welch's spectrum, the display spectrogram, the pitch track).
 * The two parts take about the same time on the 5-minute benchmark clip (decoding included on
 * this side), so the threads finish together. Each stream carries its state across block
 * edges, so the figures are those of the whole clip, bit for bit (test/shared/analysis/stream.test.ts).
 *
 * Failure: on a machine with one core, or if the worker cannot start, the source part runs here,
 * block by block as well. If the worker dies or fails part-way, the samples it missed are gone, so
 * the analysis starts again here alone, reading the file again; an error the decoder or the channel
 * part meets (a damaged file) ends the analysis with that error. The worker is terminated when the
 * analysis ends, however it ends.
 */
import { combineAnalysis, settingsForShape } from '../../shared/analysis/analyze-clip.ts';
import { ChannelPartStream, type SourcePartFigures, SourcePartStream } from '../../shared/analysis/stream.ts';
import type { AnalyzeOptions, AnalyzeSettings, ClipAnalysis, ClipShape } from '../../shared/analysis/types.ts';
import { InputError } from '../../shared/errors.ts';
import { type DecodedClip, decodeAudioFile } from '../audio/decode.ts';
import { RingWriter } from '../services/sample-ring.ts';
import { writeModulationSource } from './modulation-source.ts';
import { AnalysisWorker, type Reply, startAnalysisWorker } from './worker-handle.ts';
import { type StreamJob, epochMs } from './worker-tasks.ts';

/** Longest piece of the source mixed and fed at once, frames (the WAV decoder's block of 16-bit stereo). */
const SOURCE_BLOCK = 1 << 18;

/** What analyzeFileStream reads besides analyzeClip's options. */
export interface StreamAnalyzeOptions extends Omit<AnalyzeOptions, 'onProgress'> {
  /** Fraction 0…1 of the whole job and the stage's name ('analysing' while decoding, then 'spectrum' while the worker ends, then 'done'). */
  onProgress?: (fraction: number, stage: string) => void;
  /** A worker from startAnalysisWorker(), started early; terminated here. Default: one started here. */
  worker?: AnalysisWorker;
  /**
   * For reductions a caller adds: called as each pass starts (a pass that failed is started again)
   * with the clip's shape, and returns what sees each block of the modulation source, in order
   * (the block is valid only during the call).
   */
  sourceReducer?: (shape: ClipShape) => (block: Float32Array) => void;
  /** Called with where the source part ran, and when (epoch ms), for the benchmark. */
  onSourcePart?: (where: 'worker' | 'main', startMs: number, endMs: number) => void;
}

/** The analysis and what was decoded (without samples). */
export interface StreamedAnalysis {
  analysis: ClipAnalysis;
  clip: Omit<DecodedClip, 'channels'> & { channelCount: number };
}

/** The worker's answer: the spectrum figures, or why there are none. */
type SourcePartReply = { ok: true; output: SourcePartFigures; startMs: number; endMs: number } | { ok: false; message: string };

/**
 * Decodes and analyses a file (absolute path) in one pass (module comment). The decoder's
 * InputErrors pass through; InputError `bad-channel` for the right channel of a mono file.
 *
 * @example const { analysis } = await analyzeFileStream('/clips/song.wav', { channel: 'mix' });
 */
export async function analyzeFileStream(path: string, opts: StreamAnalyzeOptions = {}): Promise<StreamedAnalysis> {
  const worker = opts.worker ?? startAnalysisWorker();
  const used = worker.available;
  try {
    const r = await onePass(path, opts, worker);
    if (r !== null) return r;
  } catch (e) {
    // Bad input (InputError, RangeError) is the file's fault: it would fail again. Anything else
    // with a worker involved (it stopped taking samples) is worth one more try alone.
    if (!used || e instanceof InputError || e instanceof RangeError) throw e;
  } finally {
    void worker.terminate();
  }
  // The worker stopped part-way: the source it did not see is gone, so start again on this thread.
  return (await onePass(path, opts, new AnalysisWorker(null)))!;
}

/** What one pass builds once the decoder has said how long the clip is. */
interface PassState {
  shape: ClipShape;
  s: AnalyzeSettings;
  part: ChannelPartStream;
  /** The source part here (no worker), or the ring to the worker and its answer. */
  local: SourcePartStream | null;
  ring: RingWriter | null;
  reply: Promise<SourcePartReply> | null;
  /** The worker stopped taking samples. */
  lost: boolean;
}

/** The source part in the worker: the job submitted and its answer, or null when the worker is not available. */
function submitSourcePart(worker: AnalysisWorker, job: StreamJob): Promise<SourcePartReply> | null {
  if (!worker.available) return null;
  return new Promise((resolve) => {
    const accepted = worker.submit(job, (m: Reply) => {
      if (m.type === 'source part') resolve({ ok: true, output: m.output, startMs: m.startMs, endMs: m.endMs });
      else if (m.type === 'stream failed') resolve({ ok: false, message: m.message });
      else if (m.type === 'gone') resolve({ ok: false, message: 'the analysis worker stopped' });
    });
    if (!accepted) resolve({ ok: false, message: 'the analysis worker was not available' });
  });
}

/** One decoding pass with both parts fed; null when the worker failed part-way (the caller starts again). */
async function onePass(path: string, opts: StreamAnalyzeOptions, worker: AnalysisWorker): Promise<StreamedAnalysis | null> {
  const progress = opts.onProgress ?? (() => undefined);
  const channel = opts.channel ?? 'mix';
  const pass: { st: PassState | null } = { st: null };
  let source = new Float32Array(0);
  let toCaller: ((block: Float32Array) => void) | undefined;

  const decoded = await decodeAudioFile(path, {
    discardSamples: true,
    onProgress: (f) => progress(0.97 * f, 'analysing'),
    onStart: (n, channels, sampleRate) => {
      if (channel === 'right' && channels < 2) {
        throw new InputError('bad-channel', 'channel "right" asked of a mono file; choose the mix or the left channel', 'channel');
      }
      const shape = { sampleCount: n, channelCount: channels, sampleRate };
      const s = settingsForShape(shape, opts);
      const { channel: _c, ...settings } = s;
      const separate = channels > 1; // a mono clip's only channel: its levels are the clip's
      const ring = worker.available ? new RingWriter() : null;
      const reply = ring && submitSourcePart(worker, { type: 'stream', sampleCount: n, sampleRate, settings, separate, ring: ring.ring });
      pass.st = {
        shape,
        s,
        part: new ChannelPartStream(shape, s),
        local: reply ? null : new SourcePartStream(n, sampleRate, settings, separate),
        ring: reply ? ring : null,
        reply,
        lost: false,
      };
      toCaller = opts.sourceReducer?.(shape);
    },
    onFrames: (chs, from, to) => {
      const st = pass.st!;
      // The blocks arrive as frames 0…len−1 of block-long arrays (a WAV file), or decoded whole as
      // the whole clip (the compressed formats): that is fed in pieces of SOURCE_BLOCK frames, so
      // the source is never mixed whole beside the decoded channels.
      const len = to - from;
      for (let at = 0; at < len; at += SOURCE_BLOCK) {
        const n = Math.min(SOURCE_BLOCK, len - at);
        const piece = at === 0 && n === len ? chs : chs.map((c) => c.subarray(at, at + n));
        if (source.length < n) source = new Float32Array(n);
        writeModulationSource(piece, channel, source, 0, n);
        const block = source.subarray(0, n);
        st.part.add(piece, n, block);
        if (st.ring !== null && !st.lost) st.lost = !st.ring.add(block, n);
        st.local?.add(block, n);
        toCaller?.(block);
      }
    },
  });
  const st = pass.st;
  if (st === null) throw new Error('analyzeFileStream: the decoder handed over no samples');
  let sourcePart: SourcePartFigures;
  if (st.ring !== null && st.reply !== null) {
    progress(0.97, 'spectrum');
    st.ring.end();
    const got = await st.reply;
    if (!got.ok) return null;
    opts.onSourcePart?.('worker', got.startMs, got.endMs);
    sourcePart = got.output;
  } else {
    const t0 = epochMs();
    sourcePart = st.local!.result();
    opts.onSourcePart?.('main', t0, epochMs());
  }
  const analysis = combineAnalysis(st.shape, st.s, st.part.result(sourcePart.levels), sourcePart.spectrum);
  progress(1, 'done');
  const { channels, ...rest } = decoded;
  return { analysis, clip: { ...rest, channelCount: channels.length } };
}
