/**
 * The modulation preview: what the clip at a gain does to the coil's drive, decimated for display.
 *
 * Rail schemes (rail-linear, rail-switched): the rail v = (V_s/2)(1 + g·x), confined to 0…V_s
 * (shared/plan/evaluate.ts), shown as min/max pairs per display column. The extremes are exact:
 * each column takes the min of the frame minima and the max of the frame maxima
 * (shared/dsp/frame-stats.ts keeps exact sample extremes per frame), and v is monotone in x.
 * Power to the coil on the same grid, resistive equivalent of the driver (rail current
 * I = (I_full/V_s)·v): P = E[v²]·I_full/V_s, with E[v²] per frame from the frame moments
 * (railAtGain: clamped to the feasible set of a confined rail); per column the sample-weighted mean
 * and the highest 1-frame value.
 *
 * Pulse scheme: the pulse train of shared/plan/pulse-train.ts at the gain (driver limits applied);
 * per column the pulse count, the longest on-time and the on-time fraction (duty, overlaps split
 * exactly between columns). Power: duty × full power V_s·I_full (the bridge runs from the full
 * supply at I_full while on, as shared/physics/driver/simulate-pulses.ts models it); the column
 * maximum is full power when any pulse falls in it (the power during a pulse).
 *
 * Pure, from the plan's reductions (frame statistics, pulse events): no pass over the samples.
 */
import { frameStart } from '../dsp/frame-stats.ts';
import { type PlanClip, createScratch, railAtGain } from '../plan/evaluate.ts';
import { pulseLimitsFor, pulsesAtGain } from '../plan/pulse-train.ts';
import type { DriverProfile, DriverScheme } from '../schemas/driver.ts';
import { dbToAmp } from '../units.ts';

/** Most display columns by default (a wide screen at one column per pixel). */
export const DEFAULT_MAX_COLUMNS = 4000;

/**
 * The preview on a display grid of `columns` columns (column j spans edgesS[j]…edgesS[j+1] s).
 * Typed arrays serialise with Array.from at the edge. Units: V, W, s, on-time fraction 0…1.
 */
export interface ModulationPreview {
  scheme: DriverScheme;
  gainDb: number;
  durationS: number;
  /** Number of display columns (≤ maxColumns). */
  columns: number;
  /** Analysis frames per column (the last column may hold fewer). */
  framesPerColumn: number;
  /** Nominal column length, s (framesPerColumn × frame length). */
  columnS: number;
  /** Start of each column, s (columns + 1 edges: the last is the clip's end). */
  edgesS: Float64Array;
  /** Rail schemes: lowest and highest rail voltage in each column, V. */
  rail: { minV: Float32Array; maxV: Float32Array } | null;
  /** Pulse scheme: pulses starting in each column, longest on-time (s) and on-time fraction (0…1). */
  pulses: { count: Uint32Array; maxOnS: Float32Array; duty: Float32Array } | null;
  /** Power delivered to the coil per column, W: mean over the column and highest frame (rail) or pulse (pulse). */
  power: { meanW: Float32Array; maxW: Float32Array };
  /** Ranges over the whole clip. */
  range: {
    /** Rail schemes: lowest / highest rail voltage, V (null for pulses). */
    railMinV: number | null;
    railMaxV: number | null;
    /** Pulse scheme: total pulses and longest on-time, s (null for rail schemes). */
    pulseCount: number | null;
    maxOnS: number | null;
    /** Mean power over the clip and the highest column maximum, W. */
    meanPowerW: number;
    maxPowerW: number;
  };
}

/**
 * Builds the modulation preview of `clip` on `driver` at `gainDb` (module comment for the models).
 * Throws RangeError for a non-finite gain (−Infinity is allowed: silence), maxColumns < 1, or a
 * pulse-scheme driver without pulse limits, a clip without pulse events, or no resonance.
 *
 * @param clip  the planner's view (shared/plan/plan-clip.ts toPlanClip)
 * @param opts.maxColumns  most display columns (default 4000)
 * @param opts.resonanceHz  the coil's resonance, Hz: the pulse scheme drops pulses shorter than the
 *   minimum on-time as the planner does (pulseLimitsFor: the profile's, else a few RF cycles)
 * @example modulationPreview(plan, DEMO_DRIVER_LINEAR, -3).rail!.maxV[0] // V, ≤ 48
 */
