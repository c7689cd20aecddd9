/**
 * A timer owned by an element: `schedule(fn)` runs `fn` once after `delayMs` of quiet (a later
 * call replaces an earlier one); the pending call is dropped when the host leaves the page.
 */
import type { ReactiveController, ReactiveControllerHost } from 'lit';

export class DebounceController implements ReactiveController {
  private timer: ReturnType<typeof setTimeout> | null = null;

  constructor(
    host: ReactiveControllerHost,
    private readonly delayMs: number,
  ) {
    host.addController(this);
  }

  schedule(fn: () => void): void {
    this.cancel();
    this.timer = setTimeout(() => {
      this.timer = null;
      fn();
    }, this.delayMs);
  }

  cancel(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
  }

  hostConnected(): void {}

  hostDisconnected(): void {
    this.cancel();
  }
}
