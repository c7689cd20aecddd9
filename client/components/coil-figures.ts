import { LitElement, html, nothing } from 'lit';
import type { CoilReport } from '../api.ts';
import { formatSi } from '../../shared/display/format.ts';

/**
 * <coil-figures>: the coil's derived figures (resonant frequency, modulation corner, Q, coupling,
 * inductances, capacitances, the voltage bound, breakdown gap, arc reach and keep-out distance),
 * as computed in the browser from the profile being edited. While the profile has an error, the
 * last good figures stay, marked as out of date.
 *
 * Properties: `report` (CoilReport or null), `stale` (true while the profile does not validate).
 * Events: none.
 */
export class CoilFigures extends LitElement {
  static override properties = {
    report: { attribute: false },
    stale: { type: Boolean },
  };
  declare report: CoilReport | null;
  declare stale: boolean;

  constructor() {
    super();
    this.report = null;
    this.stale = false;
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  protected override updated(): void {
    // When the figures were first drawn, ms after navigation (the page's speed figure reads it).
    if (this.report && !this.dataset.drawnAtMs) this.dataset.drawnAtMs = performance.now().toFixed(0);
  }

  override render() {
    const r = this.report;
    if (!r) return html`<p class="muted">Figures appear once the coil profile is complete.</p>`;
    const rows: [string, string, string][] = [
      ['resonant frequency', formatSi(r.resonanceHz, 'Hz'), r.resonanceMeasuredHz !== null ? 'measured' : 'computed from the geometry'],
      ['modulation corner', formatSi(r.modulationCornerHz, 'Hz'), 'f0/(2Q): the envelope falls off above it'],
      ['quality factor Q', formatSi(r.qualityFactor, ''), r.qualityFactorMeasured !== null ? 'measured' : 'upper bound (skin effect only)'],
      ['ring-up time', formatSi(r.ringUpTauS, 's'), 'Q/(π f0)'],
      ['coupling k', formatSi(r.couplingK, '', 3), 'primary to secondary'],
      ['secondary inductance', formatSi(r.secondary.inductanceH, 'H'), 'Nagaoka current sheet'],
      ['primary inductance', formatSi(r.primary.inductanceH, 'H'), ''],
      ['mutual inductance', formatSi(r.mutualInductanceH, 'H'), ''],
      ['self-capacitance', formatSi(r.secondary.selfCapacitanceF, 'F'), "Medhurst's table"],
      ['top-load capacitance', formatSi(r.topLoad.capacitanceF, 'F'), r.topLoad.shape],
      ['total capacitance', formatSi(r.totalCapacitanceF, 'F'), 'self + top load + extra'],
      ['secondary resistance (AC)', formatSi(r.secondary.acResistanceOhm, 'Ω'), `at ${r.secondary.wireTempC} °C`],
      ['top voltage bound', formatSi(r.voltage.topVoltageBoundV, 'V'), r.voltage.topVoltageBoundV === null ? 'needs a pulse driver' : 'upper bound'],
      ['breakdown gap', formatSi(r.voltage.breakdownGapM, 'm'), ''],
      ['arc reach', formatSi(r.voltage.arcReachM, 'm'), "builders' rule"],
      ['keep-out distance', formatSi(r.keepOutM, 'm'), `× ${r.voltage.safetyFactor} safety factor`],
    ];
    return html`<section class="figures ${this.stale ? 'stale' : ''}" aria-live="polite" aria-label="Coil figures">
      ${this.stale ? html`<p class="warn-word">⚠ Out of date: fix the marked field to update these figures.</p>` : nothing}
      <p class="headline-figure">
        <span class="big" data-figure="resonance">${formatSi(r.resonanceHz, 'Hz')}</span>
        <span>resonant frequency</span>
      </p>
      <dl class="figure-list">
        ${rows.map(
          ([name, value, note]) => html`<div>
            <dt>${name}</dt>
            <dd><span class="value" data-figure=${name}>${value}</span>${note ? html` <small>${note}</small>` : nothing}</dd>
          </div>`,
        )}
      </dl>
      <details>
        <summary>How sure these are</summary>
        <ul>
          ${r.notes.map((n) => html`<li>${n}</li>`)}
        </ul>
      </details>
    </section>`;
  }
}

customElements.define('coil-figures', CoilFigures);

declare global {
  interface HTMLElementTagNameMap {
    'coil-figures': CoilFigures;
  }
}
