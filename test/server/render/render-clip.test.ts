/**
 * The coil-ready render (server/render/render-clip.ts): mono modulation source, gain, limiter,
 * encoded WAV. Checks: the file is a standard RIFF/WAVE (Microsoft/IBM RIFF spec 1991: `RIFF`,
 * `WAVE`, `fmt `, `data`); it reads back through our decoder bit-exactly (16/24-bit) or exactly
 * (32-bit float); every sample and the true peak (ITU-R BS.1770-4 Annex 2) of the FILE stay at or
 * below the ceiling; the 16-bit render is dithered with TPDF of ±1 LSB (Lipshitz, Wannamaker &
 * Vanderkooy, "Quantization and Dither: A Theoretical Survey", J. AES 40(5), 1992). The dither's
 * statistics (density, mean, variance 1/6, total error 1/4 LSB²) are tested in
 * test/server/audio/wav.test.ts; here only that the render path applies it at that amplitude.
 */
import { describe, expect, it } from 'vitest';
import type { AudioClip } from '../../../shared/audio/clip.ts';
import { measureTruePeak, samplePeakLinear } from '../../../shared/dsp/true-peak.ts';
import { isInputError } from '../../../shared/errors.ts';
import { ampToDb, dbToAmp } from '../../../shared/units.ts';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import { encodeRender, renderModulation } from '../../../server/render/render-clip.ts';

const FS = 44100;

/** Stereo test clip: left 997 Hz at `ampL`, right 300 Hz at `ampR`, 1 s. */
function stereoClip(ampL: number, ampR: number, n = FS): AudioClip {
  const l = new Float32Array(n);
  const r = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    l[i] = ampL * Math.sin((2 * Math.PI * 997 * i) / FS);
    r[i] = ampR * Math.sin((2 * Math.PI * 300 * i) / FS + 0.4);
  }
  return { sampleRate: FS, channels: [l, r] };
}

/** Chunk walk of a RIFF file: ids and offsets of the top-level chunks after `WAVE`. */
function chunks(b: Uint8Array): { riff: string; wave: string; list: { id: string; offset: number; size: number }[] } {
  const dv = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const id = (o: number) => String.fromCharCode(b[o], b[o + 1], b[o + 2], b[o + 3]);
  const list: { id: string; offset: number; size: number }[] = [];
  for (let o = 12; o + 8 <= b.length; ) {
    const size = dv.getUint32(o + 4, true);
    list.push({ id: id(o), offset: o + 8, size });
    o += 8 + size + (size & 1);
  }
  return { riff: id(0), wave: id(8), list };
}

describe('the rendered file', () => {
  it.each([
    ['s16', 1, 16],
    ['s24', 0xfffe, 24],
    ['f32', 3, 32],
  ] as const)('%s: standard RIFF/WAVE, mono, at the clip rate', async (format, tag, bits) => {
    const r = await renderModulation(stereoClip(0.9, 0.9), { gainDb: 3, format });
    const bytes = encodeRender(r, format);
    const c = chunks(bytes);
    expect([c.riff, c.wave]).toEqual(['RIFF', 'WAVE']);
    expect(c.list.map((x) => x.id)).toEqual(format === 'f32' ? ['fmt ', 'fact', 'data'] : ['fmt ', 'data']);
    const fmt = c.list[0];
    const dv = new DataView(bytes.buffer, bytes.byteOffset);
    expect(dv.getUint16(fmt.offset, true)).toBe(tag);
    expect(dv.getUint16(fmt.offset + 2, true)).toBe(1); // mono: the coil is driven by ONE signal
    expect(dv.getUint32(fmt.offset + 4, true)).toBe(FS);
    expect(dv.getUint16(fmt.offset + 14, true)).toBe(bits);
    expect(c.list[c.list.length - 1].size).toBe(FS * (bits / 8));
  });

  it('s24 reads back bit-exactly: every sample is round(x·2^23)/2^23 of the float render', async () => {
    const r = await renderModulation(stereoClip(0.9, 0.5), { gainDb: 4, format: 's24' });
    const d = await decodeAudioBytes(encodeRender(r, 's24'));
    expect(d.channels).toHaveLength(1);
    const back = d.channels[0];
    let mismatches = 0;
    for (let i = 0; i < back.length; i++) if (back[i] !== Math.round(r.samples[i] * 8388608) / 8388608) mismatches++;
    expect(mismatches).toBe(0);
  });

  it('s16 reads back bit-exactly: the decoded value is the stored Int16 code / 32768', async () => {
    const r = await renderModulation(stereoClip(0.9, 0.5), { gainDb: 4, format: 's16' });
    const bytes = encodeRender(r, 's16');
    const data = chunks(bytes).list.find((x) => x.id === 'data')!;
    const codes = new Int16Array(bytes.slice(data.offset, data.offset + data.size).buffer);
    const back = (await decodeAudioBytes(bytes)).channels[0];
    let mismatches = 0;
    for (let i = 0; i < back.length; i++) if (back[i] !== codes[i] / 32768) mismatches++;
    expect(mismatches).toBe(0);
  });

  it('f32 reads back exactly (float32 in, float32 out)', async () => {
    const r = await renderModulation(stereoClip(0.9, 0.5), { gainDb: 4, format: 'f32' });
    const back = (await decodeAudioBytes(encodeRender(r, 'f32'))).channels[0];
    expect(Array.from(back)).toEqual(Array.from(r.samples));
  });

  it.each(['s16', 's24', 'f32'] as const)('%s: every sample and the true peak of the FILE stay at or below the ceiling', async (format) => {
    for (const ceilingDbfs of [0, -6]) {
      // 12 dB of overload on both channels: the limiter must work hard.
      const r = await renderModulation(stereoClip(1, 1), { gainDb: 12, format, ceilingDbfs });
      expect(r.beforeLimiter.samplePeakDbfs).toBeGreaterThan(ceilingDbfs + 5);
      const back = (await decodeAudioBytes(encodeRender(r, format, 7))).channels[0];
      const c = dbToAmp(ceilingDbfs);
      expect(samplePeakLinear(back)).toBeLessThanOrEqual(c);
      expect(measureTruePeak([back], FS).truePeakLinear).toBeLessThanOrEqual(c);
      // …and the limiter works up to it, not far below (within 0.3 dB of true peak).
      expect(ampToDb(measureTruePeak([back], FS).truePeakLinear / c)).toBeGreaterThan(-0.3);
    }
  });
});

