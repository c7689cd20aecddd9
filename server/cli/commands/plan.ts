import { dirname, resolve } from 'node:path';
import { InputError } from '../../../shared/errors.ts';
import type { CoilReport } from '../../../shared/physics/coil/analyze.ts';
import { type PlanSettings, planSettings } from '../../../shared/plan/evaluate.ts';
import { type SetResult, planSet } from '../../../shared/plan/set.ts';
import { traceCsv } from '../../../shared/plan/trace.ts';
import type { DriverProfile } from '../../../shared/schemas/driver.ts';
import { parseSetFile } from '../../../shared/schemas/set.ts';
import { writeFileAtomic } from '../../audio/wav.ts';
import { type PlanDocument, jsonReplacer, loadPlanClip, planClipDocument } from '../../services/plan.ts';
import { limitLabel, limitText } from '../../../shared/plan/limit-labels.ts';
import { loadCoil, loadDriver } from '../../services/profiles.ts';
import { readJsonFile } from '../../services/read-json.ts';
import type { Command } from '../io.ts';
import { type ParsedOptions, usageLine } from '../options.ts';
import { PLAN_OPTIONS } from './tables.ts';
import { cautionLines, formatEng } from '../format.ts';
import { withProgress } from '../progress.ts';

export { jsonReplacer };

const USAGE = usageLine(PLAN_OPTIONS);

const f1 = (x: number) => x.toFixed(1);
const pct = (x: number) => `${(x * 100).toFixed(3)} %`;

const share = (x: number) => `${x} (${(x * 100).toFixed(3)} %)`;

