/**
 * Planning from an analysis's stored reductions (the server keeps them on disk: see
 * server/storage/reductions.ts), so a plan, a re-evaluation at another gain, a modulation preview
 * or a set plan never decodes the clip again. The documents are those of server/services/plan.ts,
 * built by the same functions as `coilcue plan --json`.
 */
import type { ClipAnalysis } from '../../shared/analysis/analyze-clip.ts';
import { frameStart } from '../../shared/dsp/frame-stats.ts';
import type { Advice, GainSearch } from '../../shared/plan/advise.ts';
import { type PlanClip, type PlanSettings, evaluateAtGain, planSettings } from '../../shared/plan/evaluate.ts';
import type { PulseEvents } from '../../shared/plan/pulse-train.ts';
import { type SetResult, planSet } from '../../shared/plan/set.ts';
import { simulateSteady } from '../../shared/plan/steady.ts';
import type { ThermalState } from '../../shared/physics/driver/types.ts';
import { type ModulationPreview, modulationPreview } from '../../shared/preview/modulation.ts';
import type { CoilProfile } from '../../shared/schemas/coil.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import { type PlanDocument, planClipDocument } from './plan.ts';
import { coilAtResonance, coilReportFor } from './profiles.ts';

/** What an analysis job stores: the whole analysis and the zero-crossing pulse candidates of its source. */
export interface StoredReductions {
  analysis: ClipAnalysis;
  pulseEvents: PulseEvents;
}

/** The planner's view of a stored analysis (as toPlanClip builds it from the samples, zero-crossing pulses). */
export function planClipOf(r: StoredReductions, name: string, driver: DriverProfile): PlanClip {
  const clip: PlanClip = { name, durationS: r.analysis.durationS, frames: r.analysis.frames, histogram: r.analysis.histogram };
  if (driver.scheme === 'pulse') clip.pulseEvents = r.pulseEvents;
  return clip;
}

export type PlanSettingsInput = Partial<PlanSettings>;

/** `coilcue plan --json`'s document for a stored analysis: at `gainDb`, or advised when it is null. */
export function storedPlanDocument(
  r: StoredReductions,
  name: string,
  coil: CoilProfile,
  driver: DriverProfile,
  settings: PlanSettingsInput,
  gainDb: number | null,
  traces = false,
  advice?: Advice | GainSearch,
): ReturnType<typeof planClipDocument> & { settings: PlanSettings } {
  const report = coilReportFor(coil, driver);
  const s = planSettings(driver, settings);
  const out = planClipDocument(planClipOf(r, name, driver), r.analysis, report, driver, s, { gainDb: gainDb ?? undefined, traces, advice });
  return { ...out, settings: s };
}

/** Reduces a per-frame series to at most `columns` columns by their maximum; column j starts at timeS[j]. */
export function maxByColumns(series: ArrayLike<number>, frameS: number, columns: number, from = 0, to = series.length): { timeS: number[]; values: number[] } {
  const n = Math.max(0, to - from);
  const per = Math.max(1, Math.ceil(n / Math.max(1, columns)));
  const timeS: number[] = [];
  const values: number[] = [];
  for (let k = from; k < to; k += per) {
    let m = -Infinity;
    for (let i = k; i < Math.min(to, k + per); i++) if (series[i] > m) m = series[i];
    timeS.push(k * frameS);
    values.push(m);
  }
  return { timeS, values };
}

/**
 * The document at `gainDb` and the junction temperature of every device, on at most `columns`
 * columns (maximum per column). Pass the gain search the plan stored (or the `advice` an earlier
 * call returned for the same plan) to skip the search (it does not depend on the gain asked for).
 */
