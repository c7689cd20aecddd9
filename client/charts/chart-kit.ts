/**
 * What every chart on the page shares: the Okabe–Ito palette (read from the page's CSS custom
 * properties, so light and dark follow the system), axes that always name quantity and unit,
 * number formatting, and a base element that owns one uPlot instance (created on first render,
 * resized with its box, rebuilt when the colour scheme changes, destroyed when the element leaves
 * the page).
 */
import { LitElement } from 'lit';
import uPlot from 'uplot';
import { PREFIXES } from '../../shared/display/format.ts';

/** Okabe & Ito (2008) colour-blind-safe palette, by role; CSS variables hold the per-scheme values. */
export const SERIES_VARS = ['--c-blue', '--c-orange', '--c-green', '--c-purple', '--c-vermillion', '--c-sky', '--c-yellow'] as const;

/** A CSS custom property of the document, resolved now. */
export function cssVar(name: string, fallback = '#000'): string {
  if (typeof document === 'undefined') return fallback;
  const v = getComputedStyle(document.documentElement).getPropertyValue(name).trim();
  return v || fallback;
}

/** The n-th series colour. */
export const seriesColour = (i: number): string => cssVar(SERIES_VARS[i % SERIES_VARS.length]);

/** Dash patterns so lines differ by shape as well as colour. */
export const DASHES: number[][] = [[], [8, 4], [2, 3], [10, 3, 2, 3]];

/** An axis that names its quantity and unit, e.g. axis('junction temperature', '°C'). */
export function axis(quantity: string, unit: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis {
  const fg = cssVar('--fg', '#111');
  const grid = cssVar('--grid', '#ccc');
  return {
    label: unit ? `${quantity} (${unit})` : quantity,
    stroke: fg,
    grid: { stroke: grid, width: 1 },
    ticks: { stroke: grid, width: 1 },
    labelFont: '12px system-ui, sans-serif',
    font: '11px system-ui, sans-serif',
    labelSize: 20,
    ...extra,
  };
}

/** Ticks on a log axis written as 10, 100, 1k, 10k (and 1m, 10m for fractions). */
export function logTickValues(_u: uPlot, splits: number[]): string[] {
  return splits.map((v) => {
    if (!(v > 0)) return '';
    const mantissa = Math.round(v / 10 ** Math.floor(Math.log10(v) + 1e-9));
    return mantissa === 1 || mantissa === 2 || mantissa === 5 ? siShort(v) : '';
  });
}

/** Splits of a log axis at 1, 2 and 5 times each power of ten within [min, max]. */
export function logSplits(_u: uPlot, _axis: number, min: number, max: number): number[] {
  const out: number[] = [];
  if (!(min > 0) || !(max > min)) return out;
  for (let e = Math.floor(Math.log10(min)); e <= Math.ceil(Math.log10(max)); e++) {
    for (const m of [1, 2, 5]) {
      const v = m * 10 ** e;
      if (v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9)) out.push(v);
    }
  }
  return out;
}

/** A number with an SI prefix, 3 significant figures: 1.50 k, 22.0 µ. */
export function siShort(v: number): string {
  if (v === 0 || !Number.isFinite(v)) return String(v);
  const prefixes = PREFIXES.filter(([f]) => f >= 1e-12); // down to pico, as the axes need
  const a = Math.abs(v);
  for (const [f, p] of prefixes) if (a >= f * 0.9995) return `${+(v / f).toPrecision(3)}${p}`;
  return v.toExponential(2);
}

/** Width available to a chart in `el`, at least 280 px. */
export const widthOf = (el: HTMLElement): number => Math.max(280, Math.floor(el.getBoundingClientRect().width || el.clientWidth || 600));

/**
 * A Lit element (light DOM, so the page's stylesheet and print sheet reach it) that draws one
 * uPlot chart into its `.plot` child. Subclasses give `chartOptions(width)` and `chartData()`,
 * and call `refresh()` when their inputs change (a new data array keeps the zoom when
 * `keepScale` is true).
 */
