import { html } from 'lit';
import uPlot from 'uplot';
import type { PlanDocument } from '../api.ts';
import { DASHES, UplotElement, axis, cssVar, logSplits, logTickValues, seriesColour, siShort } from '../charts/chart-kit.ts';

type Curve = PlanDocument['budget'][number];

/**
 * <budget-chart>: for each device, the duty-cycle budget (the share of full operation a burst of
 * each length may use without passing the limit) against the clip's demand (its busiest window of
 * that length) on log axes; where demand first meets the budget is ringed and labelled.
 *
 * Properties: `curves` (the plan document's `budget`).
 * Events: none.
 */
export class BudgetChart extends UplotElement {
  static override properties = { curves: { attribute: false } };
  declare curves: Curve[];

  constructor() {
    super();
    this.curves = [];
    this.chartHeight = 260;
  }

  override render() {
    const crossed = this.curves.filter((c) => c.crossing);
    return html`<figure class="chart">
      <figcaption>Duty budget against the clip's demand, by burst length</figcaption>
      <div class="plot"></div>
      <p class="chart-note">
        ${crossed.length === 0
          ? 'The demand stays under the budget at every burst length: ✓ within budget.'
          : crossed.map(
              (c) => html`<span class="bad-word">✗ ${c.role}:</span> demand meets the budget at bursts of ${siShort(c.crossing!.lengthS)}s
                  (demand ${(c.crossing!.demand * 100).toFixed(1)} %, budget ${(c.crossing!.budget * 100).toFixed(1)} %). `,
            )}
      </p>
    </figure>`;
  }

  protected override updated(): void {
    this.rebuild();
  }

  chartData(): uPlot.AlignedData | null {
    const c = this.curves[0];
    if (!c || c.lengthsS.length < 2) return null;
    const pos = (xs: number[]) => xs.map((v) => (v > 0 && Number.isFinite(v) ? v : null));
    const out: (number | null)[][] = [c.lengthsS];
    for (const k of this.curves) {
      // All curves share the lengths of the first (the planner uses one grid for every device).
      out.push(pos(k.budget), pos(k.demand));
    }
    return out as uPlot.AlignedData;
  }

  chartOptions(width: number): uPlot.Options {
    const series: uPlot.Series[] = [{ label: 'burst length (s)', value: (_u, v) => (v == null ? '—' : `${siShort(v)}s`) }];
    this.curves.forEach((c, i) => {
      series.push({ label: `${c.role} budget`, stroke: seriesColour(2 * i), width: 2, dash: DASHES[0] });
      series.push({ label: `${c.role} demand`, stroke: seriesColour(2 * i + 1), width: 2, dash: DASHES[1] });
    });
    return {
      width,
      height: this.chartHeight,
      scales: { x: { time: false, distr: 3 }, y: { distr: 3 } },
      axes: [axis('burst length', 's', { splits: logSplits, values: logTickValues }), axis('share of full operation', '', { size: 60, splits: logSplits, values: logTickValues })],
      series,
      hooks: {
        draw: [
          (u: uPlot) => {
            const ctx = u.ctx;
            const px = devicePixelRatio;
            for (const c of this.curves) {
              if (!c.crossing) continue;
              const x = u.valToPos(c.crossing.lengthS, 'x', true);
              const y = u.valToPos(Math.max(c.crossing.budget, 1e-9), 'y', true);
              ctx.save();
              ctx.strokeStyle = cssVar('--c-vermillion');
              ctx.lineWidth = 2.5 * px;
              ctx.beginPath();
              ctx.arc(x, y, 7 * px, 0, 2 * Math.PI);
              ctx.stroke();
              ctx.fillStyle = cssVar('--fg');
              ctx.font = `${12 * px}px system-ui, sans-serif`;
              ctx.fillText(`✗ crossing at ${siShort(c.crossing.lengthS)}s`, x + 10 * px, y - 8 * px);
              ctx.restore();
            }
          },
        ],
      },
    };
  }
}

void uPlot;
customElements.define('budget-chart', BudgetChart);

declare global {
  interface HTMLElementTagNameMap {
    'budget-chart': BudgetChart;
  }
}