/** The readable answer for one clip. */
export function formatPlan(r: PlanDocument, coil: CoilReport, driver: DriverProfile): string {
  const out: string[] = [];
  out.push(`clip ${r.clip} (${r.durationS.toFixed(1)} s) on coil ${coil.name} (${formatEng(coil.resonanceHz, 'Hz')}, Q ${coil.qualityFactor.toFixed(0)}, envelope corner ${r.modulationCornerRangeHz.highHz > r.modulationCornerRangeHz.lowHz ? `${formatEng(r.modulationCornerRangeHz.lowHz, 'Hz')} to ${formatEng(r.modulationCornerRangeHz.highHz, 'Hz')}` : formatEng(r.modulationCornerHz, 'Hz')}) with driver ${driver.name} (${r.scheme})`);
  out.push(`settings: margin ${r.settings.marginK} K below each Tj max, allowed share ${share(r.settings.allowedShare)} of the time or of pulses, ambient ${r.settings.ambientC} °C`);
  for (const w of r.warnings) out.push(`WARNING: ${w}`);
  if (r.advisedGainDb === null) {
    out.push(`advised gain: none is safe${r.binding ? `; failing: ${limitText(r.binding)}` : ''}`);
  } else {
    out.push(`advised gain: ${r.advisedGainDb.toFixed(1)} dB`);
    if (r.binding) out.push(`binding limit: ${limitText(r.binding)}${r.binding.atS !== null ? ` at ${r.binding.atS.toFixed(2)} s` : ''} (just above the advised gain)`);
    else out.push('binding limit: none up to the top of the search range');
  }
  out.push(`evaluated at ${Number.isFinite(r.evaluatedGainDb) ? r.evaluatedGainDb.toFixed(1) : '-inf'} dB:`);
  for (const d of r.devices) {
    out.push(`  ${d.role.padEnd(9)} ×${d.count}  peak Tj ${f1(d.peakJunctionC)} °C at ${d.peakAtS.toFixed(2)} s (limit ${f1(d.limitC)}, Tj max ${f1(d.tjMaxC)})  mean loss ${d.meanLossW.toFixed(2)} W per switch${d.transitionShare !== null ? `  transitions ${(d.transitionShare * 100).toFixed(1)} % of each cycle${d.tooSlow ? ' (TOO SLOW)' : ''}` : ''}${d.runawayAtS !== null ? `  THERMAL RUNAWAY at ${d.runawayAtS.toFixed(2)} s` : ''}`);
  }
  for (const f of r.idle) {
    out.push(`  idle      ${f.role}: settles at ${Number.isFinite(f.steadyJunctionC) ? `${f.steadyJunctionC.toFixed(1)} °C` : 'runaway'} (supply on, no music, rail ${f.railV.toFixed(1)} V, ${f.lossW.toFixed(2)} W; limit ${f1(f.limitC)})${f.reachesLimitAfterS !== null ? `, at its limit after ${f.reachesLimitAfterS.toFixed(0)} s` : ''}`);
  }
  out.push(
    r.supply.peakIs === 'pulse-current'
      ? `  supply    current during a pulse ${r.supply.peakCurrentA.toFixed(2)} A (instantaneous; limit ${r.supply.limitA} A), mean over the clip ${r.supply.meanCurrentA.toFixed(2)} A`
      : `  supply    peak ${r.supply.peakCurrentA.toFixed(2)} A (highest ${formatEng(r.supply.peakWindowS ?? 0, 's')} mean; limit ${r.supply.limitA} A), mean over the clip ${r.supply.meanCurrentA.toFixed(2)} A`,
  );
  out.push(`  over-modulated time ${pct(r.overModulationFraction)} of the time (${r.overModulationTimeS.toFixed(3)} s)`);
  if (r.pulses) {
    out.push(`  pulses ${r.pulses.count}: cut to the longest on-time ${r.pulses.onTimeClamped}, clamped by the duty limit ${r.pulses.dutyClamped}, dropped for the off-time ${r.pulses.offTimeDropped}, dropped below the ${formatEng(r.pulses.minOnTimeS, 's')} minimum on-time ${r.pulses.minOnTimeDropped}`);
  }
  if (r.dutyCycle) {
    const d = r.dutyCycle;
    out.push(
      `  duty cycle over ${d.window}: mean ${pct(d.meanDuty)}, worst ${pct(d.worstDuty)}${d.worstAtS !== null ? ` at ${d.worstAtS.toFixed(2)} s` : ''}, driver maximum ${pct(d.maxDuty)}`,
    );
  }
  out.push('headroom of every limit at that gain:');
  for (const l of r.limits) out.push(`  ${l.ok ? 'ok  ' : 'FAIL'} ${limitText(l)}`);
  for (const b of r.budget) {
    out.push(
      `duty budget (${b.role}, ${b.fullLossW.toFixed(1)} W in full operation, ${f1(b.allowedRiseK)} K allowed rise): ` +
        (b.crossing ? `the clip's demand exceeds the budget for bursts of ${formatEng(b.crossing.lengthS, 's')} (demand ${pct(b.crossing.demand)}, budget ${pct(b.crossing.budget)})` : 'the clip stays within budget at every burst length'),
    );
  }
  const ends = r.scheme === 'pulse' ? 'where the on-time reaches its maximum' : 'where the rail reaches its ends';
  out.push(`peak limiter: ceiling ${r.limiterCeilingDbfs.toFixed(1)} dBFS on the modulation source before the gain (the level ${ends})`);
  if (r.preEmphasis) {
    const p = r.preEmphasis;
    out.push(
      (p.advised
        ? `pre-emphasis advised: a first-order high shelf of +${p.shelfGainDb.toFixed(1)} dB from ${formatEng(p.cornerHz, 'Hz')} (render applies it by default)`
        : `pre-emphasis not advised: the envelope corner costs at least ${p.envelopeLossDb.toFixed(1)} dB`) + ` (${p.basis})`,
    );
  }
  if (r.pulseRf) {
    out.push(`RF cycles per pulse at ${formatEng(coil.resonanceHz, 'Hz')}: fewest ${r.pulseRf.rfCyclesMin.toFixed(1)}, mean ${r.pulseRf.rfCyclesMean.toFixed(1)}; ${r.pulseRf.shorterThanRingUp} pulses shorter than the ring-up time ${formatEng(coil.ringUpTauS, 's')}`);
  }
  if (r.limiting.note) out.push(`Quality: ${r.limiting.note}`);
  if (coil.keepOutM !== null) {
    const v = coil.voltage;
    out.push(
      `keep-out: at least ${coil.keepOutM.toFixed(2)} m from the top load, set by the ${coil.keepOutSetBy === 'arc-reach' ? 'arc reach' : 'breakdown gap'} ×${v.safetyFactor} (` +
        (v.topVoltageBoundV !== null
          ? `top voltage at most ${formatEng(v.topVoltageBoundV, 'V')} (energy bound, C ${v.boundCapacitanceFrom === 'measured-resonance' ? 'from the measured resonance' : 'computed'}), breakdown gap ${formatEng(v.breakdownGapM, 'm')} at ${v.breakdownFieldVPerM / 1e6} MV/m (long gap), `
          : '') +
        `arc reach ${formatEng(v.arcReachM, 'm')} by Freau's rule on the mean input power ${v.inputPowerW !== null ? formatEng(v.inputPowerW, 'W') : '—'}${v.inputPowerBasis ? `, ${v.inputPowerBasis}` : ''}); real arcs can reach farther`,
    );
  }
  out.push(r.gainConvention);
  out.push(...cautionLines(r.cautions));
  out.push('Caution: high voltage and RF can burn, injure or kill; follow local codes and licensed practice.');
  return out.join('\n') + '\n';
}

