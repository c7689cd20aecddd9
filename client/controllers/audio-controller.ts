/**
 * Plays one of several versions of the same clip (original, coil-ready render, arc-sound
 * preview) and switches between them at the same position: the new version starts where the old
 * one was, playing if it was playing. One audio element per version, created on first use and
 * released when the host leaves the page.
 */
import type { ReactiveController, ReactiveControllerHost } from 'lit';

export class AudioController implements ReactiveController {
  /** Key of the version heard now (null: none chosen). */
  current: string | null = null;
  playing = false;
  positionS = 0;
  durationS = 0;
  private readonly players = new Map<string, HTMLAudioElement>();
  private readonly urls = new Map<string, string>();

  constructor(private readonly host: ReactiveControllerHost) {
    host.addController(this);
  }

  hostConnected(): void {}

  hostDisconnected(): void {
    for (const a of this.players.values()) {
      a.pause();
      a.removeAttribute('src');
      a.load();
    }
    this.players.clear();
    this.playing = false;
  }

  /** Declares a version and where its audio is; a changed URL replaces the old player. */
  setSource(key: string, url: string | null): void {
    if (url === null) {
      this.urls.delete(key);
      return;
    }
    if (this.urls.get(key) === url) return;
    this.urls.set(key, url);
    const old = this.players.get(key);
    if (old) {
      old.pause();
      this.players.delete(key);
    }
  }

  has(key: string): boolean {
    return this.urls.has(key);
  }

  private player(key: string): HTMLAudioElement {
    let a = this.players.get(key);
    if (!a) {
      a = new Audio();
      a.preload = 'auto';
      a.src = this.urls.get(key) ?? '';
      a.addEventListener('timeupdate', () => {
        if (this.current === key) {
          this.positionS = a!.currentTime;
          this.host.requestUpdate();
        }
      });
      a.addEventListener('loadedmetadata', () => {
        if (this.current === key) {
          this.durationS = a!.duration;
          this.host.requestUpdate();
        }
      });
      a.addEventListener('ended', () => {
        if (this.current === key) {
          this.playing = false;
          this.host.requestUpdate();
        }
      });
      this.players.set(key, a);
    }
    return a;
  }

  /** Switches to `key` at the current position, keeping play or pause. */
  async select(key: string): Promise<void> {
    if (!this.urls.has(key) || key === this.current) return;
    const wasPlaying = this.playing;
    const at = this.current ? this.player(this.current).currentTime : this.positionS;
    if (this.current) this.player(this.current).pause();
    this.current = key;
    const a = this.player(key);
    await seek(a, at);
    this.positionS = a.currentTime;
    if (Number.isFinite(a.duration)) this.durationS = a.duration;
    if (wasPlaying) await this.play();
    this.host.requestUpdate();
  }

  async play(): Promise<void> {
    if (!this.current) return;
    const a = this.player(this.current);
    await a.play();
    this.playing = true;
    this.host.requestUpdate();
  }

  pause(): void {
    if (this.current) this.player(this.current).pause();
    this.playing = false;
    this.host.requestUpdate();
  }

  async seek(s: number): Promise<void> {
    this.positionS = s;
    if (this.current) await seek(this.player(this.current), s);
    this.host.requestUpdate();
  }
}

/** Sets the position once the element knows its duration. */
function seek(a: HTMLAudioElement, s: number): Promise<void> {
  return new Promise((resolve) => {
    const go = () => {
      try {
        a.currentTime = Math.min(s, Number.isFinite(a.duration) ? a.duration : s);
      } catch {
        // Not seekable yet: stays at 0.
      }
      resolve();
    };
    if (a.readyState >= 1) go();
    else {
      a.addEventListener('loadedmetadata', go, { once: true });
      a.addEventListener('error', () => resolve(), { once: true });
      a.load();
    }
  });
}
