import { LitElement, html, nothing } from 'lit';
import { Task } from '@lit/task';
import {
  ApiError,
  coilExportUrl,
  createCoil,
  createDriver,
  driverExportUrl,
  replaceCoil,
  replaceDriver,
  type Coil,
  type Driver,
} from '../api.ts';
import { CoilProfileSchema } from '../../shared/schemas/coil.ts';
import { DriverProfileSchema } from '../../shared/schemas/driver.ts';
import type { SchemaNode } from '../../shared/display/schema-walk.ts';
import { liveFigures, type LiveFigures } from '../../shared/display/live-coil.ts';
import type { CoilReport } from '../api.ts';
import './profile-form.ts';
import './coil-figures.ts';

type Kind = 'coil' | 'driver';

/**
 * <rig-screen>: the coil and driver being used, edited in forms generated from their schemas,
 * with the coil's figures recomputed in the browser on every keystroke. Save replaces the stored
 * profile, "Save as new" stores a copy, Import reads a profile file, Export downloads the saved one.
 *
 * Properties: `coils`, `drivers`, `coilId`, `driverId`, `active` (shown now).
 * Events: `rig-select` { coilId?, driverId? } when the person picks another profile;
 *   `rig-saved` { kind: 'coil' | 'driver', item: Coil | Driver } after a save or an import.
 */
export class RigScreen extends LitElement {
  static override properties = {
    coils: { attribute: false },
    drivers: { attribute: false },
    coilId: { attribute: false },
    driverId: { attribute: false },
    coilDraft: { state: true },
    driverDraft: { state: true },
    message: { state: true },
    active: { type: Boolean },
  };

  declare coils: Coil[];
  declare drivers: Driver[];
  declare coilId: string | null;
  declare driverId: string | null;
  declare coilDraft: Record<string, unknown> | null;
  declare driverDraft: Record<string, unknown> | null;
  declare message: { kind: Kind; ok: boolean; text: string } | null;
  /** Whether the screen is shown; the forms are built the first time it is (the figures always). */
  declare active: boolean;
  private shown = false;

  private live: LiveFigures = { report: null, coilProblem: null, driverProblem: null };
  private lastGood: CoilReport | null = null;
  private draftFor = { coil: '', driver: '' };

  private readonly save = new Task(this, {
    autoRun: false,
    task: async ([kind, asNew]: [Kind, boolean]) => {
      this.message = null;
      try {
        const item =
          kind === 'coil'
            ? asNew || !this.coilId
              ? await createCoil(this.coilDraft)
              : await replaceCoil(this.coilId, this.coilDraft)
            : asNew || !this.driverId
              ? await createDriver(this.driverDraft)
              : await replaceDriver(this.driverId, this.driverDraft);
        this.message = { kind, ok: true, text: `✓ Saved ${kind} "${item.name}".` };
        this.fire('rig-saved', { kind, item });
        return item;
      } catch (e) {
        this.message = { kind, ok: false, text: `✗ Not saved: ${(e as Error).message}` };
        throw e;
      }
    },
  });

