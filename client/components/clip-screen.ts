import { LitElement, html, nothing } from 'lit';
import { Task } from '@lit/task';
import { uploadClip, type Analysis, type Clip, type DisplayData, type Job } from '../api.ts';
import { formatClock, formatDb, formatSi, formatShare } from '../../shared/display/format.ts';
import './spectrum-chart.ts';
import './spectrogram-chart.ts';
import './time-charts.ts';

/**
 * <clip-screen>: choose a stored clip or add one (file picker or drop), follow the upload and
 * the analysis on one progress bar, then read the clip's levels and loudness, its envelope, its
 * spectrum with the coil's modulation corner, and its spectrogram.
 *
 * Properties: `clips`, `clipId`, `job` (the analysis job as last reported), `analysis`,
 *   `display`, `cornerHz`, `error` (words from the owner's failed analysis, or null), `active`
 *   (shown now).
 * Events: `clip-select` { clipId } when the person picks a clip; `clip-uploaded` { clip } after
 *   an upload is stored.
 */
export class ClipScreen extends LitElement {
  static override properties = {
    clips: { attribute: false },
    clipId: { attribute: false },
    job: { attribute: false },
    analysis: { attribute: false },
    display: { attribute: false },
    cornerHz: { attribute: false },
    error: { attribute: false },
    uploadFraction: { state: true },
    dragging: { state: true },
    active: { type: Boolean },
  };

  declare clips: Clip[];
  declare clipId: string | null;
  declare job: Job | null;
  declare analysis: Analysis | null;
  declare display: DisplayData | null;
  declare cornerHz: number | null;
  declare error: string | null;
  declare uploadFraction: number | null;
  declare dragging: boolean;
  /** Whether the screen is shown; the charts are drawn the first time it is. */
  declare active: boolean;
  private shown = false;

  private readonly upload = new Task(this, {
    autoRun: false,
    task: async ([file]: [File], { signal }) => {
      this.uploadFraction = 0;
      try {
        const clip = await uploadClip(file, (f) => (this.uploadFraction = f), signal);
        this.dispatchEvent(new CustomEvent('clip-uploaded', { detail: { clip }, bubbles: true, composed: true }));
        return clip;
      } finally {
        this.uploadFraction = null;
      }
    },
  });

  constructor() {
    super();
    this.clips = [];
    this.clipId = null;
    this.job = null;
    this.analysis = null;
    this.display = null;
    this.cornerHz = null;
    this.error = null;
    this.uploadFraction = null;
    this.dragging = false;
    this.active = true;
  }

