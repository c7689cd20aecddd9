/**
 * A ring of shared slots that carries a stream of samples from one thread to another: a single
 * producer (RingWriter, the main thread decoding or rendering) and a single consumer (drainRing,
 * a worker reducing the samples as they come). Allocated once, so no fresh memory is touched per
 * block (~3 ms/MB on the project machine), and a producer that outruns the consumer waits for a
 * free slot, so memory stays bounded even when the producer never yields (a render is one
 * synchronous loop). Neither side needs its event loop: each waits on the other's counter with
 * Atomics.wait.
 *
 * The layout: one SharedArrayBuffer of control words, one of slots. `HEAD` counts slots written,
 * `TAIL` slots read; slot k (mod the slot count) holds `LEN + k` samples, or a negative marker:
 * RESTART (forget everything so far) or END (the stream is complete). `STOPPED` is set once the
 * consumer has stopped (finished or failed), so the producer never waits for it in vain.
 */

/** Control words of the ring. */
export const HEAD = 0;
export const TAIL = 1;
export const STOPPED = 2;
/** Slot lengths start here. */
export const LEN = 4;
export const RESTART = -1;
export const END = -2;

/** The ring's shared memory, as both sides see it (posted to the consumer's thread). */
export interface Ring {
  control: SharedArrayBuffer;
  slots: SharedArrayBuffer;
  slotCount: number;
  slotSamples: number;
}

/** What the consumer feeds the samples to. */
export interface StreamReducer<R = unknown> {
  add(x: Float32Array): void;
  /** Forgets every block (a render pass replaced by the next). */
  restart(): void;
  result(): R;
}

/** How long the producer waits for a free slot before it takes the consumer for dead, ms. */
const STALL_MS = 20_000;

/** The producer's side: copies samples into free slots and publishes them. */
export class RingWriter {
  readonly ring: Ring;
  private readonly control: Int32Array;
  private readonly slots: Float32Array;
  private head = 0;

  /** 16 slots × 64 Ki samples by default: 4 MiB in all, room for the consumer to fall behind for a moment. */
  constructor(slotCount = 16, slotSamples = 1 << 16) {
    this.ring = { control: new SharedArrayBuffer(4 * (LEN + slotCount)), slots: new SharedArrayBuffer(4 * slotCount * slotSamples), slotCount, slotSamples };
    this.control = new Int32Array(this.ring.control);
    this.slots = new Float32Array(this.ring.slots);
  }

  /** True once the consumer has stopped (its result or failure is on its way). */
  get stopped(): boolean {
    return Atomics.load(this.control, STOPPED) === 1;
  }

  /** Waits for a free slot; false when the consumer has stopped. Throws when it takes none for 20 s. */
  private claim(): boolean {
    const { slotCount } = this.ring;
    const deadline = Date.now() + STALL_MS;
    for (;;) {
      if (this.stopped) return false;
      const tail = Atomics.load(this.control, TAIL);
      if (this.head - tail < slotCount) return true;
      if (Date.now() > deadline) throw new Error(`the reducing thread took no samples for ${STALL_MS / 1000} s`);
      Atomics.wait(this.control, TAIL, tail, 50);
    }
  }

  private publish(len: number): void {
    Atomics.store(this.control, LEN + (this.head % this.ring.slotCount), len);
    this.head++;
    Atomics.store(this.control, HEAD, this.head);
    Atomics.notify(this.control, HEAD);
  }

  /** Adds x[0…len) (in stream order), copied into the ring, so `x` may be reused at once. False if the consumer has stopped. */
  add(x: Float32Array, len = x.length): boolean {
    const { slotSamples } = this.ring;
    for (let at = 0; at < len; at += slotSamples) {
      if (!this.claim()) return false;
      const n = Math.min(slotSamples, len - at);
      this.slots.set(x.subarray(at, at + n), (this.head % this.ring.slotCount) * slotSamples);
      this.publish(n);
    }
    return true;
  }

  /** Tells the consumer to forget every sample so far. */
  restart(): void {
    if (this.claim()) this.publish(RESTART);
  }

  /** Tells the consumer the stream is complete. */
  end(): void {
    if (this.claim()) this.publish(END);
  }
}

/**
 * The consumer's side: feeds every slot to `reducer` until END, and returns its result; marks the
 * ring stopped either way (a reducer's error passes through, after the producer has been released).
 */
export function drainRing<R>(ring: Ring, reducer: StreamReducer<R>): R {
  const control = new Int32Array(ring.control);
  try {
    for (let tail = 0; ; tail++) {
      while (Atomics.load(control, HEAD) === tail) Atomics.wait(control, HEAD, tail);
      const slot = tail % ring.slotCount;
      const len = Atomics.load(control, LEN + slot);
      if (len === END) return reducer.result();
      if (len === RESTART) reducer.restart();
      else reducer.add(new Float32Array(ring.slots, 4 * slot * ring.slotSamples, len));
      Atomics.store(control, TAIL, tail + 1);
      Atomics.notify(control, TAIL);
    }
  } finally {
    markStopped(ring);
  }
}

/** Marks the ring's consumer stopped (it will take no more samples), so the producer never waits for it. */
export function markStopped(ring: Ring): void {
  const control = new Int32Array(ring.control);
  Atomics.store(control, STOPPED, 1);
  Atomics.notify(control, TAIL);
}

/** Every (non-shared) ArrayBuffer under `v`, once each: the transfer list of a result. */
export function arrayBuffersOf(v: unknown, out = new Set<ArrayBuffer>()): ArrayBuffer[] {
  if (ArrayBuffer.isView(v)) {
    if (v.buffer instanceof ArrayBuffer) out.add(v.buffer);
  } else if (v !== null && typeof v === 'object') for (const x of Object.values(v)) arrayBuffersOf(x, out);
  return [...out];
}
