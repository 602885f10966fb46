/**
 * Keeps a component's `width` property in step with its rendered width, so
 * figures are drawn to fit. Redraws only on real changes: a scrollbar
 * appearing (under 24 px) is not one.
 */
import type { ReactiveController, ReactiveControllerHost } from 'lit';

export const WIDTH_CHANGE_PX = 24;

type Host = ReactiveControllerHost & HTMLElement & { width: number };

export class WidthTracker implements ReactiveController {
  private observer: ResizeObserver | null = null;

  constructor(private readonly host: Host) {
    host.addController(this);
  }

  hostConnected(): void {
    this.observer = new ResizeObserver((entries) => {
      const w = Math.round(entries[0]?.contentRect.width ?? 0);
      if (w > 0 && Math.abs(w - this.host.width) > WIDTH_CHANGE_PX) this.host.width = w;
    });
    this.observer.observe(this.host);
  }

  hostDisconnected(): void {
    this.observer?.disconnect();
    this.observer = null;
  }
}