  protected override willUpdate(): void {
    if (this.active) this.shown = true;
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  private take(files: FileList | null | undefined): void {
    const f = files?.[0];
    if (f) void this.upload.run([f]);
  }

  private progress() {
    if (this.uploadFraction !== null) {
      return { value: this.uploadFraction, words: `Uploading: ${Math.round(this.uploadFraction * 100)} %` };
    }
    const j = this.job;
    if (j && (j.state === 'queued' || j.state === 'running')) {
      const stage = j.state === 'queued' ? 'waiting for a free worker' : j.stage || 'analysing';
      return { value: j.progress, words: `Analysing: ${stage}, ${Math.round(j.progress * 100)} %` };
    }
    return null;
  }

  override render() {
    const clip = this.clips.find((c) => c.id === this.clipId) ?? null;
    const p = this.progress();
    const s = this.analysis?.summary ?? null;
    const uploadError = this.upload.status === 3 ? (this.upload.error as Error).message : null;
    return html`<div class="clip">
      <section class="panel pick" aria-labelledby="clip-pick-title">
        <h2 id="clip-pick-title">Clip</h2>
        <div class="row">
          <label for="clip-pick">Stored clips</label>
          <select id="clip-pick" @change=${(e: Event) => this.dispatchEvent(new CustomEvent('clip-select', { detail: { clipId: (e.target as HTMLSelectElement).value }, bubbles: true, composed: true }))}>
            ${this.clipId === null ? html`<option value="" selected>(choose a clip)</option>` : nothing}
            ${this.clips.map((c) => html`<option value=${c.id} ?selected=${c.id === this.clipId}>${c.name} (${formatClock(c.durationS)})</option>`)}
          </select>
        </div>
        <div
          class="drop ${this.dragging ? 'dragging' : ''}"
          @dragover=${(e: DragEvent) => {
            e.preventDefault();
            this.dragging = true;
          }}
          @dragleave=${() => (this.dragging = false)}
          @drop=${(e: DragEvent) => {
            e.preventDefault();
            this.dragging = false;
            this.take(e.dataTransfer?.files);
          }}
        >
          <p>Drop a WAV, FLAC, Ogg Vorbis or MP3 file here, or</p>
          <label class="button primary">Choose a file…
            <input id="clip-file" type="file" class="visually-hidden" accept=".wav,.flac,.ogg,.oga,.mp3,audio/*" @change=${(e: Event) => {
              const input = e.target as HTMLInputElement;
              this.take(input.files);
              input.value = '';
            }} />
          </label>
        </div>
        ${p
          ? html`<div class="progress" role="status">
              <label for="clip-progress">${p.words}</label>
              <progress id="clip-progress" max="1" .value=${p.value}></progress>
            </div>`
          : nothing}
        ${uploadError ? html`<p class="bad-word" role="alert">✗ ${uploadError}</p>` : nothing}
        ${this.error ? html`<p class="bad-word" role="alert">✗ ${this.error}</p>` : nothing}
      </section>

      ${clip && s
        ? html`<section class="panel levels" aria-labelledby="levels-title">
            <h2 id="levels-title">Levels and loudness of “${clip.name}”</h2>
            <dl class="figure-list columns">
              <div><dt>length</dt><dd>${formatClock(s.durationS)} (${s.sampleRate} Hz, ${s.channels === 1 ? 'mono' : `${s.channels} channels`})</dd></div>
              <div><dt>integrated loudness</dt><dd>${formatDb(s.loudness.integratedLufs, 'LUFS')}</dd></div>
              <div><dt>loudness range</dt><dd>${formatDb(s.loudness.loudnessRangeLu, 'LU')}</dd></div>
              <div><dt>loudest 3 s (short-term)</dt><dd>${formatDb(s.loudness.maxShortTermLufs, 'LUFS')}</dd></div>
              <div><dt>true peak</dt><dd>${formatDb(s.level.truePeakDbtp, 'dBTP')}</dd></div>
              <div><dt>sample peak</dt><dd>${formatDb(s.level.samplePeakDbfs, 'dBFS')}</dd></div>
              <div><dt>RMS level</dt><dd>${formatDb(s.level.rmsDbfs, 'dBFS')}</dd></div>
              <div><dt>crest factor</dt><dd>${formatDb(s.level.crestDb, 'dB')}</dd></div>
              <div><dt>clipped samples</dt><dd>${s.level.clippedSamples === 0 ? '✓ none' : `⚠ ${s.level.clippedSamples} in ${s.level.clippedRuns} runs`}</dd></div>
              <div><dt>near silence</dt><dd>${formatShare(s.level.nearSilenceFraction)} of the clip</dd></div>
              <div><dt>DC offset</dt><dd>${formatSi(s.level.dcOffset, '', 2)} of full scale</dd></div>
              <div><dt>pitch (median)</dt><dd>${formatSi(s.spectrum.pitchMedianHz, 'Hz')}, voiced ${formatShare(s.spectrum.voicedFraction, 0)}</dd></div>
              <div><dt>spectral centroid</dt><dd>${formatSi(s.spectrum.centroidHz, 'Hz')}</dd></div>
              <div><dt>modulation source</dt><dd>${s.modulationChannel}</dd></div>
            </dl>
          </section>`
        : nothing}
      ${this.display && this.shown
        ? html`<section class="panel" aria-label="Charts of the clip">
            <time-charts .display=${this.display} .durationS=${s?.durationS ?? clip?.durationS ?? 0} label="Envelope of the clip"></time-charts>
            <spectrum-chart .freqHz=${this.display.spectrum.freqHz} .powerDb=${this.display.spectrum.powerDb} .cornerHz=${this.cornerHz}></spectrum-chart>
            <spectrogram-chart .timeS=${this.display.spectrogram.timeS} .freqHz=${this.display.spectrogram.freqHz} .powerDb=${this.display.spectrogram.powerDb}></spectrogram-chart>
          </section>`
        : nothing}
    </div>`;
  }
}

customElements.define('clip-screen', ClipScreen);

declare global {
  interface HTMLElementTagNameMap {
    'clip-screen': ClipScreen;
  }
}
