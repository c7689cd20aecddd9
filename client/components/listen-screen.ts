import { LitElement, html, nothing } from 'lit';
import { Task } from '@lit/task';
import { clipAudioUrl, getRender, renderAudioUrl, startRender, type Clip, type Plan, type Render, type RenderSummary } from '../api.ts';
import { AudioController } from '../controllers/audio-controller.ts';
import { JobController } from '../controllers/job-controller.ts';
import { formatClock, formatDb, formatSi } from '../../shared/display/format.ts';

type Kind = 'render' | 'preview';
const VERSIONS: { key: 'original' | Kind; words: string }[] = [
  { key: 'original', words: 'Original' },
  { key: 'render', words: 'Coil-ready' },
  { key: 'preview', words: 'Arc sound' },
];

/**
 * <listen-screen>: make the coil-ready clip (the modulation source at the chosen gain through the
 * limiter, checked again in closed loop) and the arc-sound preview, play them beside the
 * original and switch between the three at the same position, and download the renders with their
 * closed-loop verdict beside them. The cautions are shown and confirmed before the first render.
 *
 * Properties: `plan`, `clip`, `gainDb` (the chosen gain, null: advised), `cautionsRead`.
 * Events: `cautions-needed` when a render waits for the cautions to be confirmed.
 */
export class ListenScreen extends LitElement {
  static override properties = {
    plan: { attribute: false },
    clip: { attribute: false },
    gainDb: { attribute: false },
    cautionsRead: { type: Boolean },
    waiting: { state: true },
    emphasis: { state: true },
  };
  declare plan: Plan | null;
  declare clip: Clip | null;
  declare gainDb: number | null;
  declare cautionsRead: boolean;
  declare waiting: Kind | null;
  /** Apply the plan's advised pre-emphasis to the coil-ready clip. */
  declare emphasis: boolean;

  private readonly audio = new AudioController(this);
  private readonly jobs = { render: new JobController(this), preview: new JobController(this) };
  private readonly tasks = {
    render: this.makeTask('render'),
    preview: this.makeTask('preview'),
  };
  private planId: string | null = null;

  constructor() {
    super();
    this.plan = null;
    this.clip = null;
    this.gainDb = null;
    this.cautionsRead = false;
    this.waiting = null;
    this.emphasis = true;
  }

