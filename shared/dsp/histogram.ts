/**
 * Fine histogram of sample magnitudes |x| over a whole clip, in log-spaced (dB) bins, and queries on
 * it. With it the over-modulation fraction at any gain g is one query, fractionAbove(hist, 1/g),
 * with no pass over the samples.
 *
 * Bin layout: bin i holds magnitudes m with e_i ≤ m < e_(i+1), e_i = 10^((minDb + i·binDb)/20)
 * (dBFS = 20·log10 m). Exact zeros, magnitudes below e_0 and magnitudes at or above e_nBins are
 * counted separately (`zeros`, `below`, `above`), and the highest magnitude is kept (`peak`).
 * Every sample lands in the bin these linear edges define, with no rounding of a logarithm.
 *
 * Method: the float32 bit pattern of |x| is monotonic in |x|. Its exponent and top mantissa bits
 * index a table of sub-octave slices narrower than one bin (10 mantissa bits: ≤ 0.0085 dB for
 * 0.01 dB bins), each slice holding the bin of its lowest value and, when the slice straddles a bin
 * edge, that edge as float32 bits; one integer compare then settles the bin. No logarithm per
 * sample.
 */
import { ampToDb, dbToAmp } from '../units.ts';

export interface MagnitudeHistogram {
  /** Bin width, dB. */
  binDb: number;
  /** Lower edge of bin 0, dBFS. */
  minDb: number;
  /** Upper edge of the last bin, dBFS. */
  maxDb: number;
  /** Samples per bin; bin i covers [minDb + i·binDb, minDb + (i+1)·binDb) dBFS. */
  counts: Float64Array;
  /** Samples exactly 0 (±0). */
  zeros: number;
  /** Non-zero samples with magnitude below minDb. */
  below: number;
  /** Samples with magnitude at or above maxDb (possible in float sources). */
  above: number;
  /** All samples counted: zeros + below + Σcounts + above. */
  total: number;
  /** Highest magnitude counted, linear full scale (0 if none). */
  peak: number;
}

export interface HistogramOptions {
  /** Bin width, dB (default 0.01; at least 0.0001). */
  binDb?: number;
  /** Lower edge, dBFS (default −120; at least −740, the float32 normal range). */
  minDb?: number;
  /** Upper edge, dBFS (default +6; at most +700). (maxDb − minDb)/binDb must be a whole number. */
  maxDb?: number;
  /** Add into this histogram (same layout) instead of allocating one: merges channels or chunks. */
  into?: MagnitudeHistogram;
}

/** A validated bin layout with its lookup tables (see the module comment); made once per layout and cached. */
export interface HistogramLayout {
  key: string;
  binDb: number;
  minDb: number;
  maxDb: number;
  nBins: number;
  edges: Float64Array;
  shift: number;
  keyLo: number;
  /** acc index (bucket + 1; 0 = below, nBins + 1 = above) of each slice's lowest value. */
  tab: Int32Array;
  /**
   * float32 bits of the first value in the next bucket when the slice straddles an edge, else
   * 0x7fffffff (above every finite magnitude's bits). Int32, so V8 compares small integers.
   */
  edgeBits: Int32Array;
}

const f32 = new Float32Array(1);
const u32 = new Uint32Array(f32.buffer);
const bitsOf = (x: number): number => ((f32[0] = x), u32[0]);
const valueOfBits = (b: number): number => ((u32[0] = b), f32[0]);

/** Bin edge i of a layout, linear: 10^((minDb + i·binDb)/20). @example binEdgeLinear(h, 0) // 1e-6 for −120 dBFS */
export const binEdgeLinear = (h: Pick<MagnitudeHistogram, 'minDb' | 'binDb'>, i: number): number =>
  dbToAmp(h.minDb + i * h.binDb);

let cached: HistogramLayout | undefined;

