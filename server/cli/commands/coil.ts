import { DEMO_COIL_NAMES, DEMO_COILS } from '../../../shared/demo/coils.ts';
import { COIL_OPTIONS } from './tables.ts';
import { analyzeCoil, type CoilDriveContext, type CoilReport } from '../../../shared/physics/coil/analyze.ts';
import { parseCoilProfile } from '../../../shared/schemas/coil.ts';
import { msToS } from '../../../shared/units.ts';
import { EXIT_OK, type Command } from '../io.ts';
import { readJsonFile } from '../../services/read-json.ts';
import { formatEng } from '../format.ts';

export { formatEng };


const pct = (x: number | null): string => (x === null ? '—' : `${x >= 0 ? '+' : ''}${x.toFixed(1)} %`);
const num3 = (x: number | null): string => (x === null ? '—' : Math.abs(x) >= 1000 ? Math.round(x).toString() : x.toPrecision(3));

/** The primary tank's lines (none unless the profile marks the primary as a tank). */
function tankLines(r: CoilReport, row: (label: string, value: string) => string): string[] {
  const t = r.tank;
  if (!t) return [];
  const lines = [
    '',
    `Primary tank (${t.switching})`,
    row('tank inductance (primary + leads)', `${formatEng(t.tankInductanceH, 'H')}   [leads ${formatEng(t.leadInductanceH, 'H')}]`),
    row('tuning capacitance 1/((2π f0)² L)', formatEng(t.tankTuningCapacitanceF, 'F')),
    row('fitted capacitance', t.fittedCapacitanceF === null ? 'none yet' : formatEng(t.fittedCapacitanceF, 'F')),
    row('primary resonance with it', t.primaryResonanceHz === null ? '—' : `${formatEng(t.primaryResonanceHz, 'Hz')}   (×${num3(t.primaryToSecondaryRatio)} the secondary's)`),
    row('coupled pair rings at', `${formatEng(t.coupledModesHz.lowerHz, 'Hz')} and ${formatEng(t.coupledModesHz.upperHz, 'Hz')}`),
  ];
  if (t.sparkGap) {
    lines.push(row('spark gap at the supply peak (estimate)', `${formatEng(t.sparkGap.breakdownGapM, 'm')}   (${formatEng(t.sparkGap.supplyPeakV, 'V')} at 3 kV/mm)`));
    if (t.sparkGap.tankEnergyJ !== null) lines.push(row('tank energy per firing ½CV²', formatEng(t.sparkGap.tankEnergyJ, 'J')));
  }
  lines.push(...t.notes.map((n) => `  - ${n}`), ...t.cautions.map((c) => `  ! ${c}`));
  return lines;
}

