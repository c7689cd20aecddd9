/**
 * Programme loudness by ITU-R BS.1770-4 with the EBU R 128 meters of EBU Tech 3341 (momentary,
 * short-term, integrated) and the loudness range of EBU Tech 3342.
 *
 * One pass per channel: K-weighting (two float64 biquads) fused with a sum of squares per 100 ms
 * sub-block, so the filtered signal is never stored; channels go through it two at a time (same
 * arithmetic per channel, independent chains the CPU overlaps). Every 400 ms gating block and 3 s
 * short-term window is then a sum of 4 or 30 consecutive sub-block sums.
 *
 * Time grid and the tail. Sub-block k covers samples [round(k·fs/10), round((k+1)·fs/10)) (exact at
 * every rate that is a multiple of 10 Hz). Window j of length W starts at j·0.1 s and ends at
 * j·0.1 s + W; only complete windows exist. This is BS.1770-4's rule for gating blocks (j runs to
 * (T − Tg)/(Tg·step), so a block never reaches past the end of the programme): samples after the last
 * whole 100 ms sub-block lie in no complete block and do not count, and a clip shorter than 400 ms has
 * no block at all. The momentary series is exactly the list of gating blocks.
 */
import { InputError } from '../errors.ts';
import { kWeightingCoeffs, type KWeightingCoeffs } from './k-weighting.ts';
import { INTEGRATED_RELATIVE_GATE_LU, gate, loudnessLufs } from './gating.ts';
import { loudnessRangeLu } from './loudness-range.ts';
import { checkChannels } from './check-channels.ts';
import { WholeUnits } from './whole-units.ts';

/** Hop between successive momentary/short-term values and gating blocks, s (75 % overlap of 400 ms). */
export const BLOCK_HOP_S = 0.1;
/** Momentary window and gating block length, s. ITU-R BS.1770-4 Annex 1; EBU Tech 3341. */
export const MOMENTARY_WINDOW_S = 0.4;
/** Short-term window length, s. EBU Tech 3341. */
export const SHORT_TERM_WINDOW_S = 3;
/** Lowest sample rate accepted, Hz: below it the K-weighting shelf (1.68 kHz) nears Nyquist. */
export const MIN_LOUDNESS_SAMPLE_RATE_HZ = 8000;

const MOMENTARY_SUBBLOCKS = 4;
const SHORT_TERM_SUBBLOCKS = 30;
/** Filter state smaller than this is flushed to 0 at sub-block edges (avoids subnormal arithmetic). */
const STATE_FLUSH = 1e-150;
/** Largest sample index the two-channel kernel counts in int32 arithmetic. */
const MAX_INT32_INDEX = 0x7fffffff;

/** What {@link measureLoudness} reports. Levels in LUFS (≡ LKFS), ranges in LU; −Infinity = silence. */
export interface LoudnessReport {
  /** Gated integrated loudness over the whole clip, LUFS; −Infinity when no block exceeds −70 LUFS. */
  integratedLufs: number;
  /** Highest momentary (400 ms) loudness, LUFS; −Infinity when the clip is shorter than 400 ms. */
  maxMomentaryLufs: number;
  /** Highest short-term (3 s) loudness, LUFS; −Infinity when the clip is shorter than 3 s. */
  maxShortTermLufs: number;
  /** EBU Tech 3342 loudness range, LU; 0 when no short-term window passes the gates. */
  loudnessRangeLu: number;
  /** Ungated momentary loudness of the 400 ms window starting at j·0.1 s, LUFS. */
  momentaryLufs: Float64Array;
  /** Ungated short-term loudness of the 3 s window starting at j·0.1 s, LUFS. */
  shortTermLufs: Float64Array;
  /** Hop of both series, s. */
  blockHopS: 0.1;
}

/**
 * Default channel weights Gᵢ of ITU-R BS.1770-4 Annex 1 for a channel count, or null when the layout
 * is ambiguous. Assumed orders: 1 mono; 2 L R; 3 L R C; 5 L R C Ls Rs; 6 L R C LFE Ls Rs (SMPTE /
 * WAVE_FORMAT_EXTENSIBLE order, LFE excluded with weight 0). Surround weight 1.41 (+1.5 dB).
 *
 * @example defaultChannelWeights(6) // → [1, 1, 1, 0, 1.41, 1.41]
 */
