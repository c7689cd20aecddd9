import { LitElement, html, nothing } from 'lit';
import { Task } from '@lit/task';
import {
  createPlan,
  createSet,
  getSetPlan,
  replaceSet,
  startSetPlan,
  type Cautions,
  type Clip,
  type Coil,
  type Driver,
  type Plan,
  type SetItem,
  type SetPlan,
  type ShowSet,
} from '../api.ts';
import { JobController } from '../controllers/job-controller.ts';
import { formatClock, formatDb, formatSi } from '../../shared/display/format.ts';
import { moveItem, roundGapUpS } from '../../shared/display/reorder.ts';
import { LIMIT_WORDS, roleWords } from '../../shared/display/verdict.ts';
import { preEmphasisWords } from './verdict-screen.ts';
import './set-temperature-chart.ts';

interface Outcome {
  plan: SetPlan;
  /** Per item, its own plan at the gain the set plays it (for pre-emphasis), or null. */
  plans: (Plan | null)[];
  items: SetItem[];
}

/**
 * <set-screen>: the clips of a show in playing order (drag to reorder, or the Up and Down
 * buttons), the gap after each, then one plan of the whole set: a verdict per clip, the first
 * failing clip, the shortest safe gap after each, one junction-temperature chart across the set
 * with the gaps shaded, and a set sheet to print (gain, limiter ceiling, pre-emphasis, verdict,
 * cautions).
 *
 * Properties: `sets`, `clips`, `coils`, `drivers`, `coilId`, `driverId`, `cautions`.
 * Events: `set-saved` { set } after the set is stored.
 */
export class SetScreen extends LitElement {
  static override properties = {
    sets: { attribute: false },
    clips: { attribute: false },
    coils: { attribute: false },
    drivers: { attribute: false },
    coilId: { attribute: false },
    driverId: { attribute: false },
    cautions: { attribute: false },
    setId: { state: true },
    name: { state: true },
    items: { state: true },
    dragFrom: { state: true },
    addClipId: { state: true },
  };

  declare sets: ShowSet[];
  declare clips: Clip[];
  declare coils: Coil[];
  declare drivers: Driver[];
  declare coilId: string | null;
  declare driverId: string | null;
  declare cautions: Cautions | null;
  declare setId: string | null;
  declare name: string;
  declare items: SetItem[];
  declare dragFrom: number | null;
  declare addClipId: string;

  private readonly job = new JobController(this);
  private loadedFrom = '';

  private readonly planning = new Task(this, {
    autoRun: false,
    task: async (): Promise<Outcome> => {
      if (!this.coilId || !this.driverId) throw new Error('choose a coil and a driver on the Rig screen first');
      if (this.items.length === 0) throw new Error('add at least one clip to the set');
      const req = { name: this.name || 'Set', coilId: this.coilId, driverId: this.driverId, items: this.items.map((i) => ({ ...i })) };
      const set = this.setId ? await replaceSet(this.setId, req) : await createSet(req);
      this.setId = set.id;
      this.dispatchEvent(new CustomEvent('set-saved', { detail: { set }, bubbles: true, composed: true }));
      const { job } = await startSetPlan(set.id);
      await this.job.watch(job);
      const plan = await getSetPlan(set.id);
      const plans = await Promise.all(
        plan.result.items.map(async (r, i) => {
          try {
            const p = await createPlan({ clipId: req.items[i].clipId, coilId: req.coilId, driverId: req.driverId, gainDb: r.gainDb });
            return 'document' in p ? p : null;
          } catch {
            return null;
          }
        }),
      );
      return { plan, plans, items: req.items };
    },
  });