/** The readable answer for a set: per item its gain, temperatures and verdict, then the two gaps in plain words. */
export function formatSet(s: SetResult): string {
  const temps = (xs: { role: string; junctionC: number }[]) => xs.map((d) => `${d.role} ${f1(d.junctionC)} °C`).join(', ');
  const out = [`set of ${s.items.length} clips, ${s.gainMode === 'common' ? `common gain ${s.commonGainDb?.toFixed(1)} dB` : 'gain advised per clip given its starting temperature'}, ambient ${s.ambientC} °C`];
  const idleWarm = s.idleSteadyJunctionC.filter((d) => d.junctionC > s.ambientC + 0.5);
  out.push(
    `idling between clips the driver settles at ${temps(s.idleSteadyJunctionC)}` +
      (idleWarm.length
        ? ` — ${idleWarm.map((d) => d.role).join(' and ')} ${idleWarm.length > 1 ? 'dissipate' : 'dissipates'} even with no music (the rail idles at half the supply), so ${idleWarm.length > 1 ? 'they never cool' : 'it never cools'} to ambient; recovery below is measured against this idle temperature`
        : ' (no loss at idle: the devices cool toward ambient)'),
  );
  const silent = new Map(s.silentItems.map((x) => [x.index, x]));
  s.items.forEach((it, i) => {
    const verdict = !it.ok ? `FAILS ${it.failing.map((l) => limitLabel(l)).join(', ')}` : silent.has(i) ? 'SILENT: no safe gain' : 'all limits hold';
    out.push(
      `${String(i + 1).padStart(2)}. ${it.clip}: gain ${Number.isFinite(it.gainDb) ? it.gainDb.toFixed(1) : '-inf'} dB (advised ${it.advisedGainDb === null ? 'none safe' : it.advisedGainDb.toFixed(1)}), ` +
        `starts ${temps(it.startJunctionC)}, peak ${f1(it.peakJunctionC)} °C, ${verdict}`,
    );
    const why = silent.get(i);
    if (why) out.push(`    ${why.note}`);
    const last = i + 1 === s.items.length;
    const safe = last
      ? 'last clip'
      : it.minSafeGapAfterS === null
        ? `no safe gap: ${it.minSafeGapNote}`
        : it.minSafeGapAfterS === 0
          ? 'shortest safe gap 0 s (the next clip keeps every limit even if it starts at once)'
          : `shortest safe gap ${it.minSafeGapAfterS.toFixed(1)} s (the next clip keeps every limit at its gain only after this much idling)`;
    const rec =
      it.recoveryGapS === null
        ? `not within ${s.recoveredWithinK} K of its idle temperature after ${s.gapSearchBoundS} s`
        : it.recoveryGapS === 0
          ? `0 s: the clip ends no more than ${s.recoveredWithinK} K above the idle temperature (${temps(it.recoversToC)}), so waiting would not cool it further`
          : `back within ${s.recoveredWithinK} K of its idle temperature (${temps(it.recoversToC)}) after ${it.recoveryGapS.toFixed(1)} s`;
    out.push(`    gap ${it.gapAfterS} s; ${safe}; recovery: ${rec}`);
  });
  const silentList = s.silentItems.map((x) => x.index + 1).join(', ');
  if (s.firstFailingItem !== null) out.push(`first failing clip: ${s.firstFailingItem + 1}`);
  else if (s.silentItems.length) out.push(`the set does not play as planned: clip${s.silentItems.length > 1 ? 's' : ''} ${silentList} ${s.silentItems.length > 1 ? 'have' : 'has'} no safe gain and ${s.silentItems.length > 1 ? 'are' : 'is'} planned silent; the others keep every limit`);
  else out.push('every clip keeps every limit');
  return out.join('\n') + '\n';
}