export function defaultChannelWeights(channelCount: number): number[] | null {
  switch (channelCount) {
    case 1:
      return [1];
    case 2:
      return [1, 1];
    case 3:
      return [1, 1, 1];
    case 5:
      return [1, 1, 1, 1.41, 1.41];
    case 6:
      return [1, 1, 1, 0, 1.41, 1.41];
    default:
      return null;
  }
}

/**
 * Start sample of each 100 ms sub-block: edges[k] = round(k·fs/10), for k = 0 … K where K is the
 * number of whole sub-blocks in `length` samples (edges[K] ≤ length).
 *
 * @example subBlockEdges(44100, 10000) // → [0, 4410, 8820] (two whole sub-blocks, 1180 tail samples)
 */
export function subBlockEdges(sampleRateHz: number, length: number): Float64Array {
  const perBlock = sampleRateHz / 10; // samples per 100 ms; exact for rates that are multiples of 10 Hz
  let count = Math.floor(length / perBlock) + 1;
  while (count > 0 && Math.round(count * perBlock) > length) count--;
  const edges = new Float64Array(count + 1);
  for (let k = 0; k <= count; k++) edges[k] = Math.round(k * perBlock);
  return edges;
}

/**
 * Fused K-weighting and energy accumulation: filters `samples` through both K stages (transposed
 * direct form II, float64, from rest) and adds Σ y² over each sub-block [edges[k], edges[k+1]) into
 * out[k]. Samples past the last edge are not read. Source of the filters: ITU-R BS.1770-4 Annex 1.
 *
 * @param samples one channel, full scale ±1
 * @param coeffs from {@link kWeightingCoeffs} at the samples' rate
 * @param edges sub-block edges from {@link subBlockEdges}
 * @param out edges.length − 1 accumulators (added to, not overwritten)
 * @returns `out`
 * @example kWeightedSubBlockSums(x, kWeightingCoeffs(48000), subBlockEdges(48000, x.length), sums)
 */
export function kWeightedSubBlockSums(
  samples: Float32Array,
  coeffs: KWeightingCoeffs,
  edges: Float64Array,
  out: Float64Array,
): Float64Array {
  kWeightRun(samples, 0, coeffs, edges, 0, edges.length - 1, out, new Float64Array(4), 0);
  return out;
}

/**
 * The kernel of {@link kWeightedSubBlockSums} over sub-blocks k0…k1−1 only, the filter state carried
 * in st[o…o+3] (s1, s2, t1, t2; zeros for a filter at rest) and updated: the samples of sub-block k
 * are samples[edges[k] − base … edges[k+1] − base), so a signal that arrives in blocks goes through
 * it block by block with the same arithmetic as in one call. Kernel: trusts its inputs.
 */
function kWeightRun(
  samples: Float32Array,
  base: number,
  coeffs: KWeightingCoeffs,
  edges: Float64Array,
  k0: number,
  k1: number,
  out: Float64Array,
  st: Float64Array,
  o: number,
): void {
  const { b0: p0, b1: p1, b2: p2, a1: pa1, a2: pa2 } = coeffs.shelf;
  const { b0: h0, b1: h1, b2: h2, a1: ha1, a2: ha2 } = coeffs.highPass;
  let s1 = st[o];
  let s2 = st[o + 1];
  let t1 = st[o + 2];
  let t2 = st[o + 3];
  for (let k = k0; k < k1; k++) {
    const end = edges[k + 1] - base;
    let acc = 0;
    for (let i = edges[k] - base; i < end; i++) {
      const x = samples[i];
      const u = p0 * x + s1;
      s1 = p1 * x - pa1 * u + s2;
      s2 = p2 * x - pa2 * u;
      const y = h0 * u + t1;
      t1 = h1 * u - ha1 * y + t2;
      t2 = h2 * u - ha2 * y;
      acc += y * y;
    }
    out[k] += acc;
    // After long digital silence the decaying state would become subnormal (slow on x86);
    // 1e-150 is 3000 dB below full scale, so flushing it changes no reported digit.
    if (Math.abs(s1) < STATE_FLUSH) s1 = 0;
    if (Math.abs(s2) < STATE_FLUSH) s2 = 0;
    if (Math.abs(t1) < STATE_FLUSH) t1 = 0;
    if (Math.abs(t2) < STATE_FLUSH) t2 = 0;
  }
  st[o] = s1;
  st[o + 1] = s2;
  st[o + 2] = t1;
  st[o + 3] = t2;
}

