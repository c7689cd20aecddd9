import { html } from 'lit';
import type uPlot from 'uplot';
import { UplotElement, axis, logSplits, logTickValues, siShort } from '../charts/chart-kit.ts';
import { heatColour, spectrogramGrid } from '../../shared/display/heat.ts';

/**
 * <spectrogram-chart>: power over time and frequency as a heat map (a perceptually ordered
 * colour scale from dark to light, so it reads without hue) on uPlot's axes: time in s, frequency
 * in Hz on a log axis. The scale's key is drawn beside it in dB.
 *
 * Properties: `timeS`, `freqHz`, `powerDb` (rows by time, columns by frequency).
 * Events: none.
 */
export class SpectrogramChart extends UplotElement {
  static override properties = {
    timeS: { attribute: false },
    freqHz: { attribute: false },
    powerDb: { attribute: false },
  };

  declare timeS: number[];
  declare freqHz: number[];
  declare powerDb: number[][];
  private image: HTMLCanvasElement | null = null;

  constructor() {
    super();
    this.timeS = [];
    this.freqHz = [];
    this.powerDb = [];
    this.chartHeight = 220;
  }

  override render() {
    const g = this.grid();
    return html`<figure class="chart">
      <figcaption>Spectrogram: power by time and frequency (darker is quieter)</figcaption>
      <div class="plot"></div>
      ${g
        ? html`<p class="scale-key">
            <span class="ramp" aria-hidden="true"></span> ${g.lowDb.toFixed(0)} dB (dark) to ${g.highDb.toFixed(0)} dB re full scale (light)
          </p>`
        : ''}
    </figure>`;
  }

  private grid() {
    return this.timeS.length && this.freqHz.length ? spectrogramGrid(this.timeS, this.freqHz, this.powerDb) : null;
  }

  protected override updated(): void {
    const g = this.grid();
    this.image = null;
    if (g && typeof document !== 'undefined') {
      const c = document.createElement('canvas');
      c.width = g.times;
      c.height = g.freqs.length;
      const ctx = c.getContext('2d');
      if (ctx) {
        const img = ctx.createImageData(c.width, c.height);
        for (let t = 0; t < g.times; t++) {
          for (let f = 0; f < g.freqs.length; f++) {
            const [r, gg, b] = heatColour(g.level(t, f));
            const i = ((c.height - 1 - f) * c.width + t) * 4;
            img.data[i] = r;
            img.data[i + 1] = gg;
            img.data[i + 2] = b;
            img.data[i + 3] = 255;
          }
        }
        ctx.putImageData(img, 0, 0);
        this.image = c;
      }
    }
    this.rebuild();
  }

  chartData(): uPlot.AlignedData | null {
    const g = this.grid();
    if (!g) return null;
    return [
      [this.timeS[0], this.timeS[this.timeS.length - 1]],
      [g.freqs[0], g.freqs[g.freqs.length - 1]],
    ];
  }

  chartOptions(width: number): uPlot.Options {
    const g = this.grid()!;
    return {
      width,
      height: this.chartHeight,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: { x: { time: false }, y: { distr: 3, range: [g.freqs[0], g.freqs[g.freqs.length - 1]] as [number, number] } },
      axes: [axis('time', 's'), axis('frequency', 'Hz', { splits: logSplits, values: logTickValues, size: 60 })],
      series: [{}, { show: false, points: { show: false } }],
      hooks: {
        drawClear: [
          (u: uPlot) => {
            if (!this.image) return;
            const { left, top, width: w, height: h } = u.bbox;
            // Each image row is one frequency bin; map the log axis by drawing row by row.
            const ctx = u.ctx;
            ctx.save();
            ctx.imageSmoothingEnabled = false;
            const rows = g.freqs.length;
            for (let f = 0; f < rows; f++) {
              const lo = f === 0 ? g.freqs[0] : Math.sqrt(g.freqs[f - 1] * g.freqs[f]);
              const hi = f === rows - 1 ? g.freqs[rows - 1] : Math.sqrt(g.freqs[f] * g.freqs[f + 1]);
              const y1 = u.valToPos(lo, 'y', true);
              const y0 = u.valToPos(hi, 'y', true);
              const x0 = u.valToPos(this.timeS[0], 'x', true);
              const x1 = u.valToPos(this.timeS[this.timeS.length - 1], 'x', true);
              ctx.drawImage(this.image, 0, rows - 1 - f, this.image.width, 1, Math.max(left, x0), y0, Math.min(left + w, x1) - Math.max(left, x0), Math.max(1, y1 - y0) + 1);
            }
            ctx.restore();
            void top;
            void h;
          },
        ],
      },
    };
  }
}

void siShort;
customElements.define('spectrogram-chart', SpectrogramChart);

declare global {
  interface HTMLElementTagNameMap {
    'spectrogram-chart': SpectrogramChart;
  }
}
