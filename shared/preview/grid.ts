/**
 * The modulation preview's display grid as plain arrays, each with its unit in its name (the same
 * names as the HTTP API's modulation route, docs/api.md): what `coilcue preview --json` carries
 * and `--trace out.csv` writes, and a compact text chart of it (one row of block characters per
 * quantity) for the terminal.
 */
import type { ModulationPreview } from './modulation.ts';

/** The grid, one entry per display column. Rail schemes fill railMinV/railMaxV, the pulse scheme pulseCount/maxOnTimeS. */
export interface ModulationGrid {
  columns: number;
  /** Nominal column length, s. */
  columnS: number;
  /** Start of each column, s. */
  timeS: number[];
  railMinV: number[] | null;
  railMaxV: number[] | null;
  pulseCount: number[] | null;
  /** Longest on-time of the pulses starting in each column, s (0 where none starts). */
  maxOnTimeS: number[] | null;
  /** Power delivered to the coil: mean over the column and highest frame (rail) or pulse (pulse), W. */
  powerMeanW: number[];
  powerMaxW: number[];
}

/** Float32 values as the nearest decimal with 7 significant figures (no 0.30000001192 in JSON). */
const f32 = (a: ArrayLike<number>): number[] => Array.from(a, (x) => Number(x.toPrecision(7)));

/** The preview's grid as arrays (JSON-ready). */
export function modulationGrid(p: ModulationPreview): ModulationGrid {
  return {
    columns: p.columns,
    columnS: p.columnS,
    timeS: Array.from(p.edgesS.subarray(0, p.columns)),
    railMinV: p.rail ? f32(p.rail.minV) : null,
    railMaxV: p.rail ? f32(p.rail.maxV) : null,
    pulseCount: p.pulses ? Array.from(p.pulses.count) : null,
    maxOnTimeS: p.pulses ? f32(p.pulses.maxOnS) : null,
    powerMeanW: f32(p.power.meanW),
    powerMaxW: f32(p.power.maxW),
  };
}

/** The grid as CSV: a header of the array names, one row per column. */
export function gridCsv(g: ModulationGrid): string {
  const cols: [string, number[]][] = [['timeS', g.timeS]];
  if (g.railMinV && g.railMaxV) cols.push(['railMinV', g.railMinV], ['railMaxV', g.railMaxV]);
  if (g.pulseCount && g.maxOnTimeS) cols.push(['pulseCount', g.pulseCount], ['maxOnTimeS', g.maxOnTimeS]);
  cols.push(['powerMeanW', g.powerMeanW], ['powerMaxW', g.powerMaxW]);
  const lines = [cols.map(([n]) => n).join(',')];
  for (let j = 0; j < g.columns; j++) lines.push(cols.map(([, a]) => String(a[j])).join(','));
  return lines.join('\n') + '\n';
}

const BLOCKS = ' ▁▂▃▄▅▆▇█';

/**
 * One row of block characters: `values` reduced to `width` cells (each cell takes the largest, or
 * with `lowest` the smallest, value of the columns it covers, so extremes survive), scaled so `top`
 * is a full block and 0 a space. Values above `top` draw full.
 */
export function blockRow(values: readonly number[], width: number, top: number, lowest = false): string {
  const n = values.length;
  if (n === 0 || width < 1) return '';
  const cells = Math.min(width, n);
  let row = '';
  for (let c = 0; c < cells; c++) {
    const a = Math.floor((c * n) / cells);
    const b = Math.max(a + 1, Math.floor(((c + 1) * n) / cells));
    let v = values[a];
    for (let j = a + 1; j < b; j++) v = lowest ? Math.min(v, values[j]) : Math.max(v, values[j]);
    const level = top > 0 ? Math.round((Math.min(Math.max(v, 0), top) / top) * (BLOCKS.length - 1)) : 0;
    row += BLOCKS[level];
  }
  return row;
}

/**
 * The grid as a compact text chart: one row per quantity with its scale, over the clip's length.
 * `supplyV`, `fullPowerW` and `maxOnTimeS` set the full-block level of the rail, power and on-time rows.
 */
export function gridChart(g: ModulationGrid, o: { width: number; supplyV: number; fullPowerW: number; maxOnTimeS?: number; durationS: number }): string[] {
  const rows: [string, string][] = [];
  if (g.railMaxV && g.railMinV) {
    rows.push([`rail highest (0…${o.supplyV} V)`, blockRow(g.railMaxV, o.width, o.supplyV)]);
    rows.push([`rail lowest (0…${o.supplyV} V)`, blockRow(g.railMinV, o.width, o.supplyV, true)]);
  }
  if (g.pulseCount && g.maxOnTimeS) {
    const cells = Math.min(o.width, g.columns);
    const counts = sumInto(g.pulseCount, cells);
    const most = Math.max(1, ...counts);
    rows.push([`pulses per ${formatS(o.durationS / cells)} (0…${most})`, blockRow(counts, cells, most)]);
    const top = o.maxOnTimeS ?? Math.max(...g.maxOnTimeS);
    rows.push([`longest on-time (0…${(top * 1e6).toFixed(0)} µs)`, blockRow(g.maxOnTimeS, o.width, top)]);
  }
  rows.push([`power mean (0…${o.fullPowerW.toFixed(0)} W)`, blockRow(g.powerMeanW, o.width, o.fullPowerW)]);
  rows.push([`power highest (0…${o.fullPowerW.toFixed(0)} W)`, blockRow(g.powerMaxW, o.width, o.fullPowerW)]);
  const w = Math.max(...rows.map(([l]) => l.length));
  const chartW = rows[0][1].length;
  const axis = `0 s${' '.repeat(Math.max(1, chartW - 3 - `${o.durationS.toFixed(1)} s`.length))}${o.durationS.toFixed(1)} s`;
  return [...rows.map(([l, r]) => `  ${l.padEnd(w)} │${r}│`), `  ${' '.repeat(w)}  ${axis}`];
}

const formatS = (s: number): string => (s >= 1 ? `${s.toFixed(1)} s` : `${(s * 1000).toFixed(0)} ms`);

/** Counts summed into `cells` groups (pulses per chart cell). */
function sumInto(a: readonly number[], cells: number): number[] {
  const out = new Array<number>(cells).fill(0);
  for (let c = 0; c < cells; c++) {
    const s = Math.floor((c * a.length) / cells);
    const e = Math.max(s + 1, Math.floor(((c + 1) * a.length) / cells));
    for (let j = s; j < e; j++) out[c] += a[j];
  }
  return out;
}
