/**
 * <ff-run-controls>: the run bar. It sits at the top of the sheet and stays
 * in view while the reader scrolls (sticky), so Run is never far away: how
 * many runs, about how long, Run / Cancel, progress while running, and Run
 * again afterwards. It also offers the other half of the quick-demo / full
 * experiment pair. Workers, engine and kept runs live in <ff-run-options>.
 */
import { LitElement, css, html, nothing } from 'lit';
import type { SheetState } from './run-controller.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';

/** The other preset of the quick-demo / full pair, when one of them is on the sheet. */
export interface PresetSwitch {
  id: string;
  label: string;
}

/** What the bar shows; every count comes from the sheet's run snapshot. */
export interface RunBarView {
  state: SheetState;
  ready: boolean;
  total: number;
  /** Runs still to do (a failed run counts as not done). */
  missing: number;
  /** Finished runs carried over: kept from an earlier visit, or reused after an edit. */
  carried: number;
  arms: number;
  seeds: number;
  problems: number;
  /** "≈ 40 s on 2 workers" before a run; empty when nothing is left to run. */
  estimate: string;
  done: number;
  fraction: number;
  /** "12 s elapsed · ≈ 8 s to go" while running, "done in 35 s" after. */
  timing: string;
  switchTo: PresetSwitch | null;
}

const EMPTY: RunBarView = {
  state: 'idle',
  ready: false,
  total: 0,
  missing: 0,
  carried: 0,
  arms: 0,
  seeds: 0,
  problems: 0,
  estimate: '',
  done: 0,
  fraction: 0,
  timing: '',
  switchTo: null,
};

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

export class FfRunControls extends LitElement {
  static override properties = {
    view: { attribute: false },
  };
  declare view: RunBarView;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
        position: sticky;
        top: 0;
        z-index: 5;
        background: var(--paper);
        border-bottom: 1px solid var(--rule);
        box-shadow: 0 6px 10px -10px rgba(28, 33, 48, 0.5);
      }
      .bar {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 0.4em 0.8em;
        padding: 0.5em 0;
      }
      button.primary {
        padding: 0.35em 1.1em;
      }
      .what {
        flex: 1 1 14em;
        min-width: 0;
        font-size: 0.92em;
      }
      .what .plan {
        font-weight: 600;
      }
      .muted {
        color: var(--muted);
      }
      .meter {
        display: block;
        height: 0.45em;
        margin-top: 0.25em;
        background: var(--paper-deep);
        border: 1px solid var(--rule);
        border-radius: 99px;
        overflow: hidden;
      }
      .meter > span {
        display: block;
        height: 100%;
        background: var(--teal);
      }
      button.link {
        border: none;
        padding: 0;
        min-height: 0;
        background: none;
        text-decoration: underline;
        color: var(--teal-deep);
        font-size: 0.92em;
      }
      .fix {
        color: var(--danger);
      }
      /* A phone: a smaller bar, so it takes little of the screen while it stays in view. */
      @media (max-width: 640px) {
        .bar {
          font-size: 0.9em;
          padding: 0.35em 0;
          gap: 0.3em 0.6em;
        }
        .what .muted.split {
          display: none;
        }
      }
    `,
  ];

  constructor() {
    super();
    this.view = EMPTY;
  }

  /** Focus the Run button (the skip link's target). */
  focusRun(): void {
    this.renderRoot.querySelector<HTMLButtonElement>('button[data-action]')?.focus();
  }

  private label(v: RunBarView): string {
    if (v.state === 'running') return 'Running…';
    if (v.total === 0) return '▶ Run';
    if (v.missing === 0) return '↻ Run again';
    if (v.missing === v.total) return `▶ Run ${plural(v.total, 'run')}`;
    return `▶ Run the ${v.missing} missing run${v.missing === 1 ? '' : 's'}`;
  }

  private summary(v: RunBarView) {
    const plan = html`<span class="plan" data-planned=${v.total}>${plural(v.total, 'run')}</span>
      <span class="muted split">(${plural(v.arms, 'arm')} × ${plural(v.seeds, 'seed')})</span>`;
    if (v.problems > 0) {
      return html`${plan} ·
        <button type="button" class="link fix" data-action="show-problems" @click=${() => emit(this, 'ff-show-problems', null)}>
          fix ${plural(v.problems, 'problem')} first
        </button>`;
    }
    if (v.state === 'running') {
      const percent = Math.round(v.fraction * 100);
      return html`${v.done} of ${plural(v.total, 'run')} done <span class="muted" data-timing>${v.timing}</span>
        <span class="meter" role="progressbar" aria-label="Progress of all runs" aria-valuemin="0" aria-valuemax="100" aria-valuenow=${percent}
          ><span style=${`width: ${percent}%`}></span
        ></span>`;
    }
    if (v.missing === 0 && v.total > 0) {
      return html`${plan} · all done <span class="muted" data-timing>${v.timing}</span>
        ${v.carried > 0 ? html`<span class="muted">· ${v.carried} carried over</span>` : nothing}
        <span class="muted">· Run again runs every one afresh.</span>`;
    }
    return html`${plan}${v.carried > 0 ? html` <span class="muted">· ${v.carried} already done</span>` : nothing}
      ${v.estimate ? html`· <span data-estimate>${v.estimate}</span>` : nothing}`;
  }

  override render() {
    const v = this.view;
    const running = v.state === 'running';
    const again = !running && v.total > 0 && v.missing === 0;
    return html`<div class="bar" role="region" aria-label="Run">
      <button
        type="button"
        class="primary"
        data-action="run"
        data-mode=${again ? 'again' : 'run'}
        ?disabled=${!v.ready || running || v.problems > 0 || v.total === 0}
        @click=${() => emit(this, again ? 'ff-again' : 'ff-run', null)}
      >
        ${this.label(v)}
      </button>
      <button type="button" data-action="cancel" ?disabled=${!running} @click=${() => emit(this, 'ff-cancel', null)}>■ Cancel</button>
      <div class="what" aria-live="polite">${this.summary(v)}</div>
      ${v.switchTo
        ? html`<button type="button" class="link" data-action="switch-preset" ?disabled=${running} @click=${() => emit(this, 'ff-preset', { id: v.switchTo!.id })}>
            ${v.switchTo.label}
          </button>`
        : nothing}
    </div>`;
  }
}

customElements.define('ff-run-controls', FfRunControls);

declare global {
  interface HTMLElementTagNameMap {
    'ff-run-controls': FfRunControls;
  }
}
