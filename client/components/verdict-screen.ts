import { LitElement, html, nothing } from 'lit';
import { Task } from '@lit/task';
import { evaluatePlan, getDisplay, getModulation, type Analysis, type DisplayData, type Evaluated, type Plan } from '../api.ts';
import { atWords, bindingWords, headroomRows, LIMIT_WORDS, limitValue, roleWords, sliderRange } from '../../shared/display/verdict.ts';
import { formatDb, formatSi, formatShare } from '../../shared/display/format.ts';
import type { TimeCharts } from './time-charts.ts';
import './time-charts.ts';
import './headroom-bars.ts';
import './budget-chart.ts';

/** Display columns asked of the server for the time charts. */
const COLUMNS = 1000;

/**
 * <verdict-screen>: how hard the clip may be driven, first and largest; the limit that binds, in
 * words, with its time as a button that moves the charts there; a gain slider that asks the
 * server to evaluate the plan at the chosen gain (POST /api/plans/:id/evaluate) and redraws the
 * verdict, the headroom bars and the temperature curves; the stacked time charts (envelope,
 * modulation preview re-fetched at the zoomed range, junction temperatures) and the duty budget.
 *
 * Properties: `plan`, `analysis`, `display` (the whole clip's chart data), `busy` (words while
 *   the plan is being made, or null), `clipName` (as the person named the clip).
 * Events: `gain-change` { gainDb } when the person settles on a gain (slider released).
 */
export class VerdictScreen extends LitElement {
  static override properties = {
    plan: { attribute: false },
    analysis: { attribute: false },
    display: { attribute: false },
    busy: { attribute: false },
    clipName: { attribute: false },
    chosenDb: { state: true },
    pendingDb: { state: true },
    range: { state: true },
  };

  declare plan: Plan | null;
  declare analysis: Analysis | null;
  declare display: DisplayData | null;
  declare busy: string | null;
  declare clipName: string | null;
  declare chosenDb: number | null;
  declare pendingDb: number | null;
  declare range: { fromS: number; toS: number } | null;

  private planId: string | null = null;
  /** performance.now() at the last slider release (the speed figure reads it). */
  private releasedAt = 0;
  lastEvaluateMs: number | null = null;

  private readonly evaluation = new Task(this, {
    task: async ([planId, gainDb]: [string | null, number | null], { signal }) => {
      if (!planId || gainDb === null) return null;
      return evaluatePlan(planId, gainDb, COLUMNS, signal);
    },
    args: () => [this.plan?.id ?? null, this.gainAt()] as [string | null, number | null],
  });

  private readonly modulation = new Task(this, {
    task: async ([planId, gainDb, fromS, toS]: [string | null, number | null, number | undefined, number | undefined], { signal }) => {
      if (!planId || gainDb === null) return null;
      return getModulation(planId, { columns: COLUMNS, gainDb, fromS, toS }, signal);
    },
    args: () => [this.plan?.id ?? null, this.gainAt(), this.range?.fromS, this.range?.toS] as [string | null, number | null, number | undefined, number | undefined],
  });

  private readonly zoomedDisplay = new Task(this, {
    task: async ([analysisId, fromS, toS]: [string | null, number | undefined, number | undefined], { signal }) => {
      if (!analysisId || fromS === undefined || toS === undefined) return null;
      return getDisplay(analysisId, { columns: COLUMNS, fromS, toS }, signal);
    },
    args: () => [this.analysis?.id ?? null, this.range?.fromS, this.range?.toS] as [string | null, number | undefined, number | undefined],
  });

