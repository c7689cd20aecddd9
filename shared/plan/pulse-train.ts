/**
 * Pulse drive derived from the audio, for the pulse scheme: the coil's bridge is gated on for a
 * short on-time at instants taken from the music, and the on-time follows the music's level.
 *
 * Two steps, so a gain search does not touch the samples again:
 * 1. `zeroCrossingEvents` / `pitchLockedEvents` find the candidate pulse instants and the source
 *    level at each (gain-independent, one pass).
 * 2. `pulsesAtGain` turns them into pulses for one gain, applying the driver's limits.
 *
 * On-time law (our convention, stated in docs/models.md): demanded on-time = maxOnTimeS · g · level,
 * so at 0 dB gain a full-scale event takes the on-time to its maximum. Limits, in this order:
 * - max on-time: a longer demand is cut to maxOnTimeS (counted as `onTimeClamped`);
 * - min off-time: a pulse that would start less than minOffTimeS after the previous one ended is
 *   dropped (counted as `offTimeDropped`);
 * - max duty: on-time ≤ maxDuty · (start − previous start), the duty of one pulse period
 *   (counted as `dutyClamped`). The first pulse has no period yet and is bounded by max on-time alone;
 * - min on-time: a pulse whose on-time, after the limits above, is shorter than minOnTimeS is
 *   dropped (counted as `minOnTimeDropped`): the coil cannot ring up in it, so it would make
 *   switching loss and no arc. Default {@link DEFAULT_MIN_ON_RF_CYCLES} RF cycles at the coil's
 *   resonance ({@link pulseLimitsFor}); a dropped pulse does not count as the previous pulse for
 *   the off-time and duty limits of the next.
 * Pulse interrupters in the trade limit these same three figures (common practice).
 */

/** Candidate pulse instants and the source level at each; independent of gain. */
export interface PulseEvents {
  mode: 'zero-crossing' | 'pitch-locked';
  /** Event times, s, ascending. */
  timeS: Float64Array;
  /** Source level at each event, linear full scale (peak |x| of the cycle that starts there). */
  level: Float32Array;
  /** Clip length, s. */
  durationS: number;
}

/** Driver limits on pulses (the driver profile's `pulse` block). */
export interface PulseLimits {
  maxOnTimeS: number;
  minOffTimeS: number;
  maxDuty: number;
  /** Shortest pulse sent, s; absent: no minimum here (see {@link pulseLimitsFor} for the coil's default). */
  minOnTimeS?: number;
}

/**
 * Default minimum on-time in RF cycles of the coil's resonance. A pulse of n cycles lifts the tank's
 * envelope to 1 − e^(−π·n/Q) of its steady amplitude (ring-up time constant Q/(π·f0), see
 * shared/physics/driver/currents.ts ringUpTimeS): three cycles give 15–38 % of the amplitude for the
 * loaded Q of small coils (25–60); fewer make little more than switching loss (common practice; the
 * figure is ours).
 */
export const DEFAULT_MIN_ON_RF_CYCLES = 3;

/**
 * The profile's pulse limits with the minimum on-time filled in: `minOnTimeS` when the profile gives
 * it, else {@link DEFAULT_MIN_ON_RF_CYCLES}/f0.
 *
 * @example pulseLimitsFor({ maxOnTimeS: 1.5e-4, minOffTimeS: 1e-3, maxDuty: 0.08 }, 318e3).minOnTimeS // → 9.43 µs
 */
export function pulseLimitsFor(limits: PulseLimits, resonanceHz: number): PulseLimits & { minOnTimeS: number } {
  if (!(resonanceHz > 0)) throw new RangeError(`pulseLimitsFor: resonanceHz must be > 0, got ${resonanceHz}`);
  return { ...limits, minOnTimeS: limits.minOnTimeS ?? DEFAULT_MIN_ON_RF_CYCLES / resonanceHz };
}