export function evaluateStored(
  r: StoredReductions,
  name: string,
  coil: CoilProfile,
  driver: DriverProfile,
  settings: PlanSettingsInput,
  gainDb: number,
  columns: number,
  advice?: Advice | GainSearch,
): { document: PlanDocument; advice: Advice | GainSearch; temperatures: { timeS: number[]; devices: { role: string; junctionC: number[]; limitC: number; tjMaxC: number }[] } } {
  const { document, evaluation, settings: s, advice: a } = storedPlanDocument(r, name, coil, driver, settings, gainDb, true, advice);
  const frameS = r.analysis.frames.frameS;
  let timeS: number[] = [];
  const devices = evaluation.sim.devices.map((d) => {
    const tj = d.traces?.junctionC ?? new Float32Array(0);
    const red = maxByColumns(tj, frameS, columns);
    timeS = red.timeS;
    const p = driver.devices.find((x) => x.role === d.role)!;
    return { role: d.role, junctionC: red.values, limitC: p.tjMaxC - s.marginK, tjMaxC: p.tjMaxC };
  });
  return { document, advice: a, temperatures: { timeS, devices } };
}

/** A PlanClip cut to the frames that overlap [fromS, toS) (times in the cut start at 0). */
export function sliceClip(clip: PlanClip, fromS: number, toS: number): { clip: PlanClip; offsetS: number } {
  const f = clip.frames;
  const k0 = Math.max(0, Math.min(f.count - 1, Math.floor(fromS / f.frameS)));
  const k1 = Math.max(k0 + 1, Math.min(f.count, Math.ceil(toS / f.frameS)));
  if (k0 === 0 && k1 === f.count) return { clip, offsetS: 0 };
  const s0 = frameStart(k0, f.samplesPerFrame);
  const s1 = k1 === f.count ? f.sampleCount : frameStart(k1, f.samplesPerFrame);
  const offsetS = s0 / f.sampleRate;
  const frames = {
    ...f,
    count: k1 - k0,
    sampleCount: s1 - s0,
    mean: f.mean.subarray(k0, k1),
    meanSquare: f.meanSquare.subarray(k0, k1),
    min: f.min.subarray(k0, k1),
    max: f.max.subarray(k0, k1),
  };
  const out: PlanClip = { name: clip.name, durationS: (s1 - s0) / f.sampleRate, frames, histogram: clip.histogram };
  if (clip.pulseEvents) {
    const e = clip.pulseEvents;
    const endS = s1 / f.sampleRate;
    let a = 0;
    while (a < e.timeS.length && e.timeS[a] < offsetS) a++;
    let b = a;
    while (b < e.timeS.length && e.timeS[b] < endS) b++;
    const timeS = new Float64Array(b - a);
    for (let i = a; i < b; i++) timeS[i - a] = e.timeS[i] - offsetS;
    out.pulseEvents = { mode: e.mode, timeS, level: e.level.slice(a, b), durationS: out.durationS };
  }
  return { clip: out, offsetS };
}

/**
 * The modulation preview of a stored analysis on the grid a display asks for (docs/api.md), on the
 * plan's coil (its resonance sets the pulse scheme's minimum on-time, as in the plan).
 */
export function modulationStored(r: StoredReductions, coil: CoilProfile, driver: DriverProfile, gainDb: number, columns: number, fromS: number, toS: number) {
  const whole = planClipOf(r, '', driver);
  const { clip, offsetS } = sliceClip(whole, fromS, toS);
  const m: ModulationPreview = modulationPreview(clip, driver, gainDb, { maxColumns: columns, resonanceHz: coilReportFor(coil, driver).resonanceHz });
  const edges = Array.from(m.edgesS, (t) => t + offsetS);
  return {
    scheme: driver.scheme,
    gainDb,
    supplyVoltageV: driver.supplyVoltageV,
    fromS: edges[0],
    toS: edges[edges.length - 1],
    timeS: edges.slice(0, -1),
    railMinV: m.rail ? Array.from(m.rail.minV) : null,
    railMaxV: m.rail ? Array.from(m.rail.maxV) : null,
    pulseCount: m.pulses ? Array.from(m.pulses.count) : null,
    maxOnTimeS: m.pulses ? Array.from(m.pulses.maxOnS) : null,
    powerMeanW: Array.from(m.power.meanW),
    powerMaxW: Array.from(m.power.maxW),
  };
}

export interface SetPlanItem {
  reductions: StoredReductions;
  name: string;
  gapAfterS: number;
  gainDb: number | null;
}