export function modulationPreview(clip: PlanClip, driver: DriverProfile, gainDb: number, opts: { maxColumns?: number; resonanceHz?: number } = {}): ModulationPreview {
  const maxColumns = opts.maxColumns ?? DEFAULT_MAX_COLUMNS;
  if (!(Number.isInteger(maxColumns) && maxColumns >= 1)) throw new RangeError(`modulationPreview: maxColumns must be an integer ≥ 1, got ${maxColumns}`);
  if (Number.isNaN(gainDb) || gainDb === Infinity) throw new RangeError(`modulationPreview: gainDb must be finite or −Infinity, got ${gainDb}`);
  const f = clip.frames;
  const g = dbToAmp(gainDb);
  const perCol = Math.max(1, Math.ceil(f.count / maxColumns));
  const columns = Math.ceil(f.count / perCol);
  const spf = f.samplesPerFrame;
  const edgesS = new Float64Array(columns + 1);
  for (let j = 0; j < columns; j++) edgesS[j] = frameStart(j * perCol, spf) / f.sampleRate;
  edgesS[columns] = f.sampleCount / f.sampleRate;
  const meanW = new Float32Array(columns);
  const maxW = new Float32Array(columns);
  const vs = driver.supplyVoltageV;
  const fullW = vs * driver.fullRailCurrentA;
  const base = { scheme: driver.scheme, gainDb, durationS: clip.durationS, columns, framesPerColumn: perCol, columnS: perCol * f.frameS, edgesS };

  if (driver.scheme !== 'pulse') {
    const conductance = driver.fullRailCurrentA / vs;
    const { meanSquareV2 } = railAtGain(f, g, vs, createScratch(clip));
    const minV = new Float32Array(columns);
    const maxV = new Float32Array(columns);
    const h = vs / 2;
    const railOf = (x: number) => {
      const v = h * (1 + g * x);
      return v < 0 ? 0 : v > vs ? vs : v;
    };
    let railMin = Infinity;
    let railMax = -Infinity;
    let energy = 0;
    let maxPower = 0;
    for (let j = 0; j < columns; j++) {
      const k0 = j * perCol;
      const k1 = Math.min(f.count, k0 + perCol);
      let lo = Infinity;
      let hi = -Infinity;
      let pMax = 0;
      let acc = 0;
      let start = frameStart(k0, spf);
      const colStart = start;
      for (let k = k0; k < k1; k++) {
        const end = k + 1 === f.count ? f.sampleCount : frameStart(k + 1, spf);
        if (f.min[k] < lo) lo = f.min[k];
        if (f.max[k] > hi) hi = f.max[k];
        const p = conductance * meanSquareV2[k];
        acc += (end - start) * p;
        if (p > pMax) pMax = p;
        start = end;
      }
      // g ≥ 0, so the rail's extremes are those of x.
      minV[j] = railOf(lo);
      maxV[j] = railOf(hi);
      meanW[j] = acc / (start - colStart);
      maxW[j] = pMax;
      energy += acc;
      if (minV[j] < railMin) railMin = minV[j];
      if (maxV[j] > railMax) railMax = maxV[j];
      if (pMax > maxPower) maxPower = pMax;
    }
    return {
      ...base,
      rail: { minV, maxV },
      pulses: null,
      power: { meanW, maxW },
      range: { railMinV: railMin, railMaxV: railMax, pulseCount: null, maxOnS: null, meanPowerW: energy / f.sampleCount, maxPowerW: maxPower },
    };
  }

  if (!driver.pulse) throw new RangeError('modulationPreview: the pulse scheme needs driver.pulse limits');
  if (!clip.pulseEvents) throw new RangeError('modulationPreview: the pulse scheme needs clip.pulseEvents');
  if (!(opts.resonanceHz !== undefined && opts.resonanceHz > 0)) throw new RangeError(`modulationPreview: the pulse scheme needs the coil's resonanceHz, got ${opts.resonanceHz}`);
  const train = pulsesAtGain(clip.pulseEvents, g, pulseLimitsFor(driver.pulse, opts.resonanceHz));
  const count = new Uint32Array(columns);
  const maxOnS = new Float32Array(columns);
  const onS = new Float64Array(columns);
  let longest = 0;
  let j = 0;
  for (let i = 0; i < train.count; i++) {
    const s = train.startS[i];
    const e = s + train.onS[i];
    while (j + 1 < columns && edgesS[j + 1] <= s) j++;
    count[j]++;
    if (train.onS[i] > maxOnS[j]) maxOnS[j] = train.onS[i];
    if (train.onS[i] > longest) longest = train.onS[i];
    // Split the on-interval [s, e) exactly between the columns it overlaps.
    for (let c = j; c < columns && edgesS[c] < e; c++) {
      const a = Math.max(s, edgesS[c]);
      const b = Math.min(e, edgesS[c + 1]);
      if (b > a) onS[c] += b - a;
      if (onS[c] > 0) maxW[c] = fullW;
    }
  }
  const duty = new Float32Array(columns);
  let totalOn = 0;
  for (let c = 0; c < columns; c++) {
    const len = edgesS[c + 1] - edgesS[c];
    duty[c] = len > 0 ? onS[c] / len : 0;
    meanW[c] = duty[c] * fullW;
    totalOn += onS[c];
  }
  return {
    ...base,
    rail: null,
    pulses: { count, maxOnS, duty },
    power: { meanW, maxW },
    range: {
      railMinV: null,
      railMaxV: null,
      pulseCount: train.count,
      maxOnS: longest,
      meanPowerW: clip.durationS > 0 ? (totalOn / clip.durationS) * fullW : 0,
      maxPowerW: train.count > 0 ? fullW : 0,
    },
  };
}