/** Pulses for one gain. */
export interface PulseTrain {
  startS: Float64Array;
  onS: Float64Array;
  count: number;
  /** Pulses whose demanded on-time exceeded maxOnTimeS. */
  onTimeClamped: number;
  /** Events dropped because they came sooner than minOffTimeS after the previous pulse ended. */
  offTimeDropped: number;
  /** Pulses shortened to respect maxDuty. */
  dutyClamped: number;
  /** Pulses dropped because their on-time was below minOnTimeS. */
  minOnTimeDropped: number;
  /** The minimum on-time applied, s (0: none). */
  minOnTimeS: number;
  /** Σ on-time, s. */
  totalOnS: number;
  /** Events considered (non-zero demanded on-time). */
  events: number;
}

/**
 * Upward zero crossings of `signal` with a Schmitt trigger of ±hysteresis (so noise near zero does
 * not chatter): an event fires when the signal rises above +h after having been below −h. The
 * level of each event is the peak |x| until the next event (the cycle's peak).
 *
 * @param hysteresis  linear full scale, default 1e-3 (−60 dBFS): quieter signals make no pulses
 * @example zeroCrossingEvents(sine100Hz, 48000).timeS.length // ≈ 100 per second
 */
export function zeroCrossingEvents(
  signal: Float32Array,
  sampleRate: number,
  opts: { hysteresis?: number } = {},
): PulseEvents {
  const h = opts.hysteresis ?? 1e-3;
  if (!(sampleRate > 0)) throw new RangeError(`zeroCrossingEvents: sampleRate must be > 0 Hz, got ${sampleRate}`);
  if (!(h > 0 && h < 1)) throw new RangeError(`zeroCrossingEvents: hysteresis must be in (0, 1), got ${h}`);
  // Two tight loops, one per trigger state (the samples are a whole clip: ~13 M for 5 minutes of
  // 44.1 kHz). Events go into typed arrays that double as they fill.
  const n = signal.length;
  let cap = 1024;
  let times = new Float64Array(cap);
  let levels = new Float32Array(cap);
  let count = 0;
  let peak = 0;
  let i = 0;
  for (;;) {
    // Disarmed: until the signal falls below −h.
    for (; i < n; i++) {
      const x = signal[i];
      const a = x < 0 ? -x : x;
      if (a > peak) peak = a;
      if (x < -h) break;
    }
    if (++i >= n) break;
    // Armed: until the signal rises above +h.
    for (; i < n; i++) {
      const x = signal[i];
      if (x > h) break;
      const a = x < 0 ? -x : x;
      if (a > peak) peak = a;
    }
    if (i >= n) break;
    const x = signal[i];
    if (x > peak) peak = x;
    if (count > 0) levels[count - 1] = peak; // the previous cycle's peak, up to and with this sample
    if (count === cap) {
      cap *= 2;
      const t = new Float64Array(cap);
      t.set(times);
      times = t;
      const l = new Float32Array(cap);
      l.set(levels);
      levels = l;
    }
    // Interpolate the crossing of zero between the previous sample and this one.
    const prev = signal[i - 1];
    const frac = prev < 0 && x !== prev ? -prev / (x - prev) : 0;
    times[count] = (i - 1 + frac) / sampleRate;
    levels[count] = 0;
    count++;
    peak = x;
    i++;
  }
  if (count > 0) levels[count - 1] = peak;
  return {
    mode: 'zero-crossing',
    timeS: times.slice(0, count),
    level: levels.slice(0, count),
    durationS: signal.length / sampleRate,
  };
}

/**
 * Pulses locked to a pitch track: an event fires at each whole cycle of the tracked pitch while the
 * hop is voiced (f0 finite), phase-continuous across hops; unvoiced hops make no pulses. The level
 * of an event is the frame peak |x| (from per-frame min/max) at its time.
 *
 * @param f0Hz  pitch per hop (NaN = unvoiced); hop j covers [firstS + j·hopS, firstS + (j+1)·hopS)
 * @param framePeak  per-frame peak |x| on a grid of `frameS`, linear full scale
 * @param firstS  start of the first hop, s (a pitch track centred on its frames starts half a hop
 *   before its first centre)
 */
