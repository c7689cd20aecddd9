import { LitElement, html, nothing } from 'lit';
import { Task } from '@lit/task';
import {
  createPlan,
  getAnalysis,
  getCautions,
  getDisplay,
  getPlan,
  listClips,
  listCoils,
  listDrivers,
  listSets,
  startAnalysis,
  type Cautions,
  type Clip,
  type Coil,
  type Driver,
  type ShowSet,
} from '../api.ts';
import { JobController } from '../controllers/job-controller.ts';
import { formatDb } from '../../shared/display/format.ts';
import { FALLBACK_CAUTIONS } from './caution-panel.ts';
import './caution-panel.ts';
import './rig-screen.ts';
import './clip-screen.ts';
import './verdict-screen.ts';
import './set-screen.ts';
import './listen-screen.ts';

export type Screen = 'rig' | 'clip' | 'verdict' | 'set' | 'listen';
const SCREENS: { key: Screen; words: string }[] = [
  { key: 'verdict', words: 'Verdict' },
  { key: 'clip', words: 'Clip' },
  { key: 'rig', words: 'Rig' },
  { key: 'set', words: 'Set' },
  { key: 'listen', words: 'Listen' },
];
const STORE = 'coilcue.choice';
const CAUTIONS_READ = 'coilcue.cautionsRead';

/** Reads the stored choice of clip, coil and driver (absent or unreadable: none). */
function storedChoice(): { clipId?: string; coilId?: string; driverId?: string } {
  try {
    return JSON.parse(localStorage.getItem(STORE) ?? '{}') as Record<string, string>;
  } catch {
    return {};
  }
}

/**
 * <coilcue-app>: the page. Holds what the person has chosen (clip, coil, driver) and the work
 * that follows from it: the lists of stored things, the clip's analysis (followed by server-sent
 * events) and its plan; hands them to the five screens (verdict, clip, rig, set, listen) and
 * keeps the cautions one click away on every screen.
 *
 * Properties: none (the page's root).
 * Events: none.
 */
export class CoilcueApp extends LitElement {
  static override properties = {
    screen: { state: true },
    clipId: { state: true },
    coilId: { state: true },
    driverId: { state: true },
    gainDb: { state: true },
    cautionsOpen: { state: true },
    cautionsAsk: { state: true },
    cautionsRead: { state: true },
    reload: { state: true },
  };

  declare screen: Screen;
  declare clipId: string | null;
  declare coilId: string | null;
  declare driverId: string | null;
  declare gainDb: number | null;
  declare cautionsOpen: boolean;
  declare cautionsAsk: boolean;
  declare cautionsRead: boolean;
  declare reload: number;

  /** Ids just made here (an upload, a save) that the lists may not hold until they reload. */
  private readonly fresh = new Set<string>();
  private readonly analysisJob = new JobController(this);
  private readonly planJob = new JobController(this);
  private readonly onHash = (): void => this.fromHash();

  private readonly lists = new Task(this, {
    task: async ([, ], { signal }) => {
      const [coils, drivers, clips, sets] = await Promise.all([listCoils(signal), listDrivers(signal), listClips(signal), listSets(signal)]);
      return { coils: coils.items, drivers: drivers.items, clips: clips.items, sets: sets.items };
    },
    args: () => [this.reload, 0] as [number, number],
  });

  private readonly cautions = new Task(this, {
    task: async (_args: [], { signal }): Promise<Cautions> => {
      try {
        return await getCautions(signal);
      } catch {
        return FALLBACK_CAUTIONS;
      }
    },
    args: () => [] as [],
  });

  private readonly analysis = new Task(this, {
    task: async ([clipId]: [string | null], { signal }) => {
      if (!clipId) return null;
      const { analysis, job } = await startAnalysis(clipId, {}, signal);
      if (analysis.summary && analysis.state === 'done') return analysis;
      const done = await this.analysisJob.watch(job);
      return getAnalysis(done.resultId ?? analysis.id, signal);
    },
    args: () => [this.clipId] as [string | null],
  });

  /** The clip's chart data, fetched beside the plan (neither waits for the other). */
  private readonly display = new Task(this, {
    task: async ([analysisId]: [string | null], { signal }) => (analysisId ? getDisplay(analysisId, { columns: 1000 }, signal) : null),
    args: () => [this.analysis.value?.id ?? null] as [string | null],
  });