export abstract class UplotElement extends LitElement {
  protected plot: uPlot | null = null;
  private resize: ResizeObserver | null = null;
  private scheme: MediaQueryList | null = null;
  private readonly onScheme = (): void => this.rebuild();
  protected chartHeight = 200;

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  abstract chartOptions(width: number): uPlot.Options;
  abstract chartData(): uPlot.AlignedData | null;

  override connectedCallback(): void {
    super.connectedCallback();
    if (typeof ResizeObserver !== 'undefined') {
      this.resize = new ResizeObserver(() => {
        const box = this.querySelector<HTMLElement>('.plot');
        if (this.plot && box) {
          const w = widthOf(box);
          if (Math.abs(w - this.plot.width) > 2) this.plot.setSize({ width: w, height: this.chartHeight });
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
    this.plot?.destroy();
    this.plot = null;
  }

  /** Creates the chart (or replaces its data). */
  protected refresh(keepScale = false): void {
    const box = this.querySelector<HTMLElement>('.plot');
    const data = this.chartData();
    if (!box || !data) {
      this.plot?.destroy();
      this.plot = null;
      return;
    }
    if (this.plot) {
      this.plot.setData(data, !keepScale);
      return;
    }
    // uPlot needs a canvas context; without one (a DOM-only test environment) there is no chart.
    if (typeof HTMLCanvasElement === 'undefined' || !document.createElement('canvas').getContext?.('2d')) return;
    this.plot = new uPlot(this.chartOptions(widthOf(box)), data, box);
  }

  protected rebuild(): void {
    this.plot?.destroy();
    this.plot = null;
    this.refresh();
  }

  /** The uPlot instance (tests and the speed measurement reach it through here). */
  get chart(): uPlot | null {
    return this.plot;
  }
}

/**
 * A vertical line at x = value with a label, drawn after the series. `labels` gives the label's
 * wordings, longest first: the first that fits beside the line (right of it, else left) is drawn;
 * on a narrow plot where none fits, the shortest, kept inside the plot.
 */
export function markerLine(xOf: () => number | null, labels: () => string[], colourVar = '--c-vermillion'): uPlot.Plugin {
  return {
    hooks: {
      draw: (u: uPlot) => {
        const x = xOf();
        if (x === null || !Number.isFinite(x)) return;
        const px = u.valToPos(x, 'x', true);
        if (px < u.bbox.left || px > u.bbox.left + u.bbox.width) return;
        const ctx = u.ctx;
        ctx.save();
        ctx.strokeStyle = cssVar(colourVar);
        ctx.lineWidth = 2 * devicePixelRatio;
        ctx.setLineDash([6 * devicePixelRatio, 4 * devicePixelRatio]);
        ctx.beginPath();
        ctx.moveTo(px, u.bbox.top);
        ctx.lineTo(px, u.bbox.top + u.bbox.height);
        ctx.stroke();
        ctx.setLineDash([]);
        ctx.fillStyle = cssVar('--fg');
        ctx.font = `${12 * devicePixelRatio}px system-ui, sans-serif`;
        // uPlot leaves the alignment of its last axis labels on the context.
        ctx.textAlign = 'left';
        const gap = 6 * devicePixelRatio;
        const left = u.bbox.left + 2 * devicePixelRatio;
        const right = u.bbox.left + u.bbox.width;
        const options = labels();
        let text = options[options.length - 1] ?? '';
        let tx = Math.max(left, Math.min(px + gap, right - ctx.measureText(text).width));
        for (const t of options) {
          const w = ctx.measureText(t).width;
          const at = px + gap + w <= right ? px + gap : px - gap - w >= left ? px - gap - w : null;
          if (at !== null) {
            [text, tx] = [t, at];
            break;
          }
        }
        ctx.fillText(text, tx, u.bbox.top + 14 * devicePixelRatio);
        ctx.restore();
      },
    },
  };
}