export function pitchLockedEvents(
  f0Hz: Float32Array,
  hopS: number,
  framePeak: Float32Array,
  frameS: number,
  durationS: number,
  firstS = 0,
): PulseEvents {
  if (!(hopS > 0 && frameS > 0)) throw new RangeError(`pitchLockedEvents: hopS and frameS must be > 0 s, got ${hopS}, ${frameS}`);
  const times: number[] = [];
  const levels: number[] = [];
  // Cycles left until the next event; carried across hops so the train stays phase-continuous
  // when the pitch changes, reset when the pitch track drops out.
  let remainingCycles = 0;
  for (let j = 0; j < f0Hz.length; j++) {
    const f = f0Hz[j];
    const t0 = Math.max(0, firstS + j * hopS);
    if (!Number.isFinite(f) || f <= 0) {
      remainingCycles = 0;
      continue;
    }
    // The hop's own end, not t0 + hopS: a first hop that starts before the clip is cut at 0, and
    // stretching it to a whole hop would overlap the next one and fire its cycles twice.
    const t1 = Math.min(firstS + (j + 1) * hopS, durationS);
    if (!(t1 > t0)) continue;
    let m = 0; // events are at t0 + (remainingCycles + m)/f: no running-sum drift within a hop
    for (let t = t0 + remainingCycles / f; t < t1; t = t0 + (remainingCycles + ++m) / f) {
      times.push(t);
      const k = Math.min(framePeak.length - 1, Math.floor(t / frameS));
      levels.push(k >= 0 ? framePeak[k] : 0);
    }
    remainingCycles = remainingCycles + m - (t1 - t0) * f;
  }
  return { mode: 'pitch-locked', timeS: Float64Array.from(times), level: Float32Array.from(levels), durationS };
}

/**
 * Pulses for gain `gain` (linear amplitude factor), applying the limits in the order of the module
 * comment. Events whose demanded on-time is 0 are skipped. Pass `out` (from a previous call with
 * the same events) to reuse buffers in a gain search.
 *
 * @example pulsesAtGain(events, 1, { maxOnTimeS: 2e-4, minOffTimeS: 5e-4, maxDuty: 0.1 })
 */
export function pulsesAtGain(events: PulseEvents, gain: number, limits: PulseLimits, out?: PulseTrain): PulseTrain {
  const n = events.timeS.length;
  const startS = out && out.startS.length >= n ? out.startS : new Float64Array(n);
  const onS = out && out.onS.length >= n ? out.onS : new Float64Array(n);
  const { maxOnTimeS, minOffTimeS, maxDuty } = limits;
  const minOnTimeS = limits.minOnTimeS ?? 0;
  let minOnTimeDropped = 0;
  let count = 0;
  let onTimeClamped = 0;
  let offTimeDropped = 0;
  let dutyClamped = 0;
  let totalOnS = 0;
  let considered = 0;
  let prevStart = -Infinity;
  let prevEnd = -Infinity;
  for (let i = 0; i < n; i++) {
    let on = maxOnTimeS * gain * events.level[i];
    if (!(on > 0)) continue;
    considered++;
    const t = events.timeS[i];
    if (on > maxOnTimeS) {
      on = maxOnTimeS;
      onTimeClamped++;
    }
    if (t < prevEnd + minOffTimeS) {
      offTimeDropped++;
      continue;
    }
    const dutyCap = maxDuty * (t - prevStart); // Infinity for the first pulse
    if (on > dutyCap) {
      on = dutyCap;
      dutyClamped++;
    }
    // A pulse cannot run past the end of the clip.
    on = Math.min(on, Math.max(0, events.durationS - t));
    if (on <= 0) continue;
    if (on < minOnTimeS) {
      minOnTimeDropped++;
      continue;
    }
    startS[count] = t;
    onS[count] = on;
    count++;
    totalOnS += on;
    prevStart = t;
    prevEnd = t + on;
  }
  return { startS, onS, count, onTimeClamped, offTimeDropped, dutyClamped, minOnTimeDropped, minOnTimeS, totalOnS, events: considered };
}