/** Idle frames of the temperature trace during a gap, s. */
const GAP_FRAME_S = 0.1;

/**
 * `coilcue plan --set --json`'s result for stored clips, and the junction temperature of every
 * device through the whole set (clips and gaps on one time axis), at most `columns` columns
 * (maximum per column), with the gaps' spans. The traces replay each clip at the gain the set
 * plan chose, from the thermal state the previous clip and gap left, as planSet does.
 */
export function planStoredSet(items: SetPlanItem[], coil: CoilProfile, driver: DriverProfile, settings: PlanSettingsInput, commonGain: boolean, columns = 2000) {
  const report = coilReportFor(coil, driver);
  const c = coilAtResonance(report);
  const s = planSettings(driver, settings);
  const clips = items.map((it) => planClipOf(it.reductions, it.name, driver));
  const result: SetResult = planSet(
    clips.map((clip, k) => ({ clip, gapAfterS: items[k].gapAfterS, gainDb: items[k].gainDb })),
    c,
    driver,
    s,
    commonGain ? { commonGainDb: 'min-advised' } : {},
  );
  // Replay for the traces: a series of (duration, per-device trace) pieces on one axis.
  const roles = driver.devices.map((d) => d.role);
  const pieces: { frameS: number; traces: Map<string, Float32Array> }[] = [];
  const gaps: { fromS: number; toS: number }[] = [];
  let state: ThermalState[] | undefined;
  let t = 0;
  result.items.forEach((it, k) => {
    const e = evaluateAtGain(clips[k], c, driver, it.gainDb, s, { initial: state, traces: true });
    pieces.push({ frameS: clips[k].frames.frameS, traces: new Map(e.sim.devices.map((d) => [d.role, d.traces?.junctionC ?? new Float32Array(0)])) });
    t += clips[k].durationS;
    state = e.sim.finalState;
    if (it.gapAfterS > 0) {
      const idle = simulateSteady(driver, c, { durationS: it.gapAfterS, frameS: GAP_FRAME_S, railV: driver.supplyVoltageV / 2, initial: state, ambientC: s.ambientC });
      pieces.push({ frameS: it.gapAfterS / Math.max(1, Math.ceil(it.gapAfterS / GAP_FRAME_S)), traces: new Map(idle.devices.map((d) => [d.role, d.traces?.junctionC ?? new Float32Array(0)])) });
      gaps.push({ fromS: t, toS: t + it.gapAfterS });
      t += it.gapAfterS;
      state = idle.finalState;
    }
  });
  const totalS = t;
  const colS = totalS / Math.max(1, columns);
  const nCols = Math.max(1, Math.min(columns, Math.ceil(totalS / colS)));
  const used = roles.filter((role) => pieces.some((p) => (p.traces.get(role)?.length ?? 0) > 0));
  const grid = new Map(used.map((role) => [role, new Float64Array(nCols).fill(-Infinity)]));
  let start = 0;
  for (const p of pieces) {
    for (const role of used) {
      const tr = p.traces.get(role);
      if (!tr) continue;
      const g = grid.get(role)!;
      for (let i = 0; i < tr.length; i++) {
        const j = Math.min(nCols - 1, Math.floor((start + i * p.frameS) / colS));
        if (tr[i] > g[j]) g[j] = tr[i];
      }
    }
    const n = Math.max(0, ...Array.from(p.traces.values(), (x) => x.length));
    start += n * p.frameS;
  }
  const timeS = Array.from({ length: nCols }, (_, j) => j * colS);
  const devices = used.map((role) => {
    const g = grid.get(role)!;
    // Fill columns no frame fell in (finer grid than the gap frames) with the previous value.
    for (let j = 0; j < nCols; j++) if (g[j] === -Infinity) g[j] = j > 0 ? g[j - 1] : s.ambientC;
    const p = driver.devices.find((d) => d.role === role)!;
    return { role, junctionC: Array.from(g), limitC: p.tjMaxC - s.marginK };
  });
  return { result, temperatures: { timeS, devices, gaps } };
}
