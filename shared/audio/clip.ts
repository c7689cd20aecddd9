/**
 * A decoded clip: planar channels of linear PCM, full scale ±1.0, at `sampleRate` Hz.
 * Produced by the server's decoder (or synthesised by the demo code); consumed by shared/dsp.
 */
export interface AudioClip {
  sampleRate: number;
  /** One Float32Array per channel, all the same length. */
  channels: Float32Array[];
}

/** Which signal drives the coil: the mix (mean of all channels) or one channel. */
export type ModulationChannel = 'mix' | 'left' | 'right';

/** Clip length in seconds. */
export const clipDurationS = (clip: AudioClip): number =>
  clip.channels.length === 0 ? 0 : clip.channels[0].length / clip.sampleRate;

/**
 * The modulation source: the mean of all channels for 'mix', else one channel
 * ('right' of a mono clip is its only channel). Returns a new array for 'mix'.
 */
export function modulationSource(clip: AudioClip, which: ModulationChannel): Float32Array {
  const chs = clip.channels;
  if (chs.length === 0) throw new RangeError('modulationSource: clip has no channels');
  if (which === 'left' || chs.length === 1) return chs[0];
  if (which === 'right') return chs[1];
  const n = chs[0].length;
  const out = new Float32Array(n);
  const scale = 1 / chs.length;
  for (const ch of chs) for (let i = 0; i < n; i++) out[i] += ch[i];
  for (let i = 0; i < n; i++) out[i] *= scale;
  return out;
}
