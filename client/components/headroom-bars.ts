import { LitElement, html } from 'lit';
import type { HeadroomRow } from '../../shared/display/verdict.ts';
import { formatClock } from '../../shared/display/format.ts';

/**
 * <headroom-bars>: every limit as a plain bar of how much of it the clip uses, with the words
 * "to spare" or "over by" and a ✓ or ✗ beside it (colour is never the only sign).
 *
 * Properties: `rows` (HeadroomRow[]).
 * Events: `seek-time` { atS } when the person picks a limit's time.
 */
export class HeadroomBars extends LitElement {
  static override properties = { rows: { attribute: false } };
  declare rows: HeadroomRow[];

  constructor() {
    super();
    this.rows = [];
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  override render() {
    return html`<ul class="headroom">
      ${this.rows.map(
        (r) => html`<li class=${r.ok ? 'ok' : 'over'}>
          <span class="name">${r.ok ? '✓' : '✗'} ${r.name}</span>
          <span class="bar" role="meter" aria-label=${`${r.name}: ${r.value} of ${r.allowed}`} aria-valuemin="0" aria-valuemax="100" aria-valuenow=${Math.round(Math.min(1.5, r.used) * 100)}>
            <span class="fill" style=${`width:${Math.min(100, r.used * 100).toFixed(1)}%`}></span>
          </span>
          <span class="words">${r.value} of ${r.allowed} — ${r.words}
            ${r.atS !== null
              ? html`<button type="button" class="link" @click=${() => this.dispatchEvent(new CustomEvent('seek-time', { detail: { atS: r.atS }, bubbles: true, composed: true }))}>
                  at ${formatClock(r.atS)}
                </button>`
              : ''}</span>
        </li>`,
      )}
    </ul>`;
  }
}

customElements.define('headroom-bars', HeadroomBars);

declare global {
  interface HTMLElementTagNameMap {
    'headroom-bars': HeadroomBars;
  }
}