/** The human-readable report: one figure per line, units shown, alternatives in brackets. */
export function formatCoilReport(r: CoilReport): string {
  const s = r.secondary;
  const m = s.selfCapacitanceModels;
  const row = (label: string, value: string): string => `  ${label.padEnd(40)} ${value}`;
  const lines = [
    `Coil "${r.name}"`,
    '',
    `Secondary: ${s.turns} turns, D ${formatEng(s.meanDiameterM, 'm')} (through wire centres), l ${formatEng(s.windingLengthM, 'm')}, l/D ${num3(s.lengthOverDiameter)}`,
    row('inductance (current sheet, Nagaoka)', `${formatEng(s.inductanceH, 'H')}   [Lundin ${formatEng(s.inductanceLundinH, 'H')}, Wheeler ${formatEng(s.inductanceWheelerH, 'H')}, turn sum ${formatEng(s.inductanceTurnSumH, 'H')}]`),
    row('Nagaoka coefficient', num3(s.nagaokaK)),
    row('wire length', formatEng(s.wireLengthM, 'm')),
    row('DC resistance at 20 °C', formatEng(s.dcResistanceOhm, 'Ω')),
    row(`DC resistance at ${s.wireTempC} °C`, formatEng(s.dcResistanceHotOhm, 'Ω')),
    row('skin depth at resonance', formatEng(s.skinDepthM, 'm')),
    row('AC resistance (skin and proximity)', `${formatEng(s.acResistanceOhm, 'Ω')}   [isolated wire ×${num3(s.acToDcRatio)} DC, Medhurst proximity ×${num3(s.proximityFactor)}]`),
    row("self-capacitance (Medhurst's table)", `${formatEng(s.selfCapacitanceF, 'F')}   [Radiotron fit ${formatEng(m.radiotronFitF, 'F')}; spread ${s.selfCapacitanceSpreadPercent.toFixed(0)} %]`),
    '',
    `Top load: ${r.topLoad.shape}`,
    row('capacitance (isolated)', r.topLoad.shape === 'none' ? '—' : formatEng(r.topLoad.capacitanceF, 'F')),
    row('extra capacitance', formatEng(r.extraCapacitanceF, 'F')),
    row('total capacitance', formatEng(r.totalCapacitanceF, 'F')),
    '',
    'Resonance and losses',
    row('resonance', `${formatEng(r.resonanceHz, 'Hz')}   (${r.resonanceMeasuredHz === null ? 'computed' : 'measured'})`),
    row('computed resonance', `${formatEng(r.resonanceComputedHz, 'Hz')}   [by model: ${formatEng(r.resonanceByModelHz.medhurstTableHz, 'Hz')}, ${formatEng(r.resonanceByModelHz.radiotronFitHz, 'Hz')}]`),
    row('measured vs computed', pct(r.resonanceDiscrepancyPercent)),
    row(
      'quality factor Q',
      r.qualityFactorMeasured === null
        ? `${num3(r.qualityFactor)}   (computed with proximity, Medhurst 1947: an upper bound; skin effect only ${num3(r.qualityFactorSkinOnly)})`
        : `${num3(r.qualityFactor)}   (measured; computed upper bound ${num3(r.qualityFactorComputed)})`,
    ),
    row(
      'modulation corner f0/(2Q)',
      r.modulationCornerRangeHz.highHz > r.modulationCornerRangeHz.lowHz
        ? `${formatEng(r.modulationCornerRangeHz.lowHz, 'Hz')} to ${formatEng(r.modulationCornerRangeHz.highHz, 'Hz')}   (Q ${num3(r.qualityFactor)} down to a loaded Q ${num3(r.qualityFactorLoaded)}; measure Q to narrow it)`
        : formatEng(r.modulationCornerHz, 'Hz'),
    ),
    row('ring-up time constant Q/(π f0)', formatEng(r.ringUpTauS, 's')),
    '',
    'Primary and coupling',
    row(
      `primary inductance (${r.primary.inductanceMethod === 'turn-sum' ? 'turn by turn' : 'current sheet'})`,
      r.primary.inductanceMethod === 'turn-sum' ? `${formatEng(r.primary.inductanceH, 'H')}   [current sheet ${formatEng(r.primary.inductanceCurrentSheetH, 'H')}]` : formatEng(r.primary.inductanceH, 'H'),
    ),
    row('mutual inductance (Maxwell, turn pairs)', formatEng(r.mutualInductanceH, 'H')),
    row('coupling k', num3(r.couplingK)),
    ...tankLines(r, row),
    '',
    'Voltage and clearance (upper bounds, not promises)',
    row('energy per longest on-time', formatEng(r.voltage.energyJ, 'J')),
    row(`top voltage at most √(2E/C), C ${r.voltage.boundCapacitanceFrom === 'measured-resonance' ? 'from measured f0' : 'computed'}`, formatEng(r.voltage.topVoltageBoundV, 'V')),
    row(`breakdown gap at ${r.voltage.breakdownFieldVPerM / 1e6} MV/m (long gap)`, formatEng(r.voltage.breakdownGapM, 'm')),
    row(`arc reach (Freau 1.7 in·√W, mean power ${r.voltage.inputPowerW !== null ? formatEng(r.voltage.inputPowerW, 'W') : '—'})`, formatEng(r.voltage.arcReachM, 'm')),
    row(`keep-out distance (×${r.voltage.safetyFactor}${r.keepOutSetBy ? ` the ${r.keepOutSetBy === 'arc-reach' ? 'arc reach' : 'breakdown gap'}` : ''})`, formatEng(r.keepOutM, 'm')),
    '',
    'Notes',
    ...r.notes.map((n) => `  - ${n}`),
    '',
    'Cautions',
    ...r.cautions.map((c) => `  ! ${c}`),
    '',
  ];
  return lines.join('\n');
}

/** `coilcue coil`: analyses a coil profile and prints a table (or JSON with --json). */
export const coilCommand: Command<typeof COIL_OPTIONS.options> = {
  options: COIL_OPTIONS,
  async run({ values, positionals }, io): Promise<number> {
    const demo = values.demo; // a file or --demo, never both nor neither: checked with the options (tables.ts)
    const drive: CoilDriveContext = {};
    const supply = values['supply-v'];
    const rail = values['rail-current-a'];
    const onMs = values['on-time-ms'];
    const power = values['input-power-w'];
    const temp = values['wire-temp-c'];
    if (supply !== undefined) drive.supplyVoltageV = supply;
    if (rail !== undefined) drive.fullRailCurrentA = rail;
    if (onMs !== undefined) drive.pulseOnTimeS = msToS(onMs);
    if (power !== undefined) drive.inputPowerW = power;
    if (temp !== undefined) drive.wireTempC = temp;

    const json = demo !== undefined ? DEMO_COILS[demo as keyof typeof DEMO_COILS] : await readJsonFile(positionals[0], io.cwd, 'coil profile', `fix the file or start from a demo: coilcue coil --demo ${DEMO_COIL_NAMES[0]} --json`);
    const report = analyzeCoil(parseCoilProfile(json), drive);
    io.out(values.json ? `${JSON.stringify(report, null, 2)}\n` : formatCoilReport(report));
    return EXIT_OK;
  },
};