  private readonly plan = new Task(this, {
    task: async ([clipId, coilKey, driverKey, analysed]: [string | null, string, string, string | null], { signal }) => {
      if (!clipId || !coilKey || !driverKey || !analysed) return null;
      const made = await createPlan({ clipId, coilId: coilKey.split('@')[0], driverId: driverKey.split('@')[0] }, signal);
      if ('document' in made) return made;
      const done = await this.planJob.watch(made.job);
      if (!done.resultId) throw new Error('the plan finished without a result; try again');
      return getPlan(done.resultId, signal);
    },
    args: () => {
      const l = this.lists.value;
      const coil = l?.coils.find((c) => c.id === this.coilId);
      const driver = l?.drivers.find((d) => d.id === this.driverId);
      return [
        this.clipId,
        coil ? `${coil.id}@${coil.updatedAt}` : '',
        driver ? `${driver.id}@${driver.updatedAt}` : '',
        this.analysis.value?.id ?? null,
      ] as [string | null, string, string, string | null];
    },
  });

  constructor() {
    super();
    this.screen = 'verdict';
    const c = storedChoice();
    this.clipId = c.clipId ?? null;
    this.coilId = c.coilId ?? null;
    this.driverId = c.driverId ?? null;
    this.gainDb = null;
    this.cautionsOpen = false;
    this.cautionsAsk = false;
    this.reload = 0;
    let read = false;
    try {
      read = localStorage.getItem(CAUTIONS_READ) === 'yes';
    } catch {
      // storage refused: ask again next time
    }
    this.cautionsRead = read;
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  override connectedCallback(): void {
    super.connectedCallback();
    window.addEventListener('hashchange', this.onHash);
    this.fromHash();
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    window.removeEventListener('hashchange', this.onHash);
  }

  private fromHash(): void {
    const h = location.hash.replace(/^#/, '') as Screen;
    if (SCREENS.some((s) => s.key === h)) this.screen = h;
  }

  private go(s: Screen): void {
    this.screen = s;
    history.replaceState(null, '', `#${s}`);
  }

  protected override willUpdate(): void {
    // Fill the choice from the lists once they arrive: the first of each, unless one is stored.
    const l = this.lists.value;
    if (!l) return;
    for (const id of this.fresh) if ([...l.coils, ...l.drivers, ...l.clips].some((x) => x.id === id)) this.fresh.delete(id);
    const known = (id: string | null, xs: { id: string }[]) => id !== null && (this.fresh.has(id) || xs.some((x) => x.id === id));
    if (!known(this.coilId, l.coils)) this.coilId = l.coils[0]?.id ?? null;
    if (!known(this.driverId, l.drivers)) this.driverId = l.drivers[0]?.id ?? null;
    if (this.clipId !== null && !known(this.clipId, l.clips)) this.clipId = null;
    if (this.clipId === null) this.clipId = l.clips[0]?.id ?? null;
    try {
      localStorage.setItem(STORE, JSON.stringify({ clipId: this.clipId, coilId: this.coilId, driverId: this.driverId }));
    } catch {
      // storage refused: the choice lasts for this visit
    }
  }

  private planWords(): string | null {
    if (this.analysis.status === 1) {
      const j = this.analysisJob.job;
      return j ? `Analysing the clip: ${j.stage || j.state}, ${Math.round(j.progress * 100)} %…` : 'Analysing the clip…';
    }
    if (this.analysis.status === 3) return `✗ The analysis failed: ${(this.analysis.error as Error).message}`;
    if (this.plan.status === 1) return 'Working out the advised gain…';
    if (this.plan.status === 3) return `✗ No plan: ${(this.plan.error as Error).message}`;
    return null;
  }

  override render() {
    const l = this.lists.value;
    const coils: Coil[] = l?.coils ?? [];
    const drivers: Driver[] = l?.drivers ?? [];
    const clips: Clip[] = l?.clips ?? [];
    const sets: ShowSet[] = l?.sets ?? [];
    const clip = clips.find((c) => c.id === this.clipId) ?? null;
    const coil = coils.find((c) => c.id === this.coilId) ?? null;
    const driver = drivers.find((d) => d.id === this.driverId) ?? null;
    const plan = this.plan.value ?? null;
    const analysis = this.analysis.value ?? null;
    const display = this.display.value ?? null;
    const cautions = this.cautions.value ?? null;
    return html`
      <a class="skip" href="#main">Skip to the screen</a>
      <header class="top">
        <div class="brand">
          <h1>coilcue</h1>
          <p class="context" aria-live="polite">
            ${clip ? html`<span>clip <strong>${clip.name}</strong></span>` : html`<span>no clip chosen</span>`}
            <span>coil <strong>${coil?.name ?? '—'}</strong></span>
            <span>driver <strong>${driver?.name ?? '—'}</strong></span>
            ${plan?.document.advisedGainDb != null ? html`<span>advised <strong>${formatDb(plan.document.advisedGainDb, 'dB', true)}</strong></span>` : nothing}
          </p>
        </div>
        <nav aria-label="Screens">
          <ul>
            ${SCREENS.map(
              (s) => html`<li><a href=${`#${s.key}`} aria-current=${this.screen === s.key ? 'page' : 'false'} @click=${(e: Event) => {
                e.preventDefault();
                this.go(s.key);
              }}>${s.words}</a></li>`,
            )}
          </ul>
        </nav>
        <button type="button" class="caution-button" @click=${() => {
          this.cautionsAsk = false;
          this.cautionsOpen = true;
        }}>⚠ Cautions</button>
      </header>
      ${this.lists.status === 3
        ? html`<p class="bad-word banner" role="alert">✗ ${(this.lists.error as Error).message}</p>`
        : nothing}
      <main id="main" tabindex="-1">
        <div id="screen-verdict" class="screen" ?hidden=${this.screen !== 'verdict'}>
          <verdict-screen
            .plan=${plan}
            .analysis=${analysis}
            .display=${display}
            .busy=${this.planWords()}
            .clipName=${clip?.name ?? null}
            @gain-change=${(e: CustomEvent<{ gainDb: number | null }>) => (this.gainDb = e.detail.gainDb)}
          ></verdict-screen>
        </div>
        <div id="screen-clip" class="screen" ?hidden=${this.screen !== 'clip'}>
          <clip-screen
            .active=${this.screen === 'clip'}
            .clips=${clips}
            .clipId=${this.clipId}
            .job=${this.analysis.status === 1 ? this.analysisJob.job : null}
            .analysis=${analysis}
            .display=${display}
            .cornerHz=${coil?.report.modulationCornerHz ?? null}
            .error=${this.analysis.status === 3 ? (this.analysis.error as Error).message : null}
            @clip-select=${(e: CustomEvent<{ clipId: string }>) => {
              this.clipId = e.detail.clipId || null;
              this.gainDb = null;
            }}
            @clip-uploaded=${(e: CustomEvent<{ clip: Clip }>) => {
              this.fresh.add(e.detail.clip.id);
              this.clipId = e.detail.clip.id;
              this.gainDb = null;
              this.reload++;
            }}
          ></clip-screen>
        </div>
        <div id="screen-rig" class="screen" ?hidden=${this.screen !== 'rig'}>
          <rig-screen
            .active=${this.screen === 'rig'}
            .coils=${coils}
            .drivers=${drivers}
            .coilId=${this.coilId}
            .driverId=${this.driverId}
            @rig-select=${(e: CustomEvent<{ coilId?: string; driverId?: string }>) => {
              if (e.detail.coilId) this.coilId = e.detail.coilId;
              if (e.detail.driverId) this.driverId = e.detail.driverId;
            }}
            @rig-saved=${(e: CustomEvent<{ kind: 'coil' | 'driver'; item: Coil | Driver }>) => {
              this.fresh.add(e.detail.item.id);
              if (e.detail.kind === 'coil') this.coilId = e.detail.item.id;
              else this.driverId = e.detail.item.id;
              this.reload++;
            }}
          ></rig-screen>
        </div>
        <div id="screen-set" class="screen set-screen-host" ?hidden=${this.screen !== 'set'}>
          <set-screen .sets=${sets} .clips=${clips} .coils=${coils} .drivers=${drivers} .coilId=${this.coilId} .driverId=${this.driverId} .cautions=${cautions}></set-screen>
        </div>
        <div id="screen-listen" class="screen" ?hidden=${this.screen !== 'listen'}>
          <listen-screen
            .plan=${plan}
            .clip=${clip}
            .gainDb=${this.gainDb}
            .cautionsRead=${this.cautionsRead}
            @cautions-needed=${() => {
              this.cautionsAsk = true;
              this.cautionsOpen = true;
            }}
          ></listen-screen>
        </div>
      </main>
      <caution-panel
        .cautions=${cautions}
        .open=${this.cautionsOpen}
        .acknowledge=${this.cautionsAsk}
        @cautions-close=${(e: CustomEvent<{ acknowledged: boolean }>) => {
          this.cautionsOpen = false;
          if (e.detail.acknowledged) {
            this.cautionsRead = true;
            try {
              localStorage.setItem(CAUTIONS_READ, 'yes');
            } catch {
              // storage refused: asked again next visit
            }
          }
        }}
      ></caution-panel>
      <footer class="foot"><p>Figures are estimates from published models, not guarantees. Everything runs on this machine.</p></footer>
    `;
  }
}

customElements.define('coilcue-app', CoilcueApp);

declare global {
  interface HTMLElementTagNameMap {
    'coilcue-app': CoilcueApp;
  }
}
