/** Audio files in and out: decoding (WAV, FLAC, Ogg Vorbis, MP3) and WAV writing. */
export {
  decodeAudioBytes,
  decodeAudioFile,
  DEFAULT_MAX_BYTES,
  DEFAULT_MAX_DECODED_BYTES,
  DEFAULT_MAX_DURATION_S,
  DEFAULT_TIMEOUT_S,
  type DecodedClip,
  type DecodeOptions,
} from './decode.ts';
export { encodeWav, tpdfDither, writeWavAtomic, type EncodeWavOptions, type WavSampleFormat } from './wav.ts';
export type { SupportedFormat } from './sniff.ts';