type PlanValues = ParsedOptions<typeof PLAN_OPTIONS.options>['values'];

function settingsFrom(values: PlanValues, driver: DriverProfile): PlanSettings {
  return planSettings(driver, { marginK: values['margin-k'], allowedShare: values['allowed-share'], ambientC: values['ambient-c'] });
}

export const planCommand: Command<typeof PLAN_OPTIONS.options> = {
  options: PLAN_OPTIONS,
  async run({ values }, io) {
    const channel = values.channel;
    const pulseSource = values['pulse-source'];

    if (values.set !== undefined) {
      const setPath = resolve(io.cwd, values.set);
      const set = parseSetFile(await readJsonFile(values.set, io.cwd, 'set file', 'see the README for the set file format'));
      const base = dirname(setPath);
      const driver = await loadDriver(set.driver, base);
      const coil = await loadCoil(set.coil, base, driver);
      const settings = settingsFrom(values, driver);
      const items = [];
      for (const it of set.items) {
        const { planClip } = await withProgress(io, 'analysing', (onProgress) => loadPlanClip(resolve(base, it.clip), driver, channel, pulseSource, onProgress));
        planClip.name = it.clip;
        items.push({ clip: planClip, gapAfterS: it.gapAfterS, gainDb: it.gainDb });
      }
      const result = planSet(items, coil, driver, settings, values['common-gain'] ? { commonGainDb: 'min-advised' } : {});
      io.out(values.json ? JSON.stringify(result, jsonReplacer, 2) + '\n' : formatSet(result));
      return 0;
    }

    if (!values.clip || !values.coil || !values.driver) throw new InputError('bad-arguments', `give --clip, --coil and --driver, or --set. Usage: ${USAGE}`); // checked by the table
    const gainDb = values['gain-db'];
    const driver = await loadDriver(values.driver, io.cwd);
    const coil = await loadCoil(values.coil, io.cwd, driver);
    const settings = settingsFrom(values, driver);
    const { planClip, analysis } = await withProgress(io, 'analysing', (onProgress) =>
      loadPlanClip(resolve(io.cwd, values.clip as string), driver, channel, pulseSource, onProgress),
    );
    planClip.name = values.clip;
    const { document, evaluation } = planClipDocument(planClip, analysis, coil, driver, settings, { gainDb, traces: values.trace !== undefined });
    if (values.trace !== undefined) {
      await writeFileAtomic(resolve(io.cwd, values.trace), new TextEncoder().encode(traceCsv(evaluation.sim, planClip.frames.frameS)));
    }
    io.out(values.json ? JSON.stringify(document, jsonReplacer, 2) + '\n' : formatPlan(document, coil, driver));
    return 0;
  },
};
