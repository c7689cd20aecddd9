/**
 * The clip analysis on both cores: the same ClipAnalysis as analyzeClip (shared/analysis), with the
 * tasks of shared/analysis/tasks.ts shared between this thread and one `worker_threads` worker.
 *
 * How the work is shared. The modulation source goes in shared memory, so the worker reads it
 * without a copy of its own: made while decoding (shared-source.ts; the caller passes it as
 * `sharedSource`), or else written here (the mix straight into a SharedArrayBuffer, a single
 * channel copied into one unless it is there already). The tasks sit in one list and each thread
 * takes the next one whenever it is free, with an atomic increment of a shared counter, so each
 * runs exactly once (greedy list scheduling; longest first is within 4/3 of the best split on two
 * processors: R. L. Graham, "Bounds on multiprocessing timing anomalies", SIAM J. Appl. Math.
 * 17(2), 1969). The channel tasks (levels, true peak, loudness) read every channel, so they run
 * here, first, while the worker starts on the source tasks, longest first; this thread then joins
 * in. Channels that a caller put in shared memory put the channel tasks in the list too, ahead of
 * the source tasks, which then wait for the source (a flag in shared memory). The decoder leaves
 * channels in ordinary memory: Web Audio's copyToChannel refuses shared memory, and the render
 * hands the channels to it. Each task's output is the same whichever thread computed it (the same
 * code on the same samples), so the result equals analyzeClip's exactly.
 *
 * A caller that will not read the samples again can give them up (`donateChannels`): the mix is then
 * written over channel 0 once every channel task has read it, rather than into an array of its own,
 * and the source tasks wait for it. The clip's samples then take 4 bytes per frame less memory;
 * the two threads lose the time one of them waits for the other's last channel task.
 *
 * Failure: if the worker cannot start, dies, or a task throws in it, this thread runs whatever it
 * did not deliver. If a task throws here (samples analyzeClip would refuse too, such as NaN), the
 * analysis is redone by analyzeClip, so the caller gets the very error analyzeClip throws first.
 * The worker is terminated when the analysis ends, however it ends.
 *
 * Starting a worker costs 0.15–0.3 s (a V8 isolate, tsx, loading the DSP modules): start it with
 * startAnalysisWorker() (or prestartAnalysisWorker(), worker-handle.ts) before decoding and pass it
 * in, so that time overlaps the decoding.
 */
import {
  type AnalyzeOptions,
  type AnalyzeSettings,
  type ClipAnalysis,
  analyzeClip,
  combineAnalysis,
  resolveAnalyzeSettings,
  shapeOf,
} from '../../shared/analysis/analyze-clip.ts';
import {
  type AnalysisTask,
  CHANNEL_TASKS,
  type SourceTask,
  type SourceTaskSettings,
  type TaskOutputs,
  channelFigures,
  runChannelTask,
  runSourceTask,
  sourceIsTheClip,
} from '../../shared/analysis/tasks.ts';
import type { AudioClip } from '../../shared/audio/clip.ts';
import { matchesModulationSource, writeModulationSource } from './shared-source.ts';
import { type AnalysisWorker, startAnalysisWorker } from './worker-handle.ts';
import { epochMs } from './worker-tasks.ts';

export { AnalysisWorker, prestartAnalysisWorker, startAnalysisWorker } from './worker-handle.ts';

/**
 * Tasks in the order they are taken. Measured on a 5-minute 44.1 kHz stereo clip on the project
 * machine, each task's first run in a fresh process (ms; ±30 % from run to run, and up to 1.5×
 * more while both cores are busy): spectrum with the spectrogram 330–480, pitch 210–300, frames
 * with envelopes and histogram 160–220, loudness 120–150, true peak 85–150, levels 40–65, source
 * levels 30–50, writing the mix 40–120. The channel tasks come first: the worker can run them while
 * this thread writes the mix, which the source tasks wait for; then the longest first (Graham 1969).
 */
const ORDER_ALL: readonly AnalysisTask[] = ['loudness', 'true peak', 'spectrum', 'pitch', 'levels', 'frames', 'source levels'];
/** The same without the channel tasks, for channels the worker cannot read (not in shared memory). */
const ORDER_SOURCE: readonly AnalysisTask[] = ORDER_ALL.filter((t) => !(CHANNEL_TASKS as readonly string[]).includes(t));
/**
 * For donated channels: every channel task before any source task, since the source (written over
 * channel 0) exists only once they are all done; a thread that reaches a source task then knows each
 * channel task has been claimed.
 */
const ORDER_DONATED: readonly AnalysisTask[] = [...ORDER_ALL.filter((t) => !ORDER_SOURCE.includes(t)), ...ORDER_SOURCE];

/** When and where one task ran, epoch milliseconds (for benchmarks). 'mix' is making the shared source. */
export interface TaskTiming {
  task: AnalysisTask | 'mix';
  thread: 'main' | 'worker';
  startMs: number;
  endMs: number;
}

