/**
 * Cutting a stream of sample blocks into whole units (frames, windows, sub-blocks), for the
 * measurements that sum over such units and must give the same figures whether the signal comes
 * whole or in blocks cut anywhere.
 *
 * The units are laid out over the whole signal, whose length is known in advance: unit k covers
 * samples [edge(k), edge(k+1)), the last ending at the signal's end. Each block is handed on as it
 * is, for the run of units that lie wholly inside it; a unit cut by a block edge is gathered in a
 * small carry buffer (one unit per channel) and handed on alone once complete. So a kernel always
 * sees whole units, in order, each exactly once, and reads each sample from wherever it lies.
 */

/**
 * Called with the arrays holding units k0…k1−1 (k0 < k1) and the index in the whole signal of their
 * element 0: unit k is x[c][edge(k) − base … edge(k+1) − base).
 */
export type UnitRun = (x: Float32Array[], base: number, k0: number, k1: number) => void;

/**
 * @example
 *   const u = new WholeUnits(2, count, (k) => frameStart(k, 44.1), 45, (x, base, k0, k1) => …);
 *   u.add(blockChannels, blockLength); // as often as needed; then u.end()
 */
export class WholeUnits {
  private readonly carry: Float32Array[];
  /** Samples of unit k held in carry. */
  private carried = 0;
  /** The next unit to hand on. */
  private k = 0;
  /** Samples received. */
  private at = 0;

  /**
   * @param channels arrays per block
   * @param units number of units; the last ends at `sampleCount`
   * @param edge start of unit k in samples, non-decreasing, edge(0) = 0; unit units−1 ends at sampleCount
   * @param maxUnit the longest unit, samples
   */
  constructor(
    channels: number,
    private readonly units: number,
    private readonly sampleCount: number,
    private readonly edge: (k: number) => number,
    maxUnit: number,
    private readonly run: UnitRun,
  ) {
    this.carry = Array.from({ length: channels }, () => new Float32Array(Math.max(1, maxUnit)));
  }

  /** End of unit k in samples. */
  private endOf(k: number): number {
    return k + 1 >= this.units ? this.sampleCount : this.edge(k + 1);
  }

  /** Hands on the whole units of the next `len` samples of each channel (x[c][0…len)). */
  add(x: Float32Array[], len: number): void {
    if (len <= 0) return;
    if (this.at + len > this.sampleCount) {
      throw new RangeError(`WholeUnits.add: more than the ${this.sampleCount} samples announced`);
    }
    let off = 0;
    if (this.carried > 0) {
      // complete the unit cut by the last block edge
      const unitLen = this.endOf(this.k) - this.edge(this.k);
      const take = Math.min(unitLen - this.carried, len);
      for (let c = 0; c < x.length; c++) this.carry[c].set(x[c].subarray(0, take), this.carried);
      this.carried += take;
      this.at += take;
      off = take;
      if (this.carried < unitLen) return;
      this.run(this.carry, this.edge(this.k), this.k, this.k + 1);
      this.k++;
      this.carried = 0;
    }
    const base = this.at - off; // index of x[c][0] in the whole signal
    const endAbs = base + len;
    let k1 = this.k;
    while (k1 < this.units && this.endOf(k1) <= endAbs) k1++;
    if (k1 > this.k) this.run(x, base, this.k, k1);
    this.k = k1;
    if (k1 < this.units) {
      const from = Math.max(this.edge(k1), this.at);
      for (let c = 0; c < x.length; c++) this.carry[c].set(x[c].subarray(from - base, len), 0);
      this.carried = endAbs - this.edge(k1);
    }
    this.at = endAbs;
  }

  /** Samples received so far. */
  get received(): number {
    return this.at;
  }

  /** RangeError unless every announced sample has arrived (then every unit has been handed on). */
  end(fn: string): void {
    if (this.at !== this.sampleCount) throw new RangeError(`${fn}: ${this.at} of ${this.sampleCount} samples added`);
  }
}