function layoutFor(binDb: number, minDb: number, maxDb: number): HistogramLayout {
  const key = `${binDb}|${minDb}|${maxDb}`;
  if (cached?.key === key) return cached;
  const fn = 'magnitudeHistogram';
  if (!(binDb >= 1e-4 && binDb < Infinity)) throw new RangeError(`${fn}: binDb must be ≥ 0.0001 dB, got ${binDb}`);
  if (!(minDb >= -740)) throw new RangeError(`${fn}: minDb must be ≥ −740 dBFS, got ${minDb}`);
  if (!(maxDb <= 700 && maxDb > minDb)) throw new RangeError(`${fn}: maxDb must be above minDb and ≤ 700 dBFS, got ${maxDb}`);
  const nBins = Math.round((maxDb - minDb) / binDb);
  if (nBins > 1 << 24) throw new RangeError(`${fn}: ${nBins} bins is too many (at most 2^24); widen binDb or narrow the range`);
  if (Math.abs(nBins * binDb - (maxDb - minDb)) > 1e-9 * binDb * nBins) {
    throw new RangeError(`${fn}: (maxDb − minDb)/binDb must be a whole number, got ${(maxDb - minDb) / binDb}`);
  }
  const edges = new Float64Array(nBins + 1);
  for (let i = 0; i <= nBins; i++) edges[i] = dbToAmp(minDb + i * binDb);
  // Mantissa bits m such that a slice (relative width ≤ 2^−m) is narrower than one bin.
  let m = 1;
  while (20 * Math.log10(1 + 2 ** -m) >= binDb) m++;
  const shift = 23 - m;
  const keyLo = (bitsOf(edges[0]) >>> shift) - 1;
  const keyHi = (bitsOf(edges[nBins]) >>> shift) + 1;
  const tabLen = keyHi - keyLo;
  if (tabLen > 1 << 23) throw new RangeError(`${fn}: layout too fine (${tabLen} table slices); use wider bins or a narrower range`);
  const tab = new Int32Array(tabLen);
  const edgeBits = new Int32Array(tabLen);
  // Buckets of each slice's lowest and highest value, found by walking the slices and the edges
  // together (both ascend): b is −1 below edges[0], i for edges[i] ≤ v < edges[i+1], nBins at or
  // above edges[nBins].
  let b = -1;
  const bucketAt = (v: number): number => {
    while (b < nBins && v >= edges[b + 1]) b++;
    return b;
  };
  for (let t = 0; t < tabLen; t++) {
    const k = keyLo + t;
    const bLo = bucketAt(valueOfBits(k << shift));
    const bHi = bucketAt(valueOfBits(((k + 1) << shift) - 1));
    tab[t] = bLo + 1;
    if (bHi === bLo) {
      edgeBits[t] = 0x7fffffff;
    } else if (bHi === bLo + 1) {
      // smallest float32 ≥ the edge between the two buckets
      const e = edges[bLo + 1];
      let eb = bitsOf(e);
      if (valueOfBits(eb) < e) eb++;
      edgeBits[t] = eb;
    } else {
      throw new Error(`magnitudeHistogram: internal error, slice ${k} spans buckets ${bLo}…${bHi}`);
    }
  }
  cached = { key, binDb, minDb, maxDb, nBins, edges, shift, keyLo, tab, edgeBits };
  return cached;
}

const CHUNK = 1 << 30;

/**
 * Kernel: counts the magnitudes whose float32 bits (sign ignored) are bits32[from…to) into acc
 * ([below, bins…, above, zeros]); returns the highest magnitude's bits, or −1 − index of the first
 * NaN. The straddle test is branch-free ((edge − b − 1) >>> 31 is 1 exactly when b ≥ edge): a
 * data-dependent branch there mispredicts about half the time and doubles the run time.
 */
function countMagnitudeBits(bits32: Int32Array, from: number, to: number, L: HistogramLayout, acc: Int32Array): number {
  const { tab, edgeBits, shift, keyLo } = L;
  const tabLen = tab.length;
  const aboveAt = L.nBins + 1;
  const zerosAt = L.nBins + 2;
  let peakBits = 0;
  for (let i = from; i < to; i++) {
    const b = bits32[i] & 0x7fffffff;
    const t = (b >> shift) - keyLo;
    if (t >= 0 && t < tabLen) {
      acc[tab[t] + ((edgeBits[t] - b - 1) >>> 31)]++;
    } else if (t < 0) {
      acc[b === 0 ? zerosAt : 0]++;
    } else {
      if (b > 0x7f800000) return -1 - i;
      acc[aboveAt]++;
    }
    if (b > peakBits) peakBits = b;
  }
  return peakBits;
}

/**
 * Histogram of |x| over `signal` in bins of binDb dB from minDb to maxDb (layout in the module
 * comment), counting exact zeros, below-range and above-range samples apart. Exact (each sample in
 * the bin its linear edges define); one pass, integer operations only.
 * Throws RangeError on NaN samples (±∞ counts as above range) or on a bad layout.
 *
 * @param signal  samples, linear full scale
 * @example magnitudeHistogram(x).counts.length // 12600 bins of 0.01 dB from −120 to +6 dBFS
 */
