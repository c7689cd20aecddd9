import { Worker } from 'node:worker_threads';
import { InputError } from '../../shared/errors.ts';

/** Planar samples as decoded, at the decoder's sample rate. */
export interface WorkerDecodeResult {
  sampleRate: number;
  channels: Float32Array[];
}

/** Failure inside the codec (bad or cut-short data), as opposed to the timeout or a crash of the thread. The message is the codec's. */
export class CodecError extends Error {
  override readonly name = 'CodecError';
}

const DEFAULT_WORKER_URL = new URL('./decode-worker.mjs', import.meta.url);

/**
 * Decodes a compressed audio file in a `worker_threads` worker running decode-worker.mjs, and
 * terminates the worker if it has not answered within `timeoutS` seconds: synchronous WebAssembly
 * decoding cannot be interrupted from the event loop, a thread can. `bytes.buffer` is transferred to the
 * worker (zero copy) when `transfer` is true, so the caller must not use it afterwards; otherwise the
 * bytes are copied. The samples come back in one transferred buffer.
 *
 * Rejects with InputError `decode-timeout` on timeout, CodecError when the codec throws, InputError
 * `too-large` when the worker runs out of memory, and a plain Error if the worker cannot start (a bug).
 * `workerUrl` exists for tests (a worker that never answers).
 *
 * @example const { sampleRate, channels } = await decodeInWorker(bytes, { timeoutS: 120, contextSampleRate: 44100 })
 */
export function decodeInWorker(
  bytes: Uint8Array,
  opts: { timeoutS: number; contextSampleRate: number; transfer?: boolean; workerUrl?: URL },
): Promise<WorkerDecodeResult> {
  let payload = bytes;
  const whole = bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength && bytes.buffer instanceof ArrayBuffer;
  if (!opts.transfer || !whole) payload = bytes.slice();
  const rate = opts.contextSampleRate >= 3000 && opts.contextSampleRate <= 768000 ? opts.contextSampleRate : 44100;
  return new Promise<WorkerDecodeResult>((resolve, reject) => {
    let settled = false;
    const worker = new Worker(opts.workerUrl ?? DEFAULT_WORKER_URL, {
      workerData: { bytes: payload, contextSampleRate: rate },
      transferList: [payload.buffer as ArrayBuffer],
      stdout: true, // codecs that print do not reach our output
      stderr: true,
    });
    const finish = (f: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      void worker.terminate();
      f();
    };
    const timer = setTimeout(
      () =>
        finish(() =>
          reject(
            new InputError(
              'decode-timeout',
              `decoding took longer than ${opts.timeoutS} s and was stopped; try a shorter excerpt, or convert the file to WAV, which reads fastest`,
            ),
          ),
        ),
      Math.max(0, opts.timeoutS * 1000),
    );
    worker.on('message', (m: WorkerMessage) =>
      finish(() => {
        if (!m.ok) return reject(new CodecError(m.message));
        const channels: Float32Array[] = [];
        for (let c = 0; c < m.channelCount; c++) channels.push(new Float32Array(m.buffer, m.byteOffset + 4 * c * m.frames, m.frames));
        resolve({ sampleRate: m.sampleRate, channels });
      }),
    );
    worker.on('error', (e: Error & { code?: string }) =>
      finish(() => {
        if (e.code === 'ERR_WORKER_OUT_OF_MEMORY' || e instanceof RangeError) {
          reject(new InputError('too-large', 'the decoder ran out of memory on this file; give a shorter excerpt'));
        } else reject(new Error(`audio decoder worker failed: ${e.message}`));
      }),
    );
    worker.on('exit', (code) => finish(() => reject(new Error(`audio decoder worker exited (code ${code}) without a result`))));
  });
}

type WorkerMessage =
  | { ok: true; sampleRate: number; frames: number; channelCount: number; buffer: ArrayBuffer; byteOffset: number }
  | { ok: false; name: string; message: string };
