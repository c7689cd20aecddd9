/**
 * Welch's averaged spectrum of a clip, computed on the second core while this thread decodes the
 * clip and reduces it for planning (planning-input.ts): the transforms are about a quarter of the
 * plan command's work on one thread. The blocks go through a few reused shared buffers (a buffer
 * comes back as soon as the other thread has read it), so the source is never copied whole and no
 * fresh memory is touched per block. The spectrum equals WelchStream's in this thread bit for bit
 * (the same code on the same blocks in the same order).
 *
 * On a machine with one core, or where the thread cannot start, the same WelchStream runs here.
 *
 * @example
 * const w = new WelchOffThread(4096); // before the decoding: the thread loads meanwhile
 * w.start(44100);
 * const view = w.block(n); view.set(samples); w.submit(view);
 * const spectrum = await w.result();
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { type WelchSpectrum, WelchStream } from '../../shared/dsp/welch.ts';
import type { WelchReply, WelchRequest } from './welch-serve.ts';

const ENTRY = new URL('./welch-thread.cjs', import.meta.url);

export class WelchOffThread {
  private worker: Worker | null = null;
  private local: WelchStream | null = null;
  private localMode = false;
  private readonly free: SharedArrayBuffer[] = [];
  private localBlock = new Float32Array(0);
  private failure: Error | null = null;
  private settle: ((r: WelchReply) => void) | null = null;
  private reply: WelchReply | null = null;
  /** Shared buffers made so far (the rest of the blocks reused them). */
  buffersMade = 0;
  /** Resolves once the thread has loaded (at once when computing here); never rejects. */
  readonly ready: Promise<void>;
  private onReady: () => void = () => undefined;

  /** `threads`: false to compute in this thread (tests; a machine with one core does so anyway). */
  constructor(
    private readonly size: number,
    threads = availableParallelism() > 1,
  ) {
    this.ready = new Promise((resolve) => (this.onReady = resolve));
    if (threads) {
      try {
        // Small young generation, as the analysis worker: it allocates few objects.
        this.worker = new Worker(ENTRY, { workerData: { size }, resourceLimits: { maxYoungGenerationSizeMb: 2 } });
      } catch {
        this.worker = null;
      }
    }
    if (!this.worker) {
      this.localMode = true;
      this.onReady();
      return;
    }
    this.worker.on('message', (m: WelchReply) => {
      if (m.type === 'free') this.free.push(m.buffer);
      else if (m.type === 'ready') this.onReady();
      else this.finish(m);
    });
    this.worker.on('error', (e) => this.finish({ type: 'failed', message: e.message }));
    this.worker.on('exit', () => this.finish({ type: 'failed', message: 'the spectrum thread exited' }));
  }

  private finish(r: WelchReply): void {
    this.onReady();
    if (this.reply) return;
    this.reply = r;
    if (r.type === 'failed') this.failure = new Error(`Welch spectrum thread: ${r.message}`);
    this.settle?.(r);
  }

  /** The clip's sample rate, Hz: call once, before the first block. */
  start(sampleRate: number): void {
    if (this.localMode) this.local = new WelchStream(sampleRate, this.size);
    else this.worker!.postMessage({ type: 'start', sampleRate } satisfies WelchRequest);
  }

  /** Shared buffers back from the other thread, ready for the next blocks. */
  get buffersFree(): number {
    return this.free.length;
  }

  /** A buffer of `length` samples to fill and then hand to {@link submit}. */
  block(length: number): Float32Array {
    if (this.localMode) {
      if (this.localBlock.length < length) this.localBlock = new Float32Array(length);
      return this.localBlock.subarray(0, length);
    }
    let buffer = this.free.pop();
    while (buffer && buffer.byteLength < 4 * length) buffer = this.free.pop(); // too small: dropped
    if (!buffer) {
      buffer = new SharedArrayBuffer(4 * Math.max(length, 1 << 16));
      this.buffersMade++;
    }
    return new Float32Array(buffer, 0, length);
  }

  /** Adds the samples of a view {@link block} gave (in clip order). */
  submit(view: Float32Array): void {
    if (this.localMode) {
      this.local!.add(view);
      return;
    }
    if (this.failure) throw this.failure;
    this.worker!.postMessage({ type: 'block', buffer: view.buffer as SharedArrayBuffer, length: view.length } satisfies WelchRequest);
  }

  /** The averaged spectrum of every sample submitted; the thread ends. RangeError when fewer than `size` samples came. */
  async result(): Promise<WelchSpectrum> {
    if (this.localMode) {
      if (!this.local) throw new Error('WelchOffThread.result: start() was not called');
      return this.local.result();
    }
    const worker = this.worker!;
    const r =
      this.reply ??
      (await new Promise<WelchReply>((resolve) => {
        this.settle = resolve;
        worker.postMessage({ type: 'end' } satisfies WelchRequest);
      }));
    void worker.terminate();
    if (r.type === 'result') return r.spectrum;
    throw r.type === 'failed' && /fewer than/.test(r.message) ? new RangeError(r.message) : (this.failure ?? new Error('Welch spectrum thread: no result'));
  }

  /** Stops the thread without a result (planning failed). */
  close(): void {
    void this.worker?.terminate();
  }
}
