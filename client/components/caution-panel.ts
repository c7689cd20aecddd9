import { LitElement, html, nothing } from 'lit';
import type { Cautions } from '../api.ts';

/** The cautions the page falls back on when the server's list cannot be read (the same topics). */
export const FALLBACK_CAUTIONS: Cautions = {
  summary: 'Resonant coils make high voltage and RF that can burn, injure or kill. Read these before you power one.',
  items: [
    { topic: 'mains', text: 'The supply and driver carry lethal voltages: work on them unplugged, with capacitors discharged.' },
    { topic: 'high-voltage', text: 'Never touch the coil, its arcs or the driver while powered; keep everyone beyond the keep-out distance.' },
    { topic: 'rf-burns', text: 'RF current burns deep and without warning: do not draw arcs to your body.' },
    { topic: 'ozone', text: 'Arcs make ozone and nitrogen oxides: run only in a ventilated space.' },
    { topic: 'fire', text: 'Arcs ignite paper, curtains, dust and solvents: keep flammables away and an extinguisher at hand.' },
    { topic: 'radio', text: 'The coil radiates RF that can interfere with radio services; the radio rules of your country apply.' },
    { topic: 'hearing', text: 'Arc sound is loud and impulsive: protect your hearing.' },
  ],
};

/**
 * <caution-panel>: the safety cautions (lethal voltages in the supply and driver, RF burns, ozone,
 * fire, radio interference, hearing; local codes and licensed practice) in a modal dialog. In
 * `acknowledge` mode it asks the person to confirm before the first render.
 *
 * Properties: `cautions`, `open`, `acknowledge`.
 * Events: `cautions-close` { acknowledged } when the dialog closes.
 */
export class CautionPanel extends LitElement {
  static override properties = {
    cautions: { attribute: false },
    open: { type: Boolean },
    acknowledge: { type: Boolean },
  };
  declare cautions: Cautions | null;
  declare open: boolean;
  declare acknowledge: boolean;

  constructor() {
    super();
    this.cautions = null;
    this.open = false;
    this.acknowledge = false;
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  protected override updated(): void {
    const d = this.querySelector('dialog');
    if (!d) return;
    if (this.open && !d.open) {
      if (typeof d.showModal === 'function') d.showModal();
      else d.setAttribute('open', '');
    } else if (!this.open && d.open) d.close();
  }

  private close(acknowledged: boolean): void {
    this.open = false;
    this.dispatchEvent(new CustomEvent('cautions-close', { detail: { acknowledged }, bubbles: true, composed: true }));
  }

  override render() {
    const c = this.cautions ?? FALLBACK_CAUTIONS;
    return html`<dialog class="cautions" aria-labelledby="cautions-title" @cancel=${(e: Event) => {
      e.preventDefault();
      this.close(false);
    }}>
      <h2 id="cautions-title">⚠ Cautions</h2>
      <p>${c.summary}</p>
      <ul>
        ${c.items.map((i) => html`<li><strong>${i.topic.replace('-', ' ')}:</strong> ${i.text}</li>`)}
      </ul>
      <p>coilcue's figures are estimates from published models, not guarantees. Follow local electrical codes, radio rules and licensed practice.</p>
      <div class="actions">
        ${this.acknowledge
          ? html`<button type="button" class="primary" @click=${() => this.close(true)}>I have read these: go on</button>
              <button type="button" @click=${() => this.close(false)}>Not now</button>`
          : html`<button type="button" class="primary" @click=${() => this.close(false)}>Close</button>`}
      </div>
    </dialog>${nothing}`;
  }
}

customElements.define('caution-panel', CautionPanel);

declare global {
  interface HTMLElementTagNameMap {
    'caution-panel': CautionPanel;
  }
}