  constructor() {
    super();
    this.plan = null;
    this.analysis = null;
    this.display = null;
    this.busy = null;
    this.clipName = null;
    this.chosenDb = null;
    this.pendingDb = null;
    this.range = null;
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  /** The gain shown: the person's choice, else the advice, else the plan's evaluated gain. */
  private gainAt(): number | null {
    if (!this.plan) return null;
    const d = this.plan.document;
    return this.chosenDb ?? d.advisedGainDb ?? (Number.isFinite(d.evaluatedGainDb) ? d.evaluatedGainDb : null);
  }

  protected override willUpdate(changed: Map<string, unknown>): void {
    if (changed.has('plan') && (this.plan?.id ?? null) !== this.planId) {
      this.planId = this.plan?.id ?? null;
      this.chosenDb = null;
      this.pendingDb = null;
      this.range = null;
    }
  }

  protected override updated(): void {
    // When the answer was first drawn, ms after navigation (the page's speed figure reads it).
    if (this.plan && !this.dataset.drawnAtMs) this.dataset.drawnAtMs = performance.now().toFixed(0);
    const ev = this.evaluation.value;
    if (ev && this.releasedAt > 0 && this.evaluation.status === 2) {
      this.lastEvaluateMs = performance.now() - this.releasedAt;
      this.releasedAt = 0;
      this.dataset.evaluateMs = this.lastEvaluateMs.toFixed(1);
    }
  }

  private seek(atS: number): void {
    const charts = this.querySelector<TimeCharts>('time-charts');
    charts?.showAround(atS, Math.min(10, this.plan?.document.durationS ?? 10));
    charts?.scrollIntoView({ block: 'nearest', behavior: 'smooth' });
  }

  private commit(db: number): void {
    this.releasedAt = performance.now();
    this.chosenDb = db;
    this.pendingDb = null;
    this.dispatchEvent(new CustomEvent('gain-change', { detail: { gainDb: db }, bubbles: true, composed: true }));
  }

  override render() {
    const plan = this.plan;
    if (!plan) {
      return html`<section class="empty" aria-live="polite">
        <h2>Verdict</h2>
        <p>${this.busy ?? 'Choose or upload a clip on the Clip screen, and a coil and driver on the Rig screen; the verdict appears here.'}</p>
      </section>`;
    }
    const doc = plan.document;
    const ev: Evaluated | null = this.evaluation.value ?? null;
    const at = ev?.document ?? null;
    const gain = this.gainAt();
    const shown = this.pendingDb ?? gain ?? 0;
    const range = sliderRange(doc.advisedGainDb);
    const rows = at ? headroomRows(at.limits, at.settings.ambientC) : headroomRows(doc.limits, doc.settings.ambientC);
    const failing = at?.limits.filter((l) => !l.ok) ?? [];
    const evaluating = this.evaluation.status === 1;
    const error = this.evaluation.status === 3 ? (this.evaluation.error as Error).message : null;
    const b = doc.binding;
    return html`<div class="verdict">
      <section class="answer" aria-labelledby="answer-label">
        <p id="answer-label" class="answer-label">Advised gain for “${this.clipName ?? doc.clip.split(/[\\/]/).pop()}”</p>
        <p class="answer-figure" data-advised-gain=${doc.advisedGainDb ?? 'none'}>
          ${doc.advisedGainDb === null ? 'No safe gain' : formatDb(doc.advisedGainDb, 'dB', true)}
        </p>
        <p class="binding">
          ${bindingWords(doc)}${b?.atS != null
            ? html` <button type="button" class="link" @click=${() => this.seek(b.atS!)}>${atWords(b.atS)}</button>`
            : nothing}.
        </p>
        <p class="muted small">${doc.gainConvention}.</p>
      </section>

      <section class="try-gain" aria-labelledby="try-label">
        <h3 id="try-label">Try another gain</h3>
        <div class="slider-row">
          <label for="gain-slider">Gain</label>
          <input
            id="gain-slider"
            type="range"
            min=${range.minDb}
            max=${range.maxDb}
            step=${range.stepDb}
            .value=${String(shown)}
            aria-valuetext=${formatDb(shown, 'dB', true)}
            @input=${(e: Event) => (this.pendingDb = Number((e.target as HTMLInputElement).value))}
            @change=${(e: Event) => this.commit(Number((e.target as HTMLInputElement).value))}
          />
          <output for="gain-slider" class="gain-out">${formatDb(shown, 'dB', true)}</output>
          <button type="button" ?disabled=${this.chosenDb === null} @click=${() => {
            this.chosenDb = null;
            this.dispatchEvent(new CustomEvent('gain-change', { detail: { gainDb: null }, bubbles: true, composed: true }));
          }}>Back to the advice</button>
        </div>
        <p class="verdict-at-gain" aria-live="polite" data-state=${evaluating ? 'busy' : at ? (failing.length ? 'over' : 'ok') : 'none'} data-gain=${at?.evaluatedGainDb ?? ''}>
          ${error
            ? html`<span class="bad-word">✗ ${error}</span>`
            : !at
              ? 'Working out the figures…'
              : failing.length === 0
                ? html`<span class="ok-word">✓ Every limit holds at ${formatDb(at.evaluatedGainDb, 'dB', true)}.</span>`
                : html`<span class="bad-word">✗ At ${formatDb(at.evaluatedGainDb, 'dB', true)}:</span>
                    ${failing.map((l) => `${LIMIT_WORDS[l.limit]}${l.role ? ` of the ${roleWords(l.role)}` : ''} reaches ${limitValue(l.value, l.unit)} against ${limitValue(l.allowed, l.unit)}`).join('; ')}.`}
          ${evaluating ? html`<span class="muted"> (updating…)</span>` : nothing}
        </p>
        <headroom-bars .rows=${rows} @seek-time=${(e: CustomEvent<{ atS: number }>) => this.seek(e.detail.atS)}></headroom-bars>
      </section>

      <section class="charts" aria-label="The clip over time">
        <time-charts
          .display=${this.zoomedDisplay.value ?? this.display}
          .modulation=${this.modulation.value ?? null}
          .temperatures=${ev?.temperatures ?? null}
          .durationS=${doc.durationS}
          label="Envelope, modulation and junction temperature over time"
          @range-change=${(e: CustomEvent<{ fromS: number; toS: number }>) => {
            const whole = e.detail.fromS <= 0 && e.detail.toS >= doc.durationS;
            this.range = whole ? null : e.detail;
          }}
        ></time-charts>
      </section>

      <section class="budget">
        <h3>Duty budget</h3>
        <budget-chart .curves=${(at ?? doc).budget}></budget-chart>
      </section>

      <section class="details">
        <h3>Also worth knowing</h3>
        <dl class="figure-list">
          <div><dt>limiter ceiling</dt><dd>${formatDb((at ?? doc).limiterCeilingDbfs, 'dBFS')} on the source before the gain</dd></div>
          <div><dt>pre-emphasis</dt><dd>${preEmphasisWords(doc)}</dd></div>
          <div><dt>modulation corner</dt><dd>${formatSi(doc.modulationCornerHz, 'Hz')}</dd></div>
          <div><dt>over-modulated time</dt><dd>${formatShare((at ?? doc).overModulationFraction, 2)} of the clip</dd></div>
          <div><dt>supply current</dt><dd>peak ${formatSi((at ?? doc).supply.peakCurrentA, 'A')}, mean ${formatSi((at ?? doc).supply.meanCurrentA, 'A')}, limit ${formatSi(doc.supply.limitA, 'A')}</dd></div>
          <div><dt>keep-out distance</dt><dd>${formatSi(doc.keepOut.keepOutM, 'm')}</dd></div>
        </dl>
        ${(at ?? doc).warnings.length ? html`<ul class="warnings">${(at ?? doc).warnings.map((w) => html`<li>⚠ ${w}</li>`)}</ul>` : nothing}
      </section>
    </div>`;
  }
}

/** Pre-emphasis advice in words. */
export function preEmphasisWords(doc: Plan['document']): string {
  const p = doc.preEmphasis;
  if (!p) return 'no advice (no spectrum)';
  if (!p.advised) return `none needed (the coil loses ${p.envelopeLossDb.toFixed(1)} dB of the envelope)`;
  return `boost ${p.shelfGainDb.toFixed(1)} dB above ${formatSi(p.cornerHz, 'Hz')} (the coil loses ${p.envelopeLossDb.toFixed(1)} dB of the envelope)`;
}

customElements.define('verdict-screen', VerdictScreen);

declare global {
  interface HTMLElementTagNameMap {
    'verdict-screen': VerdictScreen;
  }
}
