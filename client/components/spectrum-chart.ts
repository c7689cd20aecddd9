import { html } from 'lit';
import type uPlot from 'uplot';
import { formatSi } from '../../shared/display/format.ts';
import { UplotElement, axis, logSplits, logTickValues, markerLine, seriesColour, siShort } from '../charts/chart-kit.ts';

/**
 * <spectrum-chart>: the clip's average spectrum (Welch, dB re full scale) on a log frequency
 * axis, with the coil's modulation corner f0/(2Q) drawn as a labelled line: the envelope cannot
 * follow much above it.
 *
 * Properties: `freqHz`, `powerDb` (equal lengths), `cornerHz` (null: no coil chosen).
 * Events: none.
 */
export class SpectrumChart extends UplotElement {
  static override properties = {
    freqHz: { attribute: false },
    powerDb: { attribute: false },
    cornerHz: { attribute: false },
  };

  declare freqHz: number[];
  declare powerDb: number[];
  declare cornerHz: number | null;

  constructor() {
    super();
    this.freqHz = [];
    this.powerDb = [];
    this.cornerHz = null;
    this.chartHeight = 220;
  }

  override render() {
    return html`<figure class="chart">
      <figcaption>Spectrum of the modulation source${this.cornerHz ? html` — modulation corner ${formatSi(this.cornerHz, 'Hz')} marked` : ''}</figcaption>
      <div class="plot"></div>
    </figure>`;
  }

  protected override updated(): void {
    this.rebuild();
  }

  chartData(): uPlot.AlignedData | null {
    if (this.freqHz.length < 2) return null;
    // A log axis cannot show 0 Hz: start at the first positive frequency.
    const i0 = this.freqHz.findIndex((f) => f > 0);
    return [this.freqHz.slice(i0), this.powerDb.slice(i0)];
  }

  chartOptions(width: number): uPlot.Options {
    return {
      width,
      height: this.chartHeight,
      scales: { x: { time: false, distr: 3 } },
      axes: [axis('frequency', 'Hz', { splits: logSplits, values: logTickValues }), axis('power', 'dB re full scale', { size: 60 })],
      series: [{ label: 'frequency (Hz)', value: (_u, v) => (v == null ? '—' : `${siShort(v)}Hz`) }, { label: 'power', stroke: seriesColour(0), width: 1.5 }],
      plugins: [markerLine(() => this.cornerHz, () => [`modulation corner ${formatSi(this.cornerHz, 'Hz')}`, formatSi(this.cornerHz, 'Hz')])],
    };
  }
}

customElements.define('spectrum-chart', SpectrumChart);

declare global {
  interface HTMLElementTagNameMap {
    'spectrum-chart': SpectrumChart;
  }
}