/**
 * {@link kWeightedSubBlockSums} for two channels at once: the same filters, operations and order per
 * channel, so outA and outB receive exactly what two single-channel calls would add. Each channel's
 * recursion is one long dependency chain that leaves most of the CPU idle; two independent chains in
 * one loop overlap (about 1.4× the throughput of one channel after the other, measured on x86-64).
 * Source of the filters: ITU-R BS.1770-4 Annex 1.
 *
 * @param a first channel, full scale ±1
 * @param b second channel; both are read up to the last edge
 * @param outA edges.length − 1 accumulators for `a` (added to, not overwritten)
 * @param outB the same for `b`
 * @example kWeightedSubBlockSumsPair(left, right, kWeightingCoeffs(48000), edges, sumsL, sumsR)
 */
export function kWeightedSubBlockSumsPair(
  a: Float32Array,
  b: Float32Array,
  coeffs: KWeightingCoeffs,
  edges: Float64Array,
  outA: Float64Array,
  outB: Float64Array,
): void {
  kWeightRunPair(a, b, 0, coeffs, edges, 0, edges.length - 1, outA, outB, new Float64Array(8));
}

/**
 * The kernel of {@link kWeightedSubBlockSumsPair} over sub-blocks k0…k1−1 only, as kWeightRun is
 * kWeightedSubBlockSums's: st[0…3] the state of a's filters, st[4…7] b's. Kernel: trusts its inputs.
 */
function kWeightRunPair(
  a: Float32Array,
  b: Float32Array,
  base: number,
  coeffs: KWeightingCoeffs,
  edges: Float64Array,
  k0: number,
  k1: number,
  outA: Float64Array,
  outB: Float64Array,
  st: Float64Array,
): void {
  if (k1 > k0 && edges[k1] - base > MAX_INT32_INDEX) {
    // Indices past int32 (over 12 h at 48 kHz): the loop below counts in int32, the single kernel does not.
    kWeightRun(a, base, coeffs, edges, k0, k1, outA, st, 0);
    kWeightRun(b, base, coeffs, edges, k0, k1, outB, st, 4);
    return;
  }
  const { b0: p0, b1: p1, b2: p2, a1: pa1, a2: pa2 } = coeffs.shelf;
  const { b0: h0, b1: h1, b2: h2, a1: ha1, a2: ha2 } = coeffs.highPass;
  let s1 = st[0];
  let s2 = st[1];
  let t1 = st[2];
  let t2 = st[3];
  let r1 = st[4];
  let r2 = st[5];
  let q1 = st[6];
  let q2 = st[7];
  for (let k = k0; k < k1; k++) {
    const end = (edges[k + 1] - base) | 0;
    let accA = 0;
    let accB = 0;
    for (let i = (edges[k] - base) | 0; i < end; i++) {
      const x = a[i];
      const v = b[i];
      const u = p0 * x + s1;
      const w = p0 * v + r1;
      s1 = p1 * x - pa1 * u + s2;
      r1 = p1 * v - pa1 * w + r2;
      s2 = p2 * x - pa2 * u;
      r2 = p2 * v - pa2 * w;
      const y = h0 * u + t1;
      const z = h0 * w + q1;
      t1 = h1 * u - ha1 * y + t2;
      q1 = h1 * w - ha1 * z + q2;
      t2 = h2 * u - ha2 * y;
      q2 = h2 * w - ha2 * z;
      accA += y * y;
      accB += z * z;
    }
    outA[k] += accA;
    outB[k] += accB;
    // The same flush as kWeightRun, per channel.
    if (Math.abs(s1) < STATE_FLUSH) s1 = 0;
    if (Math.abs(s2) < STATE_FLUSH) s2 = 0;
    if (Math.abs(t1) < STATE_FLUSH) t1 = 0;
    if (Math.abs(t2) < STATE_FLUSH) t2 = 0;
    if (Math.abs(r1) < STATE_FLUSH) r1 = 0;
    if (Math.abs(r2) < STATE_FLUSH) r2 = 0;
    if (Math.abs(q1) < STATE_FLUSH) q1 = 0;
    if (Math.abs(q2) < STATE_FLUSH) q2 = 0;
  }
  st[0] = s1;
  st[1] = s2;
  st[2] = t1;
  st[3] = t2;
  st[4] = r1;
  st[5] = r2;
  st[6] = q1;
  st[7] = q2;
}