describe('16-bit TPDF dither on the render path', () => {
  it('the error of the file against the float render reaches past ±1 LSB but never ±1.5 LSB', async () => {
    // Lipshitz et al. 1992: rounding alone errs by at most ±0.5 LSB, rectangular ±½ LSB dither by
    // less than ±1; TPDF of ±1 LSB plus rounding by less than ±1.5. Over 88200 samples the tails
    // beyond 1.2 LSB (probability ≈ 0.9 % for a sum of three uniforms, [calc] Monte Carlo) are certain to show. Statistics: wav.test.ts.
    const r = await renderModulation(stereoClip(0.3, 0.2, 2 * FS), { gainDb: 0, format: 's16' });
    expect(r.limiter!.limitedSamples).toBe(0);
    const back = (await decodeAudioBytes(encodeRender(r, 's16', 3))).channels[0];
    let worst = 0;
    for (let i = 0; i < back.length; i++) worst = Math.max(worst, Math.abs(back[i] * 32768 - r.samples[i] * 32768));
    expect(worst).toBeGreaterThan(1.2);
    expect(worst).toBeLessThan(1.5);
    // 24-bit renders are not dithered (encodeWav's default): rounding only, ≤ ½ LSB.
    const back24 = (await decodeAudioBytes(encodeRender(r, 's24'))).channels[0];
    let worst24 = 0;
    for (let i = 0; i < back24.length; i++) worst24 = Math.max(worst24, Math.abs(back24[i] * 8388608 - r.samples[i] * 8388608));
    expect(worst24).toBeLessThanOrEqual(0.5);
  });
});

describe('what goes into the render', () => {
  it('renders the chosen channel as mono: left, right, or the mean of both', async () => {
    // Below the ceiling at 0 dB the graph and the limiter are transparent, so the render IS the source.
    const clip = stereoClip(0.4, 0.3);
    const [l, rt] = clip.channels;
    const left = await renderModulation(clip, { gainDb: 0, channel: 'left' });
    const right = await renderModulation(clip, { gainDb: 0, channel: 'right' });
    const mix = await renderModulation(clip, { gainDb: 0 });
    expect(Array.from(left.samples)).toEqual(Array.from(l));
    expect(Array.from(right.samples)).toEqual(Array.from(rt));
    for (let i = 0; i < l.length; i += 101) expect(mix.samples[i]).toBeCloseTo((l[i] + rt[i]) / 2, 7);
  });

  it('pre-emphasis lifts a tone far above the corner by the shelf gain (Audio EQ Cookbook shelf)', async () => {
    // A 12 kHz tone, shelf corner 300 Hz, +6 dB: the cookbook shelf gives +6.000 dB there [calc: scipy
    // freqz of the cookbook coefficients, 5.99999922 dB]; ±0.05 dB allows for the RMS estimate.
    const n = FS;
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = 0.1 * Math.sin((2 * Math.PI * 12000 * i) / FS);
    const clip = { sampleRate: FS, channels: [x] };
    const plain = await renderModulation(clip, { gainDb: 0 });
    const lifted = await renderModulation(clip, { gainDb: 0, preEmphasis: { cornerHz: 300, shelfGainDb: 6 } });
    const rms = (y: Float32Array) => Math.sqrt(y.subarray(4410).reduce((s, v) => s + v * v, 0) / (y.length - 4410));
    expect(ampToDb(rms(lifted.samples) / rms(plain.samples))).toBeCloseTo(6, 1);
    expect(lifted.preEmphasis).toEqual({ cornerHz: 300, shelfGainDb: 6 });
  });

  it('rejects options a person can get wrong, with InputErrors naming them', async () => {
    const clip = stereoClip(0.5, 0.5, 1000);
    const mono = { sampleRate: FS, channels: [clip.channels[0]] };
    const cases: [AudioClip, Parameters<typeof renderModulation>[1], RegExp][] = [
      [clip, { gainDb: 50 }, /gain/],
      [clip, { gainDb: 0, ceilingDbfs: 1 }, /ceiling/],
      [clip, { gainDb: 0, preEmphasis: { cornerHz: 30000, shelfGainDb: 6 } }, /corner/],
      [clip, { gainDb: 0, preEmphasis: { cornerHz: 300, shelfGainDb: 40 } }, /pre-emphasis gain/],
      [mono, { gainDb: 0, channel: 'right' }, /mono/],
      [{ sampleRate: 1000, channels: [new Float32Array(10)] }, { gainDb: 0 }, /sample rate/],
    ];
    for (const [c, o, re] of cases) {
      const e = await renderModulation(c, o).then(
        () => null,
        (err: unknown) => err,
      );
      expect(isInputError(e)).toBe(true);
      expect((e as Error).message).toMatch(re);
    }
  });
});