  private makeTask(kind: Kind) {
    return new Task(this, {
      autoRun: false,
      task: async ([planId, gainDb, preEmphasisDb]: [string, number | null, number | undefined]): Promise<Render> => {
        const { render, job } = await startRender(planId, preEmphasisDb === undefined ? { kind, gainDb } : { kind, gainDb, preEmphasisDb });
        const done = await this.jobs[kind].watch(job);
        const r = await getRender(done.resultId ?? render.id);
        this.audio.setSource(kind, renderAudioUrl(r.id));
        return r;
      },
    });
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  protected override willUpdate(changed: Map<string, unknown>): void {
    if (changed.has('clip')) this.audio.setSource('original', this.clip ? clipAudioUrl(this.clip.id) : null);
    if (changed.has('plan') && (this.plan?.id ?? null) !== this.planId) this.planId = this.plan?.id ?? null;
  }

  protected override updated(): void {
    if (this.waiting && this.cautionsRead) {
      const k = this.waiting;
      this.waiting = null;
      this.start(k);
    }
  }

  private start(kind: Kind): void {
    if (!this.plan) return;
    if (!this.cautionsRead) {
      this.waiting = kind;
      this.dispatchEvent(new CustomEvent('cautions-needed', { bubbles: true, composed: true }));
      return;
    }
    const p = this.plan.document.preEmphasis;
    const shelf = kind === 'render' && this.emphasis && p?.advised ? p.shelfGainDb : undefined;
    void this.tasks[kind].run([this.plan.id, this.gainDb, shelf]);
  }

  private renderBlock(kind: Kind) {
    const t = this.tasks[kind];
    const j = this.jobs[kind].job;
    const r = t.value;
    const busy = t.status === 1;
    const title = kind === 'render' ? 'Coil-ready clip' : 'Arc-sound preview';
    const what =
      kind === 'render'
        ? 'The modulation source at the chosen gain, through a limiter that keeps the ceiling, checked again in closed loop: the file to play into the driver.'
        : 'What the arcs will sound like: the coil’s envelope response applied, never louder than the original.';
    const summary = r?.summary as RenderSummary | null | undefined;
    return html`<section class="panel render-block" aria-labelledby=${`${kind}-title`}>
      <h3 id=${`${kind}-title`}>${title}</h3>
      <p class="muted">${what}</p>
      ${kind === 'render' && this.plan?.document.preEmphasis?.advised
        ? html`<p><label><input type="checkbox" .checked=${this.emphasis} @change=${(e: Event) => (this.emphasis = (e.target as HTMLInputElement).checked)} />
            Apply the advised pre-emphasis: +${this.plan.document.preEmphasis.shelfGainDb.toFixed(1)} dB above ${formatSi(this.plan.document.preEmphasis.cornerHz, 'Hz')}</label></p>`
        : nothing}
      <button type="button" class="primary" ?disabled=${!this.plan || busy} @click=${() => this.start(kind)}>
        ${r ? 'Make it again' : `Make the ${kind === 'render' ? 'coil-ready clip' : 'arc-sound preview'}`}
        at ${this.gainDb === null ? 'the advised gain' : formatDb(this.gainDb, 'dB', true)}
      </button>
      ${busy && j ? html`<div class="progress" role="status"><label for=${`${kind}-progress`}>${j.stage || j.state}: ${Math.round(j.progress * 100)} %</label><progress id=${`${kind}-progress`} max="1" .value=${j.progress}></progress></div>` : nothing}
      ${t.status === 3 ? html`<p class="bad-word" role="alert">✗ ${(t.error as Error).message}</p>` : nothing}
      ${r
        ? html`<p class="download">
            <a class="button" href=${renderAudioUrl(r.id)} download data-download=${kind}>Download the ${kind === 'render' ? 'coil-ready' : 'arc-sound'} WAV</a>
            ${kind === 'render'
              ? r.safe === false
                ? html`<span class="bad-word" data-safe="false">✗ Closed-loop check: a promised limit is broken${summary?.closedLoop?.failures?.length ? ` (${summary.closedLoop.failures.join('; ')})` : ''}.</span>`
                : r.safe === true
                  ? html`<span class="ok-word" data-safe="true">✓ Closed-loop check: analysed and planned again, every promised limit holds.</span>`
                  : html`<span class="muted">Closed-loop check not reported.</span>`
              : html`<span class="muted">A preview to listen to; not for the driver.</span>`}
          </p>
          ${summary?.closedLoop?.explanation ? html`<p class="small muted">${summary.closedLoop.explanation}</p>` : nothing}`
        : nothing}
    </section>`;
  }

  override render() {
    if (!this.plan || !this.clip) {
      return html`<section class="empty"><h2>Listen</h2><p>Choose a clip and let its verdict finish; then make and hear the coil-ready clip and the arc-sound preview here.</p></section>`;
    }
    const a = this.audio;
    return html`<div class="listen">
      <section class="panel player" aria-labelledby="player-title">
        <h2 id="player-title">Listen to “${this.clip.name}”</h2>
        <div class="versions" role="radiogroup" aria-label="Version to hear">
          ${VERSIONS.map(
            (v) => html`<button type="button" role="radio" aria-checked=${a.current === v.key ? 'true' : 'false'} ?disabled=${!a.has(v.key)}
              data-version=${v.key} @click=${() => void a.select(v.key)}>${a.current === v.key ? '● ' : '○ '}${v.words}</button>`,
          )}
        </div>
        <div class="transport">
          <button type="button" ?disabled=${!a.current} data-play @click=${() => (a.playing ? a.pause() : void a.play())}>${a.playing ? '❚❚ Pause' : '▶ Play'}</button>
          <label for="listen-pos">Position</label>
          <input id="listen-pos" type="range" min="0" max=${a.durationS || this.clip.durationS} step="0.1" .value=${String(a.positionS)}
            aria-valuetext=${formatClock(a.positionS)} @change=${(e: Event) => void a.seek(Number((e.target as HTMLInputElement).value))} />
          <output for="listen-pos" data-position=${a.positionS.toFixed(2)}>${formatClock(a.positionS)} / ${formatClock(a.durationS || this.clip.durationS)}</output>
        </div>
        <p class="small muted">Switching keeps the position, so the same bar can be heard three ways. Start quietly: the coil-ready clip is louder than most music.</p>
      </section>
      ${this.renderBlock('render')} ${this.renderBlock('preview')}
    </div>`;
  }
}

customElements.define('listen-screen', ListenScreen);

declare global {
  interface HTMLElementTagNameMap {
    'listen-screen': ListenScreen;
  }
}
