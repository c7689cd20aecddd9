/**
 * A stream of samples reduced on the second core while this thread produces it: Welch's averaged
 * spectrum of a clip being decoded for planning (the transforms are about a quarter of a plan's
 * work), the closed loop's reductions of a render being written. The samples go through a ring of
 * a few shared slots (sample-ring.ts), allocated once, so memory stays bounded even when this
 * thread never yields (a render is one synchronous loop). The result equals the same reducer's in this thread bit for bit: the
 * same code on the same samples in the same order (the reducers carry their state across blocks,
 * so where the blocks are cut does not matter).
 *
 * On a machine with one core, or where the thread cannot start, the reducer runs here.
 *
 * @example
 * const t = new ReductionThread<WelchSpectrum>(); // early: the thread loads meanwhile
 * t.start({ kind: 'welch', sampleRate: 44100, size: 4096 });
 * t.add(samples); // any length, as often as needed
 * const spectrum = await t.result();
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { type ReductionKind, type ReductionReply, type ReductionRequest, streamReducer } from './reduction-serve.ts';
import { RingWriter, type StreamReducer } from './sample-ring.ts';

const ENTRY = new URL('./reduction-thread.cjs', import.meta.url);

export class ReductionThread<R> {
  private worker: Worker | null = null;
  private local: StreamReducer | null = null;
  private ring: RingWriter | null = null;
  private reply: ReductionReply | null = null;
  private settle: ((r: ReductionReply) => void) | null = null;

  /** `threads`: false to reduce in this thread (tests; a machine with one core does so anyway). */
  constructor(threads = availableParallelism() > 1) {
    if (!threads) return;
    try {
      // Small young generation, as the analysis worker: it allocates few objects.
      this.worker = new Worker(ENTRY, { resourceLimits: { maxYoungGenerationSizeMb: 2 } });
    } catch {
      return;
    }
    this.worker.unref(); // until it has work, it does not keep the process alive
    this.worker.on('message', (m: ReductionReply) => {
      if (m.type !== 'ready') this.finish(m);
    });
    this.worker.on('error', (e) => this.finish({ type: 'failed', message: e.message, range: false }));
    this.worker.on('exit', () => this.finish({ type: 'failed', message: 'the reduction thread exited', range: false }));
  }

  private finish(r: ReductionReply): void {
    if (this.reply) return;
    this.reply = r;
    this.settle?.(r);
  }

  /** What to reduce the samples to: call once, before the first samples. */
  start(reduce: ReductionKind): void {
    if (!this.worker) {
      this.local = streamReducer(reduce);
      return;
    }
    this.ring = new RingWriter();
    this.worker.ref();
    this.worker.postMessage({ type: 'start', reduce, ring: this.ring.ring } satisfies ReductionRequest);
  }

  /** Adds samples (in stream order); they are copied into the ring, so `x` may be reused at once. */
  add(x: Float32Array): void {
    if (this.local) this.local.add(x);
    else this.ring?.add(x);
  }

  /** Forgets every sample so far (a render pass that the next replaces). */
  restart(): void {
    if (this.local) this.local.restart();
    else this.ring?.restart();
  }

  /** The result over every sample added; the thread ends. The reducer's RangeError passes through (too few samples). */
  async result(): Promise<R> {
    if (this.local) return this.local.result() as R;
    if (!this.ring) throw new Error('ReductionThread.result: start() was not called');
    this.ring.end();
    const r = this.reply ?? (await new Promise<ReductionReply>((resolve) => (this.settle = resolve)));
    void this.worker!.terminate();
    if (r.type === 'result') return r.value as R;
    if (r.type === 'failed') throw r.range ? new RangeError(r.message) : new Error(`reduction thread: ${r.message}`);
    throw new Error('reduction thread: no result');
  }

  /** Stops the thread without a result (the work failed or needs none). */
  close(): void {
    void this.worker?.terminate();
  }
}
