/**
 * What an uploaded file is, from its content alone (never its name or declared type): the
 * container (server/audio/sniff.ts), and from the header its rate, channels and length, with the
 * same refusals the decoder makes (not audio, truncated, empty, too long). Used by the server
 * while an upload streams (the first bytes) and once it has landed (the whole file), so a bad file
 * is refused before any row is written; the full decode happens later, in the analysis job.
 */
import { open, readFile } from 'node:fs/promises';
import { InputError } from '../../shared/errors.ts';
import { probeFlac } from '../audio/probe-flac.ts';
import { probeMp3 } from '../audio/probe-mp3.ts';
import { probeOgg } from '../audio/probe-ogg.ts';
import { type SupportedFormat, skipId3v2, sniffFormat } from '../audio/sniff.ts';
import { type WavHeader, parseWavHeaderPrefix } from '../audio/wav-parse.ts';

export interface AudioFacts {
  format: SupportedFormat;
  sampleRate: number;
  channels: number;
  durationS: number;
}

/** Bytes sniffing needs before it can decide (an ID3 tag can push an MP3's first frame further). */
export const SNIFF_BYTES = 64 << 10;

const minutes = (s: number): string => (s < 60 ? `${s.toFixed(1)} s` : `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`);
export const tooLong = (durationS: number, maxS: number): InputError =>
  new InputError('too-long', `the clip is at least ${minutes(durationS)} long; the limit is ${minutes(maxS)}. Cut a shorter excerpt first (e.g. ffmpeg -i in.mp3 -t ${Math.floor(maxS)} out.wav)`, 'file');

/**
 * The check made on an upload while it streams, from its first bytes and the count so far: the
 * container must be one we decode (once enough bytes are in to tell), and a WAV's audio so far
 * must not already exceed the duration limit. Throws InputError; returns quietly while undecided.
 */
export function streamingCheck(maxDurationS: number): (head: Uint8Array, bytesSoFar: number) => void {
  let format: SupportedFormat | null = null;
  let wav: WavHeader | null = null;
  return (head, bytesSoFar) => {
    if (format === null) {
      if (head.length < SNIFF_BYTES && head.length < bytesSoFar) return;
      if (head.length < Math.min(SNIFF_BYTES, 12)) return;
      try {
        format = sniffFormat(head);
      } catch (e) {
        // A short head may just be the start of a long ID3 tag: decide once the head is full.
        if (head.length < SNIFF_BYTES && e instanceof InputError && e.code === 'truncated') return;
        throw withField(e);
      }
    }
    if (format === 'wav' && wav === null) {
      try {
        wav = parseWavHeaderPrefix(head, Math.max(head.length, bytesSoFar, 2 ** 40));
      } catch (e) {
        if (head.length < SNIFF_BYTES && head.length === bytesSoFar) return; // wait for more bytes
        throw withField(e);
      }
    }
    if (wav) {
      const s = Math.max(0, bytesSoFar - wav.dataOffset) / wav.blockAlign / wav.sampleRate;
      if (s > maxDurationS) throw tooLong(s, maxDurationS);
    }
  };
}

function withField(e: unknown): unknown {
  return e instanceof InputError && e.field === undefined ? new InputError(e.code, e.message, 'file') : e;
}

/**
 * The facts of a whole file on disk, checked against the duration limit. Throws InputError
 * (`empty`, `not-audio`, `unsupported-codec`, `truncated`, `corrupt`, `too-long`) naming the field
 * `file`. Memory: a WAV's header only; a compressed file is read whole (its frames must be walked).
 */
export async function probeAudioFile(path: string, sizeBytes: number, maxDurationS: number): Promise<AudioFacts> {
  try {
    if (sizeBytes === 0) throw new InputError('empty', 'the file is empty (0 bytes); give a file that holds audio');
    const fh = await open(path, 'r');
    let head: Uint8Array;
    try {
      let want = Math.min(sizeBytes, SNIFF_BYTES);
      for (;;) {
        head = new Uint8Array(want);
        await fh.read(head, 0, want, 0);
        const format = sniffFormat(head);
        if (format !== 'wav') break;
        const h = parseWavHeaderPrefix(head, sizeBytes);
        if (h === null && want < sizeBytes) {
          want = Math.min(sizeBytes, want * 8);
          continue;
        }
        if (h === null) throw new InputError('truncated', 'the WAV file ends inside its header; re-export or re-download it');
        if (h.durationS > maxDurationS) throw tooLong(h.durationS, maxDurationS);
        if (h.truncated) throw new InputError('truncated', `the WAV file is cut short: its header promises ${h.dataBytes} bytes of audio but only ${sizeBytes - h.dataOffset} are present; re-export or re-download it`);
        if (h.framesPresent === 0) throw new InputError('empty', 'the WAV file holds no audio samples (its data chunk is empty); give a file that holds audio');
        return { format: 'wav', sampleRate: h.sampleRate, channels: h.channelCount, durationS: h.framesPresent / h.sampleRate };
      }
    } finally {
      await fh.close();
    }
    const bytes = new Uint8Array(await readFile(path));
    const format = sniffFormat(bytes) as Exclude<SupportedFormat, 'wav'>;
    if (format === 'flac') {
      const p = probeFlac(bytes, skipId3v2(bytes));
      if (p.durationS !== null && p.durationS > maxDurationS) throw tooLong(p.durationS, maxDurationS);
      if (p.audioOffset >= bytes.length) throw new InputError('truncated', 'the FLAC file has a header but no audio frames; it is cut short');
      if (p.frameCount === 0) throw new InputError('empty', 'the FLAC file holds no audio samples; give a file that holds audio');
      return { format, sampleRate: p.sampleRate, channels: p.channelCount, durationS: p.durationS ?? 0 };
    }
    if (format === 'ogg') {
      const p = probeOgg(bytes);
      if (p.durationS !== null && p.durationS > maxDurationS) throw tooLong(p.durationS, maxDurationS);
      if (p.truncated) throw new InputError('truncated', 'the Ogg Vorbis file is cut short (its last page is incomplete or missing); re-export or re-download it');
      return { format, sampleRate: p.sampleRate, channels: p.channelCount, durationS: p.durationS ?? 0 };
    }
    const p = probeMp3(bytes, skipId3v2(bytes));
    if (!p) throw new InputError('not-audio', 'no MP3 frames were found in the file; give a WAV, FLAC, Ogg Vorbis or MP3 file');
    if (p.durationS - (2 * 1152) / p.sampleRate > maxDurationS) throw tooLong(p.durationS, maxDurationS);
    if (p.truncated) throw new InputError('truncated', 'the MP3 file is cut short (its last frame is incomplete or frames are missing); re-export or re-download it');
    return { format, sampleRate: p.sampleRate, channels: p.channelCount, durationS: p.durationS };
  } catch (e) {
    throw withField(e);
  }
}
