import { LitElement, html, nothing } from 'lit';
import uPlot from 'uplot';
import type { DeviceTemperatures, DisplayData, ModulationData } from '../api.ts';
import { DASHES, axis, cssVar, seriesColour, widthOf } from '../charts/chart-kit.ts';
import { DebounceController } from '../controllers/debounce-controller.ts';
import { panRange, zoomRange } from '../../shared/display/time-range.ts';

/** Key that ties the stacked charts' cursors together (uPlot cursor.sync). */
const SYNC_KEY = 'clip-time';

/**
 * <time-charts>: the clip's stacked charts on one time axis: the envelope of the modulation
 * source, the modulation preview (rail against the supply, or pulse on-times) and the junction
 * temperature of each device with its limit and the margin line. Zoom by dragging across any
 * chart or with the buttons; the buttons also pan. All three move together and share a cursor.
 *
 * Properties: `display`, `modulation`, `temperatures`, `durationS`, `label`.
 * Events: `range-change` { fromS, toS } after the person zooms or pans (settled for 120 ms), so
 *   the owner can fetch exact detail for the new range.
 */
export class TimeCharts extends LitElement {
  static override properties = {
    display: { attribute: false },
    modulation: { attribute: false },
    temperatures: { attribute: false },
    durationS: { type: Number },
    label: { type: String },
  };

  declare display: DisplayData | null;
  declare modulation: ModulationData | null;
  declare temperatures: { timeS: number[]; devices: DeviceTemperatures[] } | null;
  declare durationS: number;
  declare label: string;

  private plots = new Map<string, uPlot>();
  private syncing = false;
  private range: { fromS: number; toS: number } | null = null;
  private readonly settle = new DebounceController(this, 120);
  private resize: ResizeObserver | null = null;
  private scheme: MediaQueryList | null = null;
  /** Light or dark changed: the charts read their colours when made, so make them again. */
  private readonly onScheme = (): void => {
    for (const p of this.plots.values()) p.destroy();
    this.plots.clear();
    this.requestUpdate();
  };

