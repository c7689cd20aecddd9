/**
 * Entry-point validation shared by the multichannel measurements: a non-empty list of equally long
 * Float32Array channels and a positive finite sample rate. Throws RangeError/TypeError naming the
 * function, the argument and the value.
 */
export function checkChannels(fn: string, channels: Float32Array[], sampleRate: number): void {
  if (!Array.isArray(channels) || channels.length === 0) {
    throw new RangeError(`${fn}: channels must be a non-empty array of Float32Array`);
  }
  for (const [i, ch] of channels.entries()) {
    if (!(ch instanceof Float32Array)) throw new TypeError(`${fn}: channels[${i}] is not a Float32Array`);
    if (ch.length !== channels[0].length) {
      throw new RangeError(`${fn}: channels[${i}] has ${ch.length} samples, channels[0] has ${channels[0].length}`);
    }
  }
  if (!(Number.isFinite(sampleRate) && sampleRate > 0)) {
    throw new RangeError(`${fn}: sampleRate must be a positive finite number of Hz, got ${sampleRate}`);
  }
}
