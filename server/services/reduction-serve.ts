/**
 * The reducers a stream of samples can be handed to (reduction-thread.ts), and the thread side of
 * the ring of shared slots the samples come through.
 *
 * The ring (one SharedArrayBuffer for the control words, one for the slots): a single producer
 * (the main thread) and a single consumer (the reduction thread). `HEAD` counts slots written,
 * `TAIL` slots read; slot k (mod the slot count) holds `LEN + k` samples, or a negative marker:
 * RESTART (forget everything so far) or END (post the result). Each side waits on the other's
 * counter with Atomics.wait, so neither needs its event loop: the producer may be a synchronous
 * render loop, and it is held back when the ring is full, so memory stays bounded.
 */
import type { MessagePort } from 'node:worker_threads';
import { type WelchSpectrum, WelchStream } from '../../shared/dsp/welch.ts';
import type { PlanClip } from '../../shared/plan/evaluate.ts';
import { PlanReducer } from '../render/plan-reducer.ts';

/** What to reduce the samples to. */
export type ReductionKind =
  /** Welch's averaged spectrum (WelchStream). */
  | { kind: 'welch'; sampleRate: number; size: number }
  /** What planning reads (PlanReducer), under the clip name `name`. */
  | { kind: 'plan'; sampleCount: number; sampleRate: number; pulses: boolean; name: string };

/** A reducer fed block by block. */
export interface StreamReducer {
  add(x: Float32Array): void;
  /** Forgets every block (a render pass replaced by the next). */
  restart(): void;
  result(): WelchSpectrum | PlanClip;
}

/** The reducer of a kind, in whichever thread calls it. */
export function streamReducer(k: ReductionKind): StreamReducer {
  if (k.kind === 'welch') {
    let s = new WelchStream(k.sampleRate, k.size);
    return { add: (x) => s.add(x), restart: () => (s = new WelchStream(k.sampleRate, k.size)), result: () => s.result() };
  }
  const r = new PlanReducer(k.sampleCount, k.sampleRate, k.pulses);
  return { add: (x) => r.add(x), restart: () => r.restart(), result: () => r.result(k.name) };
}

/** Control words of the ring. */
export const HEAD = 0;
export const TAIL = 1;
/** 1 once the consumer has stopped (failed or finished): the producer must not wait for it. */
export const STOPPED = 2;
/** Slot lengths start here. */
export const LEN = 4;
export const RESTART = -1;
export const END = -2;

/** The ring's shared memory, as both sides see it. */
export interface Ring {
  control: SharedArrayBuffer;
  slots: SharedArrayBuffer;
  slotCount: number;
  slotSamples: number;
}

/** Main thread → reduction thread (once; the samples come through the ring). */
export type ReductionRequest = { type: 'start'; reduce: ReductionKind; ring: Ring };
/** Reduction thread → main thread. */
export type ReductionReply =
  | { type: 'ready' }
  | { type: 'result'; value: WelchSpectrum | PlanClip }
  | { type: 'failed'; message: string; range: boolean };

/** Every (non-shared) ArrayBuffer under `v`, once each: the transfer list of a result. */
export function arrayBuffersOf(v: unknown, out = new Set<ArrayBuffer>()): ArrayBuffer[] {
  if (ArrayBuffer.isView(v)) {
    if (v.buffer instanceof ArrayBuffer) out.add(v.buffer);
  } else if (v !== null && typeof v === 'object') for (const x of Object.values(v)) arrayBuffersOf(x, out);
  return [...out];
}

/** The thread's side: takes the start message, then reduces slots until END (or a failure). */
export function serveReductions(port: MessagePort): void {
  port.once('message', (m: ReductionRequest) => {
    const { ring } = m;
    const control = new Int32Array(ring.control);
    try {
      const reducer = streamReducer(m.reduce);
      for (let tail = 0; ; tail++) {
        while (Atomics.load(control, HEAD) === tail) Atomics.wait(control, HEAD, tail);
        const slot = tail % ring.slotCount;
        const len = Atomics.load(control, LEN + slot);
        if (len === END) {
          const value = reducer.result();
          Atomics.store(control, STOPPED, 1);
          // The arrays are moved, not copied: a 20-minute clip's frame statistics are ~29 MB.
          port.postMessage({ type: 'result', value } satisfies ReductionReply, arrayBuffersOf(value));
          break;
        }
        if (len === RESTART) reducer.restart();
        else reducer.add(new Float32Array(ring.slots, 4 * slot * ring.slotSamples, len));
        Atomics.store(control, TAIL, tail + 1);
        Atomics.notify(control, TAIL);
      }
    } catch (e) {
      Atomics.store(control, STOPPED, 1);
      Atomics.notify(control, TAIL);
      port.postMessage({ type: 'failed', message: e instanceof Error ? e.message : String(e), range: e instanceof RangeError } satisfies ReductionReply);
    }
    port.close();
  });
  port.postMessage({ type: 'ready' } satisfies ReductionReply);
}