  constructor() {
    super();
    this.coils = [];
    this.drivers = [];
    this.coilId = null;
    this.driverId = null;
    this.coilDraft = null;
    this.driverDraft = null;
    this.message = null;
    this.active = true;
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  private fire(type: string, detail: unknown): void {
    this.dispatchEvent(new CustomEvent(type, { detail, bubbles: true, composed: true }));
  }

  protected override willUpdate(): void {
    if (this.active) this.shown = true;
    // A newly chosen (or newly saved) profile replaces the draft.
    const coil = this.coils.find((c) => c.id === this.coilId) ?? null;
    const coilKey = coil ? `${coil.id}@${coil.updatedAt}` : '';
    if (coilKey !== this.draftFor.coil) {
      this.draftFor.coil = coilKey;
      this.coilDraft = coil ? structuredClone(coil.profile) as unknown as Record<string, unknown> : this.coilDraft;
    }
    const driver = this.drivers.find((d) => d.id === this.driverId) ?? null;
    const driverKey = driver ? `${driver.id}@${driver.updatedAt}` : '';
    if (driverKey !== this.draftFor.driver) {
      this.draftFor.driver = driverKey;
      this.driverDraft = driver ? structuredClone(driver.profile) as unknown as Record<string, unknown> : this.driverDraft;
    }
    this.live = this.coilDraft ? liveFigures(this.coilDraft, this.driverDraft) : { report: null, coilProblem: null, driverProblem: null };
    if (this.live.report) this.lastGood = this.live.report;
  }

  private async importFile(kind: Kind, e: Event): Promise<void> {
    const input = e.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    let json: unknown;
    try {
      json = JSON.parse(await file.text());
    } catch {
      this.message = { kind, ok: false, text: `✗ ${file.name} is not JSON: choose a ${kind} profile file (.json), such as one exported here.` };
      return;
    }
    try {
      const item = kind === 'coil' ? await createCoil(json) : await createDriver(json);
      this.message = { kind, ok: true, text: `✓ Imported ${kind} "${item.name}".` };
      this.fire('rig-saved', { kind, item });
    } catch (err) {
      const where = err instanceof ApiError && err.field ? ` (field ${err.field})` : '';
      this.message = { kind, ok: false, text: `✗ ${file.name} was not imported${where}: ${(err as Error).message}` };
    }
  }

  private panel(kind: Kind) {
    const isCoil = kind === 'coil';
    const items: (Coil | Driver)[] = isCoil ? this.coils : this.drivers;
    const id = isCoil ? this.coilId : this.driverId;
    const problem = isCoil ? this.live.coilProblem : this.live.driverProblem;
    const draft = isCoil ? this.coilDraft : this.driverDraft;
    const saving = this.save.status === 1;
    const msg = this.message?.kind === kind ? this.message : null;
    return html`<section class="panel" aria-labelledby=${`${kind}-title`}>
      <h2 id=${`${kind}-title`}>${isCoil ? 'Coil' : 'Driver'}</h2>
      <div class="row">
        <label for=${`${kind}-pick`}>${isCoil ? 'Coil profile' : 'Driver profile'}</label>
        <select
          id=${`${kind}-pick`}
          @change=${(e: Event) => this.fire('rig-select', { [isCoil ? 'coilId' : 'driverId']: (e.target as HTMLSelectElement).value })}
        >
          ${items.map((c) => html`<option value=${c.id} ?selected=${c.id === id}>${c.name}</option>`)}
        </select>
      </div>
      <div class="actions">
        <button type="button" class="primary" ?disabled=${!draft || !!problem || saving} @click=${() => this.save.run([kind, false])}>Save</button>
        <button type="button" ?disabled=${!draft || !!problem || saving} @click=${() => this.save.run([kind, true])}>Save as new</button>
        <label class="button">Import…<input type="file" accept=".json,application/json" class="visually-hidden" @change=${(e: Event) => this.importFile(kind, e)} /></label>
        ${id ? html`<a class="button" href=${isCoil ? coilExportUrl(id) : driverExportUrl(id)} download>Export saved</a>` : nothing}
      </div>
      ${msg ? html`<p class=${msg.ok ? 'ok-word' : 'bad-word'} role="status">${msg.text}</p>` : nothing}
      ${problem ? html`<p class="bad-word" role="alert">✗ ${problem.message}</p>` : nothing}
      <profile-form
        .schema=${(isCoil ? CoilProfileSchema : DriverProfileSchema) as unknown as SchemaNode}
        .value=${draft}
        .errorField=${problem?.field ?? null}
        .errorMessage=${problem?.message ?? null}
        formId=${kind}
        label=${isCoil ? 'Coil profile' : 'Driver profile'}
        @value-change=${(e: CustomEvent<{ value: Record<string, unknown> }>) => {
          if (isCoil) this.coilDraft = e.detail.value;
          else this.driverDraft = e.detail.value;
        }}
      ></profile-form>
    </section>`;
  }

  override render() {
    return html`<div class="rig">
      <div class="rig-figures">
        <h2>What this coil does</h2>
        <coil-figures .report=${this.live.report ?? this.lastGood} ?stale=${!this.live.report && !!this.lastGood}></coil-figures>
      </div>
      ${this.shown ? html`${this.panel('coil')} ${this.panel('driver')}` : nothing}
    </div>`;
  }
}

customElements.define('rig-screen', RigScreen);

declare global {
  interface HTMLElementTagNameMap {
    'rig-screen': RigScreen;
  }
}