/** analyzeClip's options, and what the two threads need besides. */
export interface ParallelAnalyzeOptions extends AnalyzeOptions {
  /** A worker from startAnalysisWorker(), started early; analyzeClipParallel terminates it. Default: one started here. */
  worker?: AnalysisWorker;
  /**
   * The modulation source in shared memory, made while decoding (shared-source.ts,
   * sharedSourceWriter), so the worker can start at once. Checked (matchesModulationSource) and
   * ignored if it does not fit; default: written here.
   */
  sharedSource?: Float32Array;
  /** Called as each task finishes (worker tasks when their output arrives), with where and when it ran. */
  onTask?: (t: TaskTiming) => void;
  /**
   * The caller gives up the clip's samples: when the source is the mix of several channels and the
   * channels are in shared memory (decodeAudioFile's `sharedChannels`), the mix is written over
   * channel 0 once the channel tasks have read it, instead of into an array of its own: 4 bytes less
   * per frame (50 MiB for 5 minutes of 44.1 kHz stereo). Afterwards channel 0 may hold the mix: the
   * caller must not read the clip's samples again. Default false.
   */
  donateChannels?: boolean;
  /**
   * Called once the analysis is done with the modulation source it read (in shared memory: the
   * clip's own channel, channel 0 holding the mix when donated, or an array of its own), so a
   * caller that needs the source afterwards (the server's pulse candidates) need not mix again.
   * Not called when the analysis falls back to analyzeClip (module comment).
   */
  onSource?: (source: Float32Array) => void;
}

const isChannelTask = (t: AnalysisTask): boolean => (CHANNEL_TASKS as readonly string[]).includes(t);

const sourceSettings = (s: AnalyzeSettings): SourceTaskSettings => ({
  frameS: s.frameS,
  attackS: s.attackS,
  releaseS: s.releaseS,
  rmsWindowS: s.rmsWindowS,
  fftSize: s.fftSize,
  bands: s.bands,
});

/**
 * analyzeClip on two threads (module comment): resolves to the same ClipAnalysis, or rejects with
 * the same RangeError. `onProgress` gets (tasks done / tasks, name of the task starting here or
 * finished in the worker), non-decreasing, then (1, 'done'); `onTask` the timing of each task.
 *
 * @example const a = await analyzeClipParallel(clip, { channel: 'mix' }); a.loudness.integratedLufs
 */
export async function analyzeClipParallel(clip: AudioClip, opts: ParallelAnalyzeOptions = {}): Promise<ClipAnalysis> {
  let worker: AnalysisWorker | undefined = opts.worker;
  try {
    const s = resolveAnalyzeSettings(clip, opts);
    worker ??= startAnalysisWorker();
    const state: DonationState = { overwritten: false };
    try {
      return await analyzeShared(clip, s, worker, opts, state);
    } catch (e) {
      // A task threw (bad samples from a caller, such as NaN): several tasks may notice, in any
      // order here; analyzeClip's order decides which error the caller sees, so let it throw that.
      // Once channel 0 holds the mix the clip is no longer there to redo: the channel tasks all
      // passed, so the samples were sound and the error is passed on as it is.
      void worker.terminate();
      if (state.overwritten) throw e;
      return analyzeClip(clip, { ...opts, onProgress: undefined });
    }
  } finally {
    void worker?.terminate();
  }
}

/** Set once a donated channel 0 has been overwritten with the mix. */
interface DonationState {
  overwritten: boolean;
}