export function magnitudeHistogram(signal: Float32Array, opts: HistogramOptions = {}): MagnitudeHistogram {
  const L = histogramLayout(opts);
  // acc: [below, bin 0 … bin nBins−1, above, zeros]; Int32 counts (fast in V8), so the signal is
  // taken in chunks of 2^30 samples and each chunk's counts are added to the float64 result.
  const acc = new Int32Array(L.nBins + 3);
  const h = opts.into ?? emptyHistogram(L);
  const bits32 = new Int32Array(signal.buffer, signal.byteOffset, signal.length);
  const n = signal.length;
  for (let from = 0; from < n; from += CHUNK) {
    const to = Math.min(n, from + CHUNK);
    acc.fill(0);
    const r = countMagnitudeBits(bits32, from, to, L, acc);
    if (r < 0) throw new RangeError(`magnitudeHistogram: signal has a NaN sample at index ${-1 - r}`);
    addCounts(h, acc, r, to - from);
  }
  return h;
}

/**
 * The layout of `opts` (binDb, minDb, maxDb; defaults 0.01, −120, +6), checked, with the tables a
 * counting loop needs; `opts.into` must match it. For passes that count magnitudes while doing
 * other work on the same samples; the counting itself is exactly countMagnitudeBits'.
 *
 * @throws RangeError for a bad layout, or an `into` of another layout
 * @example const L = histogramLayout({}); // 12 600 bins of 0.01 dB
 */
export function histogramLayout(opts: HistogramOptions = {}): HistogramLayout {
  const binDb = opts.binDb ?? 0.01;
  const minDb = opts.minDb ?? -120;
  const maxDb = opts.maxDb ?? 6;
  const L = layoutFor(binDb, minDb, maxDb);
  const into = opts.into;
  if (into && (into.binDb !== binDb || into.minDb !== minDb || into.maxDb !== maxDb || into.counts.length !== L.nBins)) {
    throw new RangeError('magnitudeHistogram: `into` has a different layout (binDb, minDb, maxDb) from the one asked for');
  }
  return L;
}

/** An empty histogram of layout L. @example emptyHistogram(histogramLayout({})).total // 0 */
export function emptyHistogram(L: HistogramLayout): MagnitudeHistogram {
  const { binDb, minDb, maxDb } = L;
  return { binDb, minDb, maxDb, counts: new Float64Array(L.nBins), zeros: 0, below: 0, above: 0, total: 0, peak: 0 };
}

/**
 * Adds one run's counts to `h`: acc is [below, bin 0 … bin nBins−1, above, zeros] as the counting
 * loop fills it, peakBits the float32 bits of the run's highest magnitude, n its number of samples.
 */
export function addCounts(h: MagnitudeHistogram, acc: Int32Array, peakBits: number, n: number): void {
  const nBins = h.counts.length;
  const c = h.counts;
  for (let i = 0; i < nBins; i++) c[i] += acc[i + 1];
  h.below += acc[0];
  h.above += acc[nBins + 1];
  h.zeros += acc[nBins + 2];
  h.total += n;
  const peak = valueOfBits(peakBits);
  if (peak > h.peak) h.peak = peak;
}

/** Samples a counting loop may take at once: its Int32 counts cannot overflow below this. */
export const HISTOGRAM_RUN_MAX = CHUNK;

/**
 * Fraction (0…1) of samples with |x| > levelLinear, from the histogram alone. In the bin holding
 * the level, samples are taken as uniform in dB between the bin's lower edge and the lesser of its
 * upper edge and the peak, so the result is continuous, non-increasing, and exactly 0 at and above
 * the peak. Worst-case error: the share of that one bin, counts[j]/total (equivalently, the exact
 * answer at a level within one bin, ±binDb). Below the range the `below` samples count as above the
 * level (an upper bound, error ≤ below/total); above the range the `above` samples are taken as
 * uniform in dB between maxDb and the peak (error ≤ above/total). NaN for an empty histogram.
 *
 * Over-modulation at gain g (samples that would exceed full scale) is fractionAbove(hist, 1/g).
 * @example fractionAbove(magnitudeHistogram(sine), Math.SQRT1_2) // ≈ 0.5 (arcsine law)
 */
