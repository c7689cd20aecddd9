/**
 * The per-frame trace of an evaluation as CSV: a header row `timeS`, then `<role>LossW` and
 * `<role>JunctionC` for each device, one row per frame. Long clips are decimated to at most
 * `maxRows` rows, each row keeping the maximum of every column over the frames it covers (so no
 * peak is lost) and the time of the group's first frame.
 */
import type { DriverSimulation } from '../physics/driver/types.ts';

export const MAX_TRACE_ROWS = 100_000;

export function traceCsv(sim: DriverSimulation, frameS: number, maxRows = MAX_TRACE_ROWS): string {
  const cols = sim.devices.map((d) => {
    if (!d.traces) throw new RangeError('traceCsv: the simulation was run without traces');
    return d.traces;
  });
  const n = cols.length ? cols[0].lossW.length : 0;
  const group = Math.max(1, Math.ceil(n / maxRows));
  const header = ['timeS', ...sim.devices.flatMap((d) => [`${d.role}LossW`, `${d.role}JunctionC`])].join(',');
  const lines = [header];
  for (let k0 = 0; k0 < n; k0 += group) {
    const k1 = Math.min(n, k0 + group);
    const row = [(k0 * frameS).toFixed(6)];
    for (const t of cols) {
      let loss = -Infinity;
      let tj = -Infinity;
      for (let k = k0; k < k1; k++) {
        if (t.lossW[k] > loss) loss = t.lossW[k];
        if (t.junctionC[k] > tj) tj = t.junctionC[k];
      }
      row.push(loss.toPrecision(6), tj.toPrecision(6));
    }
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}