/** Loudness of each complete window of `span` sub-blocks, starting at every sub-block. */
function windowLoudness(weightedSums: Float64Array, edges: Float64Array, span: number): Float64Array {
  const count = Math.max(0, weightedSums.length - span + 1);
  const out = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    let e = 0;
    for (let k = j; k < j + span; k++) e += weightedSums[k];
    out[j] = loudnessLufs(e / (edges[j + span] - edges[j]));
  }
  return out;
}

/** acc[k] += g·v[k]. */
function addScaled(acc: Float64Array, g: number, v: Float64Array): void {
  for (let k = 0; k < acc.length; k++) acc[k] += g * v[k];
}

function maxOf(values: Float64Array): number {
  let m = -Infinity;
  for (let j = 0; j < values.length; j++) if (values[j] > m) m = values[j];
  return m;
}

/**
 * Measures integrated, momentary and short-term loudness and loudness range of a clip.
 *
 *   zᵢ = mean square of K-weighted channel i over a block;  L = −0.691 + 10·log10 Σ Gᵢ·zᵢ  (LUFS)
 *   integrated: blocks 400 ms, hop 100 ms; keep L > −70 LUFS; Γr = L(mean energy of kept) − 10 LU;
 *               result = L(mean energy of blocks with L > Γr)
 *   momentary = ungated 400 ms windows, short-term = ungated 3 s windows, both every 100 ms.
 *
 * Sources: ITU-R BS.1770-4 Annex 1 (filter, formula, gating, weights); EBU Tech 3341 (momentary,
 * short-term); EBU Tech 3342 (loudness range, see {@link loudnessRangeLu}). Windows, the time grid and
 * the tail are described at the top of this file. Silence (no block above −70 LUFS) gives
 * integratedLufs = −Infinity; JSON writers convert it with `finiteOrNull`.
 *
 * @param channels planar channels of equal length, full scale ±1
 * @param sampleRate Hz, at least 8000
 * @param opts.channelWeights Gᵢ per channel; default from {@link defaultChannelWeights} (1, 2, 3, 5 or
 *   6 channels; other counts must pass weights)
 * @throws InputError 'unsupported-channel-layout' for other channel counts without weights,
 *   'unsupported-sample-rate' below 8 kHz; RangeError/TypeError for malformed arguments
 * @example
 *   // stereo 997 Hz sine at −23 dBFS peak per channel, 10 s at 48 kHz
 *   measureLoudness([x, x], 48000).integratedLufs // → −23.00 LUFS
 */
export function measureLoudness(
  channels: Float32Array[],
  sampleRate: number,
  opts: { channelWeights?: number[] } = {},
): LoudnessReport {
  checkChannels('measureLoudness', channels, sampleRate);
  const m = new LoudnessStream(channels.length, channels[0].length, sampleRate, opts, 'measureLoudness');
  m.add(channels, channels[0].length);
  return m.result();
}

/** The channel weights Gᵢ of `opts`, checked, or the defaults of defaultChannelWeights. */
function channelWeights(fn: string, channelCount: number, sampleRate: number, opts: { channelWeights?: number[] }): number[] {
  if (sampleRate < MIN_LOUDNESS_SAMPLE_RATE_HZ) {
    throw new InputError(
      'unsupported-sample-rate',
      `Loudness needs a sample rate of at least ${MIN_LOUDNESS_SAMPLE_RATE_HZ} Hz, the clip has ${sampleRate} Hz: resample it first.`,
    );
  }
  if (opts.channelWeights !== undefined) {
    const weights = opts.channelWeights;
    if (weights.length !== channelCount) {
      throw new RangeError(`${fn}: channelWeights has ${weights.length} values for ${channelCount} channels`);
    }
    for (const [i, g] of weights.entries()) {
      if (!(Number.isFinite(g) && g >= 0)) {
        throw new RangeError(`${fn}: channelWeights[${i}] must be finite and ≥ 0, got ${g}`);
      }
    }
    return weights;
  }
  const d = defaultChannelWeights(channelCount);
  if (d === null) {
    throw new InputError(
      'unsupported-channel-layout',
      `Cannot weight ${channelCount} channels for loudness: the layout is ambiguous. ` +
        'Use a mono, stereo, 3.0, 5.0 or 5.1 file, or downmix it to stereo.',
    );
  }
  return d;
}

