/**
 * The thread side of welch-thread.ts: a WelchStream fed with the blocks the main thread writes into
 * shared buffers; each buffer goes back as soon as it has been read, and the averaged spectrum is
 * posted once the main thread says the clip has ended.
 */
import type { MessagePort } from 'node:worker_threads';
import { WelchStream } from '../../shared/dsp/welch.ts';

/** Main thread → Welch thread. */
export type WelchRequest = { type: 'start'; sampleRate: number } | { type: 'block'; buffer: SharedArrayBuffer; length: number } | { type: 'end' };
/** Welch thread → main thread. */
export type WelchReply =
  | { type: 'ready' }
  | { type: 'free'; buffer: SharedArrayBuffer }
  | { type: 'result'; spectrum: import('../../shared/dsp/welch.ts').WelchSpectrum }
  | { type: 'failed'; message: string };

export function serveWelch(port: MessagePort, settings: { size: number }): void {
  let stream: WelchStream | null = null;
  port.on('message', (m: WelchRequest) => {
    try {
      if (m.type === 'start') stream = new WelchStream(m.sampleRate, settings.size);
      else if (!stream) throw new Error('no start message before the samples');
      else if (m.type === 'block') {
        stream.add(new Float32Array(m.buffer, 0, m.length));
        port.postMessage({ type: 'free', buffer: m.buffer } satisfies WelchReply);
      } else {
        port.postMessage({ type: 'result', spectrum: stream.result() } satisfies WelchReply);
        port.close();
      }
    } catch (e) {
      port.postMessage({ type: 'failed', message: e instanceof Error ? e.message : String(e) } satisfies WelchReply);
      port.close();
    }
  });
  port.postMessage({ type: 'ready' } satisfies WelchReply);
}