export function fractionAbove(hist: MagnitudeHistogram, levelLinear: number): number {
  if (Number.isNaN(levelLinear)) throw new RangeError('fractionAbove: levelLinear is NaN');
  const { total, counts, peak } = hist;
  if (total === 0) return NaN;
  if (levelLinear < 0) return 1;
  if (levelLinear >= peak) return 0;
  if (levelLinear === 0) return (total - hist.zeros) / total;
  const nBins = counts.length;
  const lowDb = hist.minDb;
  const topDb = hist.minDb + nBins * hist.binDb;
  const levelDb = ampToDb(levelLinear);
  const peakDb = ampToDb(peak);
  if (levelLinear < binEdgeLinear(hist, 0)) {
    let s = hist.below + hist.above;
    for (let i = 0; i < nBins; i++) s += counts[i];
    return s / total;
  }
  if (levelLinear >= binEdgeLinear(hist, nBins)) {
    return (hist.above * share(peakDb - levelDb, peakDb - topDb)) / total;
  }
  const j = binOf(hist, levelLinear);
  let s = hist.above;
  for (let i = j + 1; i < nBins; i++) s += counts[i];
  const binLowDb = lowDb + j * hist.binDb;
  const binHighDb = Math.min(binLowDb + hist.binDb, peakDb);
  s += counts[j] * share(binHighDb - levelDb, binHighDb - binLowDb);
  return s / total;
}

/**
 * Magnitude below or at which `percent` % of the samples lie (the inverse of 1 − fractionAbove:
 * fractionAbove(h, percentileMagnitude(h, p)) = 1 − p/100 when the result falls in a bin), linear
 * full scale, interpolated uniformly in dB within a bin (error ≤ one bin, binDb dB). Zeros come
 * first (a percentile inside them is 0); inside the `below` samples it returns the range's lower
 * edge (an upper bound); inside the `above` samples it interpolates in dB up to the peak.
 * percent = 0 gives the lower edge of the lowest occupied bin (or 0 with zeros), percent = 100 the
 * peak. NaN for an empty histogram.
 * @example percentileMagnitude(magnitudeHistogram(sine), 50) // ≈ A·sin(π/4) = 0.7071·A (arcsine law)
 */
export function percentileMagnitude(hist: MagnitudeHistogram, percent: number): number {
  if (!(percent >= 0 && percent <= 100)) throw new RangeError(`percentileMagnitude: percent must be in 0…100, got ${percent}`);
  const { total, counts, peak } = hist;
  if (total === 0) return NaN;
  const target = (percent / 100) * total;
  let cum = hist.zeros;
  if (cum > 0 && target <= cum) return 0;
  cum += hist.below;
  if (hist.below > 0 && target <= cum) return Math.min(binEdgeLinear(hist, 0), peak);
  const peakDb = ampToDb(peak);
  const nBins = counts.length;
  for (let j = 0; j < nBins; j++) {
    const c = counts[j];
    if (c > 0 && target <= cum + c) {
      const binLowDb = hist.minDb + j * hist.binDb;
      const binHighDb = Math.min(binLowDb + hist.binDb, peakDb);
      return dbToAmp(binLowDb + ((target - cum) / c) * (binHighDb - binLowDb));
    }
    cum += c;
  }
  const topDb = hist.minDb + nBins * hist.binDb;
  if (hist.above === 0) return peak;
  return dbToAmp(topDb + clamp01((target - cum) / hist.above) * (peakDb - topDb));
}

const clamp01 = (x: number): number => (x < 0 ? 0 : x > 1 ? 1 : x);

/** part/whole clamped to 0…1; 1 when the interval has collapsed (level and peak in one rounding). */
const share = (part: number, whole: number): number => (whole > 0 ? clamp01(part / whole) : 1);

/** The bin j with e_j ≤ v < e_(j+1) for e_0 ≤ v < e_nBins (edges from binEdgeLinear). */
function binOf(hist: MagnitudeHistogram, v: number): number {
  const nBins = hist.counts.length;
  let i = Math.floor((ampToDb(v) - hist.minDb) / hist.binDb);
  if (i < 0) i = 0;
  if (i > nBins - 1) i = nBins - 1;
  while (i > 0 && v < binEdgeLinear(hist, i)) i--;
  while (i < nBins - 1 && v >= binEdgeLinear(hist, i + 1)) i++;
  return i;
}
