/**
 * A stream of samples reduced on the second core while this thread produces it: Welch's averaged
 * spectrum of a clip being decoded for planning (the transforms are about a quarter of a plan's
 * work), the closed loop's reductions of a render being written. The samples go through a ring of
 * a few shared slots (reduction-serve.ts), allocated once: nothing is copied whole, no fresh memory
 * is touched per block (~3 ms/MB on the project machine), and a producer that outruns the thread
 * waits for a free slot, so memory stays bounded even when this thread never yields (a render is
 * one synchronous loop). The result equals the same reducer's in this thread bit for bit: the
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
import { END, HEAD, LEN, RESTART, type ReductionKind, type ReductionReply, type ReductionRequest, type Ring, STOPPED, type StreamReducer, TAIL, streamReducer } from './reduction-serve.ts';

const ENTRY = new URL('./reduction-thread.cjs', import.meta.url);
/** Slots of the ring and samples a slot holds: 16 × 64 Ki samples, 4 MiB in all (room for the other thread to fall behind for a moment). */
const SLOTS = 16;
const SLOT_SAMPLES = 1 << 16;
/** How long the producer waits for a free slot before it takes the thread for dead, ms. */
const STALL_MS = 20_000;

export class ReductionThread<R> {
  private worker: Worker | null = null;
  private local: StreamReducer | null = null;
  private ring: Ring | null = null;
  private control: Int32Array<ArrayBufferLike> = new Int32Array(0);
  private slots: Float32Array<ArrayBufferLike> = new Float32Array(0);
  private head = 0;
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
    const ring: Ring = { control: new SharedArrayBuffer(4 * (LEN + SLOTS)), slots: new SharedArrayBuffer(4 * SLOTS * SLOT_SAMPLES), slotCount: SLOTS, slotSamples: SLOT_SAMPLES };
    this.ring = ring;
    this.control = new Int32Array(ring.control);
    this.slots = new Float32Array(ring.slots);
    this.worker.ref();
    this.worker.postMessage({ type: 'start', reduce, ring } satisfies ReductionRequest);
  }

  /** Waits for a free slot and claims it; false when the thread has stopped (its failure shows in result()). */
  private claim(): boolean {
    const deadline = Date.now() + STALL_MS;
    for (;;) {
      if (Atomics.load(this.control, STOPPED) === 1) return false;
      const tail = Atomics.load(this.control, TAIL);
      if (this.head - tail < SLOTS) return true;
      if (Date.now() > deadline) throw new Error(`the reduction thread took no samples for ${STALL_MS / 1000} s`);
      Atomics.wait(this.control, TAIL, tail, 50);
    }
  }

  private publish(len: number): void {
    Atomics.store(this.control, LEN + (this.head % SLOTS), len);
    this.head++;
    Atomics.store(this.control, HEAD, this.head);
    Atomics.notify(this.control, HEAD);
  }

  /** Adds samples (in stream order); they are copied into the ring, so `x` may be reused at once. */
  add(x: Float32Array): void {
    if (this.local) {
      this.local.add(x);
      return;
    }
    for (let at = 0; at < x.length; at += SLOT_SAMPLES) {
      if (!this.claim()) return;
      const len = Math.min(SLOT_SAMPLES, x.length - at);
      this.slots.set(x.subarray(at, at + len), (this.head % SLOTS) * SLOT_SAMPLES);
      this.publish(len);
    }
  }

  /** Forgets every sample so far (a render pass that the next replaces). */
  restart(): void {
    if (this.local) this.local.restart();
    else if (this.claim()) this.publish(RESTART);
  }

  /** The result over every sample added; the thread ends. The reducer's RangeError passes through (too few samples). */
  async result(): Promise<R> {
    if (this.local) return this.local.result() as R;
    if (!this.ring) throw new Error('ReductionThread.result: start() was not called');
    if (this.claim()) this.publish(END);
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