async function analyzeShared(
  clip: AudioClip,
  s: AnalyzeSettings,
  worker: AnalysisWorker,
  opts: ParallelAnalyzeOptions,
  state: DonationState,
): Promise<ClipAnalysis> {
  const fs = clip.sampleRate;
  const settings = sourceSettings(s);
  const useWorker = worker.available;
  const n = clip.channels[0].length;
  const channelsShared = useWorker && clip.channels.every((c) => c.buffer instanceof SharedArrayBuffer);
  const single = s.channel === 'left' || clip.channels.length === 1 ? clip.channels[0] : s.channel === 'right' ? clip.channels[1] : null;
  // The source in shared memory for the worker: the caller's, a channel already there, channel 0 once
  // the channel tasks are done with it (donated), or one to write.
  // (Without a worker, channel 0 is overwritten in place as well, shared or not.)
  const donated = opts.donateChannels === true && single === null && (channelsShared || !useWorker);
  let shared: Float32Array | null = null;
  let toWrite = donated;
  if (useWorker) {
    if (donated) shared = clip.channels[0];
    else if (opts.sharedSource && matchesModulationSource(clip, s.channel, opts.sharedSource)) shared = opts.sharedSource;
    else if (single?.buffer instanceof SharedArrayBuffer) shared = single;
    else {
      shared = new Float32Array(new SharedArrayBuffer(4 * n));
      toWrite = true;
    }
  }
  // The source as this thread reads it: the clip's own channel, else the mix (channel 0 when donated,
  // the shared one when there is one).
  const source = single ?? (donated ? clip.channels[0] : shared) ?? new Float32Array(n);
  const tasks = (donated && channelsShared ? ORDER_DONATED : channelsShared ? ORDER_ALL : ORDER_SOURCE).filter((t) => t !== 'source levels' || !sourceIsTheClip(clip, source));
  const mainOnly = channelsShared ? [] : CHANNEL_TASKS;
  const sync = new Int32Array(new SharedArrayBuffer(8));
  if (!toWrite) sync[1] = 1; // the source is ready
  const outputs: { [K in AnalysisTask]?: TaskOutputs[K] } = {};
  const failed = new Set<AnalysisTask>();
  const total = tasks.length + mainOnly.length;
  let done = 0;
  let lastFraction = 0;
  const progress = (stage: string) => {
    lastFraction = Math.max(lastFraction, done / total);
    opts.onProgress?.(lastFraction, stage);
  };
  // Resolves once every channel task has delivered or failed (checked as each reply arrives).
  let channelTasksSettled: () => void = () => undefined;
  const channelTasksDone = new Promise<void>((resolve) => (channelTasksSettled = resolve));
  const checkChannelTasks = () => {
    if (CHANNEL_TASKS.every((t) => outputs[t] !== undefined || failed.has(t))) channelTasksSettled();
  };
  const store = (task: AnalysisTask, output: unknown) => {
    (outputs as Record<string, unknown>)[task] = output;
    done++;
    checkChannelTasks();
  };

  let workerFinished: () => void = () => undefined;
  const finished = new Promise<void>((resolve) => (workerFinished = resolve));
  const accepted =
    shared !== null &&
    worker.submit({ sampleRate: fs, channels: channelsShared ? clip.channels : [], source: shared, settings, tasks: [...tasks], sync }, (m) => {
      if (m.type === 'result') {
        store(m.task, m.output);
        opts.onTask?.({ task: m.task, thread: 'worker', startMs: m.startMs, endMs: m.endMs });
        progress(m.task);
      } else if (m.type === 'failed') {
        failed.add(m.task); // left to this thread, which will meet the error itself
        checkChannelTasks();
      } else {
        workerFinished(); // 'done' or 'gone'
      }
    });
  if (!accepted) workerFinished();

  /** Writes the mix into `source` (over channel 0 when donated) and lets the worker read it. */
  const writeSource = () => {
    const t0 = epochMs();
    if (donated) state.overwritten = true;
    writeModulationSource(clip.channels, s.channel, source, 0, n);
    Atomics.store(sync, 1, 1);
    Atomics.notify(sync, 1);
    opts.onTask?.({ task: 'mix', thread: 'main', startMs: t0, endMs: epochMs() });
  };
  // the source, if not made already (the worker meanwhile runs channel tasks, or waits); then let the
  // worker read it. A donated channel is overwritten only once the channel tasks are done (below).
  if (!donated && (toWrite || (single === null && shared === null))) writeSource();

  const runHere = (task: AnalysisTask) => {
    progress(task);
    const a = epochMs();
    const out = isChannelTask(task)
      ? runChannelTask(task as (typeof CHANNEL_TASKS)[number], clip)
      : runSourceTask(task as SourceTask, source, fs, settings);
    opts.onTask?.({ task, thread: 'main', startMs: a, endMs: epochMs() });
    store(task, out);
  };
  for (const t of mainOnly) runHere(t);
  let sourceWritten = !donated;
  for (;;) {
    const i = Atomics.add(sync, 0, 1);
    if (i >= tasks.length) break;
    if (!sourceWritten && !isChannelTask(tasks[i])) {
      // Channel 0 becomes the mix: first every channel task must have read it (here or in the
      // worker; a worker that stopped or failed leaves its channel task to this thread).
      await Promise.race([channelTasksDone, finished]);
      for (const t of CHANNEL_TASKS) if (outputs[t] === undefined) runHere(t);
      writeSource();
      sourceWritten = true;
    }
    runHere(tasks[i]);
  }
  if (tasks.some((t) => outputs[t] === undefined)) await finished;
  // whatever the worker took but did not deliver (it died, or its task threw): run it here
  for (const t of tasks) if (outputs[t] === undefined) runHere(t);
  opts.onProgress?.(1, 'done');
  opts.onSource?.(source);
  const o = outputs as Required<TaskOutputs>;
  const part = channelFigures(s, o.levels, o['true peak'], o.loudness, outputs['source levels'], o.frames);
  return combineAnalysis(shapeOf(clip), s, part, { ...o.spectrum, pitch: o.pitch });
}
