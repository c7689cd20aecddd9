/**
 * The reducers a stream of samples can be handed to (reduction-thread.ts), and the reduction
 * thread's side: it takes one start message, then drains the ring of shared slots the samples
 * come through (sample-ring.ts) into the reducer and posts the result.
 */
import type { MessagePort } from 'node:worker_threads';
import { type WelchSpectrum, WelchStream } from '../../shared/dsp/welch.ts';
import type { PlanClip } from '../../shared/plan/evaluate.ts';
import { PlanReducer } from '../render/plan-reducer.ts';
import { type Ring, type StreamReducer, arrayBuffersOf, drainRing } from './sample-ring.ts';

/** What to reduce the samples to. */
export type ReductionKind =
  /** Welch's averaged spectrum (WelchStream). */
  | { kind: 'welch'; sampleRate: number; size: number }
  /** What planning reads (PlanReducer), under the clip name `name`. */
  | { kind: 'plan'; sampleCount: number; sampleRate: number; pulses: boolean; name: string };

/** The reducer of a kind, in whichever thread calls it. */
export function streamReducer(k: ReductionKind): StreamReducer<WelchSpectrum | PlanClip> {
  if (k.kind === 'welch') {
    let s = new WelchStream(k.sampleRate, k.size);
    return { add: (x) => s.add(x), restart: () => (s = new WelchStream(k.sampleRate, k.size)), result: () => s.result() };
  }
  const r = new PlanReducer(k.sampleCount, k.sampleRate, k.pulses);
  return { add: (x) => r.add(x), restart: () => r.restart(), result: () => r.result(k.name) };
}

/** Main thread → reduction thread (once; the samples come through the ring). */
export type ReductionRequest = { type: 'start'; reduce: ReductionKind; ring: Ring };
/** Reduction thread → main thread. */
export type ReductionReply =
  | { type: 'ready' }
  | { type: 'result'; value: WelchSpectrum | PlanClip }
  | { type: 'failed'; message: string; range: boolean };

/** The thread's side: takes the start message, then reduces slots until END (or a failure). */
export function serveReductions(port: MessagePort): void {
  port.once('message', (m: ReductionRequest) => {
    try {
      const value = drainRing(m.ring, streamReducer(m.reduce));
      // The arrays are moved, not copied: a 20-minute clip's frame statistics are ~29 MB.
      port.postMessage({ type: 'result', value } satisfies ReductionReply, arrayBuffersOf(value));
    } catch (e) {
      port.postMessage({ type: 'failed', message: e instanceof Error ? e.message : String(e), range: e instanceof RangeError } satisfies ReductionReply);
    }
    port.close();
  });
  port.postMessage({ type: 'ready' } satisfies ReductionReply);
}
