// Worker thread for compressed-audio decoding (FLAC, Ogg Vorbis, MP3) through the web-audio-api
// package's BaseAudioContext.decodeAudioData (which wraps @audio/decode and its WebAssembly codecs).
//
// Why a worker: the codecs run synchronously once started; a Promise.race cannot interrupt them, but
// Worker.terminate() can, so the caller bounds decode time for real (see worker-decode.ts).
// Why plain JavaScript: Node 20 cannot load TypeScript in a worker thread without a loader, and this file
// must run the same under tsx (command line) and Vitest; it imports only packages.
//
// Input (workerData): { bytes: Uint8Array (transferred), contextSampleRate: number }.
// Output (one message): { ok: true, sampleRate, frames, channelCount, buffer, byteOffset } with the
// planar samples in `buffer` (transferred; channel c is Float32Array(buffer, byteOffset + 4·c·frames, frames)),
// or { ok: false, name, message }.
import { parentPort, workerData } from 'node:worker_threads';
import { OfflineAudioContext } from 'web-audio-api';

const { bytes, contextSampleRate } = workerData;
try {
  // decodeAudioData in web-audio-api 1.5.6 returns the file's own sample rate whatever the context's
  // (checked in its source, src/utils.js); the caller still passes the rate read from the file header
  // so a conforming implementation, which resamples to the context rate, would also keep it.
  const ctx = new OfflineAudioContext(1, 1, contextSampleRate);
  const audio = await ctx.decodeAudioData(bytes);
  const channelCount = audio.numberOfChannels;
  const frames = audio.length;
  const views = [];
  for (let c = 0; c < channelCount; c++) views.push(audio.getChannelData(c));
  // audio-buffer keeps all channels in one planar Float32Array; send that buffer without copying when
  // the views are laid out back to back in it, else pack them into a fresh one.
  let buffer, byteOffset;
  const first = views[0];
  const contiguous = views.every((v, c) => v.buffer === first.buffer && v.byteOffset === first.byteOffset + 4 * c * frames && v.length === frames);
  if (channelCount > 0 && contiguous) {
    buffer = first.buffer;
    byteOffset = first.byteOffset;
  } else {
    const packed = new Float32Array(channelCount * frames);
    views.forEach((v, c) => packed.set(v.subarray(0, frames), c * frames));
    buffer = packed.buffer;
    byteOffset = 0;
  }
  parentPort.postMessage({ ok: true, sampleRate: audio.sampleRate, frames, channelCount, buffer, byteOffset }, [buffer]);
} catch (e) {
  parentPort.postMessage({ ok: false, name: e?.name ?? 'Error', message: String(e?.message ?? e) });
}
