/**
 * What planning reads of a signal, gathered block by block as it streams past (a render being
 * written, a pre-emphasised source, a clip being decoded): frame statistics, the magnitude
 * histogram and the zero-crossing pulse candidates. Apart from ./closed-loop.ts so that a thread
 * doing only this loads little (server/services/reduction-thread.ts).
 */
import { FrameStatsStream } from '../../shared/dsp/frame-stats.ts';
import { type MagnitudeHistogram, magnitudeHistogram } from '../../shared/dsp/histogram.ts';
import type { PlanClip } from '../../shared/plan/evaluate.ts';
import type { PulseEvents } from '../../shared/plan/pulse-train.ts';

/**
 * Upward zero crossings block by block: zeroCrossingEvents (shared/plan/pulse-train.ts) with its
 * Schmitt trigger's state, the running cycle peak and the previous sample carried across blocks, so
 * the events equal those of the whole signal.
 */
export class ZeroCrossingStream {
  private readonly times: number[] = [];
  private readonly levels: number[] = [];
  private armed = false;
  private peak = 0;
  private prev = 0;
  private at = 0;

  constructor(
    private readonly sampleRate: number,
    private readonly hysteresis = 1e-3,
  ) {}

  add(block: Float32Array): void {
    const h = this.hysteresis;
    const { times, levels } = this;
    let { armed, peak, prev, at } = this;
    for (let i = 0; i < block.length; i++, at++) {
      const x = block[i];
      const a = x < 0 ? -x : x;
      if (a > peak) peak = a;
      if (x < -h) armed = true;
      else if (armed && x > h) {
        armed = false;
        if (times.length > 0) levels[levels.length - 1] = peak;
        const frac = prev < 0 && x !== prev ? -prev / (x - prev) : 0;
        times.push((at - 1 + frac) / this.sampleRate);
        levels.push(0);
        peak = a;
      }
      prev = x;
    }
    Object.assign(this, { armed, peak, prev, at });
  }

  result(): PulseEvents {
    if (this.times.length > 0) this.levels[this.levels.length - 1] = this.peak;
    return { mode: 'zero-crossing', timeS: Float64Array.from(this.times), level: Float32Array.from(this.levels), durationS: this.at / this.sampleRate };
  }
}

/**
 * What planning reads of a signal, gathered block by block as the signal streams past (a render
 * being written, a pre-emphasised source): the 1 ms frame statistics, the magnitude histogram and,
 * for the pulse scheme, the zero-crossing pulse candidates. The same figures as the analysis
 * (computeFrameStats, magnitudeHistogram, zeroCrossingEvents) computes on the whole signal, without
 * keeping the samples.
 *
 * @example const r = new PlanReducer(n, 44100, false); r.add(block); … r.result('render')
 */
export class PlanReducer {
  private frames: FrameStatsStream;
  private histogram: MagnitudeHistogram;
  private crossings: ZeroCrossingStream | null;

  constructor(
    private readonly sampleCount: number,
    private readonly sampleRate: number,
    private readonly pulses: boolean,
  ) {
    this.frames = new FrameStatsStream(sampleCount, sampleRate);
    this.histogram = magnitudeHistogram(new Float32Array(0));
    this.crossings = pulses ? new ZeroCrossingStream(sampleRate) : null;
  }

  /** Starts over (a render pass replaced by the next). */
  restart(): void {
    this.frames = new FrameStatsStream(this.sampleCount, this.sampleRate);
    this.histogram = magnitudeHistogram(new Float32Array(0));
    this.crossings = this.pulses ? new ZeroCrossingStream(this.sampleRate) : null;
  }

  add(block: Float32Array): void {
    this.frames.add(block);
    magnitudeHistogram(block, { into: this.histogram });
    this.crossings?.add(block);
  }

  /** The planner's view of the signal (RangeError before every sample has been added). */
  result(name: string): PlanClip {
    const clip: PlanClip = { name, durationS: this.sampleCount / this.sampleRate, frames: this.frames.result(), histogram: this.histogram };
    if (this.crossings) clip.pulseEvents = this.crossings.result();
    return clip;
  }
}
