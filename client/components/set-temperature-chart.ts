import { html } from 'lit';
import type uPlot from 'uplot';
import type { DeviceTemperatures } from '../api.ts';
import { DASHES, UplotElement, axis, cssVar, seriesColour } from '../charts/chart-kit.ts';

/**
 * <set-temperature-chart>: junction temperature of each device across the whole set, clip after
 * clip, with the gaps between clips shaded and labelled "gap", and each device's limit as a
 * dashed line.
 *
 * Properties: `timeS`, `devices`, `gaps` ({ fromS, toS }[]).
 * Events: none.
 */
export class SetTemperatureChart extends UplotElement {
  static override properties = {
    timeS: { attribute: false },
    devices: { attribute: false },
    gaps: { attribute: false },
  };
  declare timeS: number[];
  declare devices: DeviceTemperatures[];
  declare gaps: { fromS: number; toS: number }[];

  constructor() {
    super();
    this.timeS = [];
    this.devices = [];
    this.gaps = [];
    this.chartHeight = 240;
  }

  override render() {
    return html`<figure class="chart">
      <figcaption>Junction temperature across the set (shaded: gaps between clips)</figcaption>
      <div class="plot"></div>
    </figure>`;
  }

  protected override updated(): void {
    this.rebuild();
  }

  chartData(): uPlot.AlignedData | null {
    if (this.timeS.length < 2 || this.devices.length === 0) return null;
    const out: number[][] = [this.timeS];
    for (const d of this.devices) out.push(d.junctionC);
    for (const d of this.devices) out.push(this.timeS.map(() => d.limitC));
    return out as uPlot.AlignedData;
  }

  chartOptions(width: number): uPlot.Options {
    const series: uPlot.Series[] = [{ label: 'set time (s)', value: (_u, v) => (v == null ? '—' : v.toFixed(1)) }];
    this.devices.forEach((d, i) => series.push({ label: `${d.role} junction`, stroke: seriesColour(i), width: 2, dash: DASHES[i % DASHES.length] }));
    this.devices.forEach((d) => series.push({ label: `${d.role} limit ${d.limitC.toFixed(0)} °C`, stroke: cssVar('--fg'), width: 1.5, dash: [8, 4] }));
    return {
      width,
      height: this.chartHeight,
      scales: { x: { time: false } },
      axes: [axis('time from the start of the set', 's'), axis('junction temperature', '°C', { size: 60 })],
      series,
      hooks: {
        drawClear: [
          (u: uPlot) => {
            const ctx = u.ctx;
            const px = devicePixelRatio;
            ctx.save();
            for (const g of this.gaps) {
              const x0 = u.valToPos(g.fromS, 'x', true);
              const x1 = u.valToPos(g.toS, 'x', true);
              ctx.fillStyle = cssVar('--band');
              ctx.fillRect(x0, u.bbox.top, Math.max(1, x1 - x0), u.bbox.height);
              ctx.fillStyle = cssVar('--fg-muted');
              ctx.font = `${11 * px}px system-ui, sans-serif`;
              if (x1 - x0 > 24 * px) ctx.fillText('gap', x0 + 3 * px, u.bbox.top + 12 * px);
            }
            ctx.restore();
          },
        ],
      },
    };
  }
}

customElements.define('set-temperature-chart', SetTemperatureChart);

declare global {
  interface HTMLElementTagNameMap {
    'set-temperature-chart': SetTemperatureChart;
  }
}