/**
 * {@link measureLoudness} block by block, for a clip whose length is known in advance and whose
 * samples arrive in pieces (a file being decoded): `add` the channels' next samples, in blocks of
 * any lengths, then read `result()`. The filters' state is carried from block to block and a
 * sub-block cut by a block edge is gathered first (whole-units.ts), so the report equals
 * measureLoudness's of the whole clip exactly. Memory: one float64 per channel and 100 ms.
 *
 * @example const m = new LoudnessStream(2, n, 48000); m.add([l, r], l.length); m.result().integratedLufs
 */
export class LoudnessStream {
  private readonly weights: number[];
  /** Channels of weight > 0, in order; filtered two at a time. */
  private readonly active: number[];
  private readonly edges: Float64Array;
  private readonly coeffs: KWeightingCoeffs;
  /** Sub-block sums Σ y² per channel (active channels only). */
  private readonly sums: Float64Array[];
  /** Filter state per active pair (8 values) or lone channel (4). */
  private readonly state: Float64Array[];
  private readonly units: WholeUnits;
  private readonly picked: Float32Array[];

  /**
   * @param sampleCount samples per channel of the whole clip
   * @throws as measureLoudness for the rate and the weights
   */
  constructor(
    private readonly channelCount: number,
    sampleCount: number,
    sampleRate: number,
    opts: { channelWeights?: number[] } = {},
    private readonly fn = 'LoudnessStream',
  ) {
    this.weights = channelWeights(fn, channelCount, sampleRate, opts);
    this.active = this.weights.flatMap((g, i) => (g === 0 ? [] : [i]));
    this.edges = subBlockEdges(sampleRate, sampleCount);
    this.coeffs = kWeightingCoeffs(sampleRate);
    const subBlocks = this.edges.length - 1;
    this.sums = this.active.map(() => new Float64Array(subBlocks));
    this.state = [];
    for (let j = 0; j < this.active.length; j += 2) this.state.push(new Float64Array(8));
    this.picked = this.active.map(() => new Float32Array(0));
    // Samples after the last whole sub-block lie in no block and are not read (module comment).
    const edges = this.edges;
    const covered = edges[subBlocks];
    this.units = new WholeUnits(this.active.length, subBlocks, covered, (k) => edges[k], Math.ceil(sampleRate / 10) + 1, (x, base, k0, k1) =>
      this.filter(x, base, k0, k1),
    );
  }

  /** Adds the next `len` samples of every channel (channels[c][0…len)). */
  add(channels: Float32Array[], len: number): void {
    if (channels.length !== this.channelCount) {
      throw new RangeError(`${this.fn}: ${channels.length} channels given, ${this.channelCount} announced`);
    }
    const take = Math.min(len, this.edges[this.edges.length - 1] - this.units.received);
    if (take <= 0) return;
    for (let j = 0; j < this.active.length; j++) this.picked[j] = channels[this.active[j]];
    this.units.add(this.picked, take);
  }

  /** Sub-blocks k0…k1−1 of the active channels (x[j] is active channel j), two at a time. */
  private filter(x: Float32Array[], base: number, k0: number, k1: number): void {
    const { coeffs, edges, sums } = this;
    for (let j = 0; j < x.length; j += 2) {
      const st = this.state[j >> 1];
      if (j + 1 < x.length) kWeightRunPair(x[j], x[j + 1], base, coeffs, edges, k0, k1, sums[j], sums[j + 1], st);
      else kWeightRun(x[j], base, coeffs, edges, k0, k1, sums[j], st, 0);
    }
  }

  /** The loudness report; RangeError before every sample up to the last whole sub-block has arrived. */
  result(): LoudnessReport {
    this.units.end(this.fn);
    const { edges, weights, active, sums } = this;
    const weighted = new Float64Array(edges.length - 1);
    // added in channel order, as measureLoudness always has
    for (let j = 0; j < active.length; j++) addScaled(weighted, weights[active[j]], sums[j]);
    const momentaryLufs = windowLoudness(weighted, edges, MOMENTARY_SUBBLOCKS);
    const shortTermLufs = windowLoudness(weighted, edges, SHORT_TERM_SUBBLOCKS);
    return {
      integratedLufs: gate(momentaryLufs, INTEGRATED_RELATIVE_GATE_LU).meanLufs,
      maxMomentaryLufs: maxOf(momentaryLufs),
      maxShortTermLufs: maxOf(shortTermLufs),
      loudnessRangeLu: loudnessRangeLu(shortTermLufs),
      momentaryLufs,
      shortTermLufs,
      blockHopS: 0.1,
    };
  }
}