  constructor() {
    super();
    this.sets = [];
    this.clips = [];
    this.coils = [];
    this.drivers = [];
    this.coilId = null;
    this.driverId = null;
    this.cautions = null;
    this.setId = null;
    this.name = 'Tonight';
    this.items = [];
    this.dragFrom = null;
    this.addClipId = '';
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  protected override willUpdate(changed: Map<string, unknown>): void {
    // Start from the first stored set once the list arrives.
    if (changed.has('sets') && this.setId === null && this.sets.length > 0 && this.loadedFrom === '') this.load(this.sets[0]);
  }

  private load(s: ShowSet): void {
    this.loadedFrom = s.id;
    this.setId = s.id;
    this.name = s.name;
    this.items = s.items.map((i) => ({ ...i }));
  }

  private clipName(id: string): string {
    return this.clips.find((c) => c.id === id)?.name ?? id;
  }

  private move(from: number, to: number): void {
    if (to < 0 || to >= this.items.length) return;
    this.items = moveItem(this.items, from, to);
    // Keep the keyboard where the item went.
    void this.updateComplete.then(() => this.querySelector<HTMLButtonElement>(`[data-move="${to > from ? 'down' : 'up'}"][data-index="${to}"]`)?.focus());
  }

  private setGap(i: number, v: number): void {
    this.items = this.items.map((it, j) => (j === i ? { ...it, gapAfterS: v } : it));
  }

  private listView(out: Outcome | undefined) {
    const stale = out && JSON.stringify(out.items) !== JSON.stringify(this.items);
    const result = !stale ? out?.plan.result : undefined;
    return html`<ol class="set-list" aria-label="Clips of the set in playing order">
      ${this.items.map((it, i) => {
        const r = result?.items[i];
        const first = result?.firstFailingItem === i;
        const silent = result?.silentItems?.find((x) => x.index === i);
        return html`<li
          class="set-item ${this.dragFrom === i ? 'dragging' : ''} ${first ? 'first-failing' : ''}"
          draggable="true"
          data-index=${i}
          @dragstart=${(e: DragEvent) => {
            this.dragFrom = i;
            e.dataTransfer?.setData('text/plain', String(i));
          }}
          @dragend=${() => (this.dragFrom = null)}
          @dragover=${(e: DragEvent) => e.preventDefault()}
          @drop=${(e: DragEvent) => {
            e.preventDefault();
            const from = this.dragFrom ?? Number(e.dataTransfer?.getData('text/plain'));
            this.dragFrom = null;
            if (Number.isInteger(from) && from !== i) this.move(from, i);
          }}
        >
          <span class="handle" aria-hidden="true">⠿</span>
          <span class="set-clip"><span class="pos">${i + 1}.</span> ${this.clipName(it.clipId)}</span>
          <span class="set-verdict">
            ${r
              ? silent && r.ok
                ? html`<span class="bad-word">✗ silent</span>: no safe gain ${silent.evenCold ? 'on this rig' : 'from the temperature it starts at'}`
                : r.ok
                ? html`<span class="ok-word">✓ holds</span> at ${formatDb(r.gainDb, 'dB', true)}, peak ${r.peakJunctionC.toFixed(0)} °C`
                : html`<span class="bad-word">✗ ${first ? 'first to fail' : 'fails'}</span> at ${formatDb(r.gainDb, 'dB', true)}:
                    ${r.failing.map((l) => `${LIMIT_WORDS[l.limit]}${l.role ? ` (${roleWords(l.role)})` : ''}`).join(', ')}`
              : stale
                ? html`<span class="muted">changed: plan again</span>`
                : nothing}
          </span>
          <span class="gap">
            <label for=${`gap-${i}`}>gap after</label>
            <input id=${`gap-${i}`} type="number" min="0" max="86400" step="1" .value=${String(it.gapAfterS)}
              @input=${(e: Event) => {
                const v = Number((e.target as HTMLInputElement).value);
                if (Number.isFinite(v) && v >= 0 && v <= 86400) this.setGap(i, v);
              }} />
            <span class="unit">s</span>
            ${r?.minSafeGapAfterS != null && i < this.items.length - 1
              ? html`<button type="button" class="link" title="Set the gap to the shortest after which the next clip keeps every limit at its gain"
                  @click=${() => this.setGap(i, roundGapUpS(r.minSafeGapAfterS!))}>shortest safe: ${roundGapUpS(r.minSafeGapAfterS)} s</button>`
              : nothing}
          </span>
          <span class="move">
            <button type="button" data-move="up" data-index=${i} aria-label=${`Move ${this.clipName(it.clipId)} up`} ?disabled=${i === 0} @click=${() => this.move(i, i - 1)}>↑ Up</button>
            <button type="button" data-move="down" data-index=${i} aria-label=${`Move ${this.clipName(it.clipId)} down`} ?disabled=${i === this.items.length - 1} @click=${() => this.move(i, i + 1)}>↓ Down</button>
            <button type="button" aria-label=${`Remove ${this.clipName(it.clipId)} from the set`} @click=${() => (this.items = this.items.filter((_x, j) => j !== i))}>Remove</button>
          </span>
        </li>`;
      })}
    </ol>`;
  }

  private sheet(out: Outcome) {
    const r = out.plan.result;
    const coil = this.coils.find((c) => c.id === this.coilId);
    const driver = this.drivers.find((d) => d.id === this.driverId);
    // The keep-out needs the driver's supply (the coil's voltage bound): the plans have it; a coil's
    // own report, made without a driver, may not.
    const keepOutM = out.plans.find((p) => p?.document.keepOut.keepOutM != null)?.document.keepOut.keepOutM ?? coil?.report.keepOutM ?? null;
    return html`<section class="set-sheet" aria-labelledby="sheet-title">
      <h3 id="sheet-title">Set sheet: ${this.name}</h3>
      <p>Coil: ${coil?.name ?? '—'} · Driver: ${driver?.name ?? '—'} · ambient ${r.ambientC} °C ·
        ${r.firstFailingItem !== null
          ? `✗ clip ${r.firstFailingItem + 1} is the first to fail`
          : r.silentItems?.length
            ? `✗ ${r.silentItems.map((x) => `clip ${x.index + 1}`).join(', ')} planned silent: no safe gain`
            : '✓ every clip holds'}</p>
      <table>
        <thead>
          <tr><th scope="col">#</th><th scope="col">clip</th><th scope="col">verdict</th><th scope="col">gain</th><th scope="col">gap after</th><th scope="col">limiter ceiling</th><th scope="col">pre-emphasis</th></tr>
        </thead>
        <tbody>
          ${r.items.map((it, i) => {
            const p = out.plans[i];
            return html`<tr>
              <td>${i + 1}</td>
              <td>${this.clipName(out.items[i].clipId)}</td>
              <td>${it.ok && r.silentItems?.some((x) => x.index === i) ? '✗ silent: no safe gain' : `${it.ok ? '✓ holds' : '✗ fails'}, peak ${it.peakJunctionC.toFixed(0)} °C`}</td>
              <td>${formatDb(it.gainDb, 'dB', true)}</td>
              <td>${formatClock(it.gapAfterS)}${it.minSafeGapAfterS != null && it.minSafeGapAfterS > it.gapAfterS ? ` (needs ${roundGapUpS(it.minSafeGapAfterS)} s)` : ''}</td>
              <td>${p ? formatDb(p.document.limiterCeilingDbfs, 'dBFS') : formatDb(-it.gainDb, 'dBFS')}</td>
              <td>${p ? preEmphasisWords(p.document) : '—'}</td>
            </tr>`;
          })}
        </tbody>
      </table>
      ${keepOutM != null ? html`<p>Keep-out distance: ${formatSi(keepOutM, 'm')} from the coil and its arcs.</p>` : nothing}
      <h4>Cautions</h4>
      <ul class="sheet-cautions">
        ${(this.cautions?.items.map((c) => c.text) ?? coil?.report.cautions ?? []).map((t) => html`<li>${t}</li>`)}
      </ul>
    </section>`;
  }

  override render() {
    const out = this.planning.value;
    const busy = this.planning.status === 1;
    const j = this.job.job;
    const available = this.clips.filter((c) => !this.items.some((i) => i.clipId === c.id));
    const addId = this.addClipId || available[0]?.id || '';
    return html`<div class="set">
      <section class="panel" aria-labelledby="set-title">
        <h2 id="set-title">Set</h2>
        <div class="row">
          ${this.sets.length > 1
            ? html`<label for="set-pick">Stored sets</label>
                <select id="set-pick" @change=${(e: Event) => {
                  const s = this.sets.find((x) => x.id === (e.target as HTMLSelectElement).value);
                  if (s) this.load(s);
                }}>${this.sets.map((s) => html`<option value=${s.id} ?selected=${s.id === this.setId}>${s.name}</option>`)}</select>`
            : nothing}
          <label for="set-name">Set name</label>
          <input id="set-name" type="text" maxlength="200" .value=${this.name} @input=${(e: Event) => (this.name = (e.target as HTMLInputElement).value)} />
        </div>
        ${this.listView(out)}
        <div class="row">
          <label for="set-add">Add a clip</label>
          <select id="set-add" @change=${(e: Event) => (this.addClipId = (e.target as HTMLSelectElement).value)}>
            ${available.map((c) => html`<option value=${c.id} ?selected=${c.id === addId}>${c.name}</option>`)}
          </select>
          <button type="button" ?disabled=${!addId} @click=${() => {
            this.items = [...this.items, { clipId: addId, gapAfterS: 30, gainDb: null }];
            this.addClipId = '';
          }}>Add to the set</button>
        </div>
        <div class="actions">
          <button type="button" class="primary" ?disabled=${busy || this.items.length === 0} @click=${() => this.planning.run()}>Plan the set</button>
          ${out ? html`<button type="button" @click=${() => window.print()}>Print the set sheet</button>` : nothing}
        </div>
        ${busy && j ? html`<div class="progress" role="status"><label for="set-progress">Planning: ${j.stage || j.state}, ${Math.round(j.progress * 100)} %</label><progress id="set-progress" max="1" .value=${j.progress}></progress></div>` : nothing}
        ${this.planning.status === 3 ? html`<p class="bad-word" role="alert">✗ ${(this.planning.error as Error).message}</p>` : nothing}
      </section>
      ${out
        ? html`<section class="panel">
              <p class="set-answer">
                ${out.plan.result.firstFailingItem !== null
                  ? html`<span class="bad-word">✗ Clip ${out.plan.result.firstFailingItem + 1}, “${this.clipName(out.items[out.plan.result.firstFailingItem].clipId)}”, is the first to fail</span>`
                  : out.plan.result.silentItems?.length
                    ? html`<span class="bad-word">✗ The set does not play as planned</span>`
                    : html`<span class="ok-word">✓ The whole set holds</span>`}
              </p>
              ${(out.plan.result.silentItems ?? []).map(
                (x) => html`<p class="silent-note">Clip ${x.index + 1}, “${this.clipName(out.items[x.index].clipId)}”: ${x.note}.</p>`,
              )}
              <set-temperature-chart .timeS=${out.plan.temperatures.timeS} .devices=${out.plan.temperatures.devices} .gaps=${out.plan.temperatures.gaps}></set-temperature-chart>
            </section>
            ${this.sheet(out)}`
        : nothing}
    </div>`;
  }
}

customElements.define('set-screen', SetScreen);

declare global {
  interface HTMLElementTagNameMap {
    'set-screen': SetScreen;
  }
}