  constructor() {
    super();
    this.display = null;
    this.modulation = null;
    this.temperatures = null;
    this.durationS = 0;
    this.label = 'Over time';
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  override connectedCallback(): void {
    super.connectedCallback();
    if (typeof ResizeObserver !== 'undefined') {
      this.resize = new ResizeObserver(() => {
        for (const [key, p] of this.plots) {
          const box = this.querySelector<HTMLElement>(`[data-plot="${key}"]`);
          if (box) {
            const w = widthOf(box);
            if (Math.abs(w - p.width) > 2) p.setSize({ width: w, height: p.height });
          }
        }
      });
      this.resize.observe(this);
    }
    if (typeof matchMedia !== 'undefined') {
      this.scheme = matchMedia('(prefers-color-scheme: dark)');
      this.scheme.addEventListener('change', this.onScheme);
    }
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.resize?.disconnect();
    this.scheme?.removeEventListener('change', this.onScheme);
    for (const p of this.plots.values()) p.destroy();
    this.plots.clear();
  }

  /** The shown range, s (the whole clip when not zoomed). */
  get shownRange(): { fromS: number; toS: number } {
    return this.range ?? { fromS: 0, toS: this.durationS };
  }

  /** Shows [fromS, toS] on every chart (the binding limit's time uses this). */
  showRange(fromS: number, toS: number, notify = true): void {
    const r = { fromS: Math.max(0, fromS), toS: Math.min(this.durationS || toS, toS) };
    if (!(r.toS > r.fromS)) return;
    this.range = r.fromS <= 0 && r.toS >= this.durationS ? null : r;
    this.syncing = true;
    for (const p of this.plots.values()) p.setScale('x', { min: r.fromS, max: r.toS });
    this.syncing = false;
    if (notify) this.settle.schedule(() => this.fire());
  }

  /** Centres a window of `spanS` on `atS`. */
  showAround(atS: number, spanS: number): void {
    const half = Math.min(spanS, this.durationS) / 2;
    let from = atS - half;
    let to = atS + half;
    if (from < 0) [from, to] = [0, 2 * half];
    if (to > this.durationS) [from, to] = [this.durationS - 2 * half, this.durationS];
    this.showRange(from, to);
  }

  zoomBy(factor: number): void {
    const r = zoomRange(this.shownRange, factor, this.durationS);
    this.showRange(r.fromS, r.toS);
  }

  panBy(fraction: number): void {
    const r = panRange(this.shownRange, fraction, this.durationS);
    this.showRange(r.fromS, r.toS);
  }

  private fire(): void {
    const r = this.shownRange;
    this.dispatchEvent(new CustomEvent('range-change', { detail: { fromS: r.fromS, toS: r.toS }, bubbles: true, composed: true }));
  }

  override render() {
    const has = { env: !!this.display, mod: !!this.modulation, temp: !!this.temperatures };
    return html`<section class="time-charts" aria-label=${this.label}>
      <div class="chart-tools" role="toolbar" aria-label="Zoom and pan the time charts">
        <button type="button" @click=${() => this.zoomBy(0.5)} title="Zoom in (half the span)">Zoom in</button>
        <button type="button" @click=${() => this.zoomBy(2)} title="Zoom out (twice the span)">Zoom out</button>
        <button type="button" @click=${() => this.panBy(-0.5)} title="Earlier by half the span">◀ Earlier</button>
        <button type="button" @click=${() => this.panBy(0.5)} title="Later by half the span">Later ▶</button>
        <button type="button" @click=${() => this.showRange(0, this.durationS)}>Whole clip</button>
        <span class="hint">Drag across a chart to zoom into that stretch.</span>
      </div>
      ${has.env ? html`<h4>Signal envelope</h4><div class="plot" data-plot="env"></div>` : nothing}
      ${has.mod
        ? html`<h4>${this.modulation!.scheme === 'pulse' ? 'Pulses: longest on-time per column' : 'Rail voltage against the supply'}</h4>
            <div class="plot" data-plot="mod"></div>`
        : nothing}
      ${has.temp ? html`<h4>Junction temperature</h4><div class="plot" data-plot="temp"></div>` : nothing}
    </section>`;
  }

  protected override updated(): void {
    this.draw('env', this.envelopeChart());
    this.draw('mod', this.modulationChart());
    this.draw('temp', this.temperatureChart());
  }

  private draw(key: string, spec: { opts: (w: number) => uPlot.Options; data: uPlot.AlignedData; series: number } | null): void {
    const box = this.querySelector<HTMLElement>(`[data-plot="${key}"]`);
    const old = this.plots.get(key);
    if (!spec || !box) {
      old?.destroy();
      this.plots.delete(key);
      return;
    }
    if (old && old.series.length === spec.series && box.contains(old.root)) {
      // New data re-ranges the value axis (hotter curves stay in view); the time range is put back.
      old.setData(spec.data, true);
      this.applyRange(old);
      return;
    }
    old?.destroy();
    if (!document.createElement('canvas').getContext?.('2d')) return;
    const p = new uPlot(spec.opts(widthOf(box)), spec.data, box);
    this.plots.set(key, p);
    this.applyRange(p);
  }

  private applyRange(p: uPlot): void {
    const r = this.shownRange;
    this.syncing = true;
    p.setScale('x', { min: r.fromS, max: r.toS });
    this.syncing = false;
  }

  private base(width: number, height: number, yQuantity: string, yUnit: string, series: uPlot.Series[]): uPlot.Options {
    return {
      width,
      height,
      scales: { x: { time: false, auto: false } },
      cursor: { sync: { key: SYNC_KEY }, drag: { x: true, y: false, setScale: true } },
      legend: { live: true },
      axes: [axis('time', 's'), axis(yQuantity, yUnit, { size: 60 })],
      // No point markers: lines only, which keeps zoomed-in redraws cheap.
      series: [{ label: 'time (s)', value: (_u, v) => (v === null ? '—' : v.toFixed(3)) }, ...series.map((x) => ({ ...x, points: { show: false } }))],
      hooks: {
        setScale: [
          (u, key) => {
            if (key !== 'x' || this.syncing) return;
            const min = u.scales.x.min ?? 0;
            const max = u.scales.x.max ?? this.durationS;
            this.showRange(min, max);
          },
        ],
      },
    };
  }

  private envelopeChart() {
    const d = this.display;
    if (!d) return null;
    const line = (label: string, i: number): uPlot.Series => ({ label, stroke: seriesColour(i), width: 1, dash: DASHES[i] });
    return {
      series: 3,
      data: [d.timeS, d.peakMax, d.peakMin] as uPlot.AlignedData,
      opts: (w: number) => ({
        ...this.base(w, 150, 'signal', 'full scale', [line('highest sample', 0), line('lowest sample', 1)]),
        bands: [{ series: [1, 2] as [number, number], fill: cssVar('--band') }],
        scales: { x: { time: false, auto: false }, y: { auto: false, range: [-1.05, 1.05] as [number, number] } },
      }),
    };
  }

  private modulationChart() {
    const m = this.modulation;
    if (!m) return null;
    if (m.railMinV && m.railMaxV) {
      const supply = m.timeS.map(() => m.supplyVoltageV);
      return {
        series: 4,
        data: [m.timeS, m.railMaxV, m.railMinV, supply] as uPlot.AlignedData,
        opts: (w: number) => ({
          ...this.base(w, 190, 'rail voltage', 'V', [
            { label: 'highest rail', stroke: seriesColour(0), width: 1 },
            { label: 'lowest rail', stroke: seriesColour(1), width: 1, dash: DASHES[1] },
            { label: `supply ${m.supplyVoltageV} V`, stroke: cssVar('--fg'), width: 2, dash: DASHES[2] },
          ]),
          bands: [{ series: [1, 2] as [number, number], fill: cssVar('--band') }],
          scales: { x: { time: false, auto: false }, y: { auto: false, range: [0, m.supplyVoltageV * 1.08] as [number, number] } },
        }),
      };
    }
    const onUs = (m.maxOnTimeS ?? []).map((s) => s * 1e6);
    return {
      series: 2,
      data: [m.timeS, onUs] as uPlot.AlignedData,
      opts: (w: number) => ({
        ...this.base(w, 170, 'longest on-time', 'µs', [{ label: 'longest on-time', stroke: seriesColour(0), width: 1, paths: uPlot.paths.stepped?.({ align: 1 }) }]),
      }),
    };
  }

  private temperatureChart() {
    const t = this.temperatures;
    if (!t || t.devices.length === 0) return null;
    const data: (number | null)[][] = [t.timeS];
    const series: uPlot.Series[] = [];
    t.devices.forEach((d, i) => {
      data.push(d.junctionC);
      series.push({ label: `${d.role} junction`, stroke: seriesColour(i), width: 2, dash: DASHES[i % DASHES.length] });
    });
    // Limit lines per device: the planning limit (Tj max − margin) and Tj max.
    const limits = new Map<string, number>();
    for (const d of t.devices) {
      limits.set(`${d.role} limit ${d.limitC.toFixed(0)} °C (Tj max − margin)`, d.limitC);
      if (d.tjMaxC !== undefined) limits.set(`${d.role} Tj max ${d.tjMaxC.toFixed(0)} °C`, d.tjMaxC);
    }
    for (const [label, v] of limits) {
      const tjMax = label.includes('Tj max ');
      data.push(t.timeS.map(() => v));
      series.push({ label, stroke: tjMax ? cssVar('--c-vermillion') : cssVar('--fg'), width: 1.5, dash: tjMax ? [2, 3] : [8, 4], points: { show: false } });
    }
    return {
      series: series.length + 1,
      data: data as uPlot.AlignedData,
      opts: (w: number) => this.base(w, 250, 'junction temperature', '°C', series),
    };
  }
}

customElements.define('time-charts', TimeCharts);

declare global {
  interface HTMLElementTagNameMap {
    'time-charts': TimeCharts;
  }
}
