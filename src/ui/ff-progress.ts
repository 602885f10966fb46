/** <ff-progress>: overall progress, and per run (seeds down, arms across) its loss sparkline, steps and ETA. */
import { LitElement, css, html, nothing } from 'lit';
import type { ProgressView, RunRow } from './progress-view.ts';
import type { SheetState } from './run-controller.ts';
import { controls } from './styles.ts';
import { WidthTracker } from './width-tracker.ts';
import './ff-sparkline.ts';

/** Below this width per arm column (px), runs are listed seed by seed instead of in a seeds × arms grid. */
const MIN_COLUMN_PX = 170;

export class FfProgress extends LitElement {
  static override properties = {
    view: { attribute: false },
    state: {},
    width: { state: true },
  };
  declare view: ProgressView | null;
  declare state: SheetState;
  declare width: number;
  private readonly widthTracker = new WidthTracker(this);

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .plan {
        margin: 0.8em 0 0;
        color: var(--muted);
        max-width: 60em;
      }
      .overall {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 0.4em 1em;
        margin: 0.9em 0 0.7em;
      }
      .meter {
        flex: 1 1 16em;
        height: 0.7em;
        background: var(--paper-deep);
        border-radius: 99px;
        overflow: hidden;
        border: 1px solid var(--rule);
      }
      .meter > div {
        height: 100%;
        background: var(--teal);
      }
      .summary {
        font-size: 0.95em;
      }
      .eta {
        color: var(--muted);
        font-size: 0.92em;
      }
      .grid {
        display: grid;
        gap: 0.35em 0.8em;
        align-items: stretch;
      }
      .key {
        margin: 0.5em 0 0;
        font-size: 0.85em;
        display: flex;
        flex-wrap: wrap;
        gap: 0.2em 1em;
      }
      .colhead {
        font-weight: 700;
        font-size: 0.9em;
        padding-bottom: 0.1em;
        border-bottom: 3px solid var(--arm);
        white-space: nowrap;
        overflow: hidden;
        text-overflow: ellipsis;
      }
      .rowhead {
        font-size: 0.85em;
        color: var(--muted);
        align-self: center;
        white-space: nowrap;
      }
      /* Narrow: one line per seed, its runs wrapping beneath; each cell names its arm. */
      .grid.list {
        grid-template-columns: repeat(auto-fill, minmax(10.5em, 1fr));
      }
      .grid.list .rowhead {
        grid-column: 1 / -1;
        margin-top: 0.3em;
      }
      .who {
        font-weight: 700;
        border-bottom: 3px solid var(--arm);
        margin-right: 0.3em;
      }
      .cell {
        display: grid;
        grid-template-columns: 7.5em 1fr;
        gap: 0 0.6em;
        align-items: center;
        padding: 0.25em 0.45em;
        border-radius: 3px;
        background: var(--card);
        border: 1px solid transparent;
        min-width: 0;
      }
      .grid.list .cell {
        grid-template-columns: 4.5em 1fr;
      }
      .cell ff-sparkline {
        width: 100%;
        height: 1.8em;
        color: var(--arm);
      }
      .cell .status {
        font-size: 0.85em;
        font-family: var(--mono);
        white-space: nowrap;
      }
      .cell .detail {
        font-size: 0.78em;
        color: var(--muted);
        overflow: hidden;
        text-overflow: ellipsis;
        white-space: nowrap;
      }
      .cell[data-phase='running'] {
        border-color: var(--arm);
      }
      .cell[data-phase='failed'],
      .cell[data-phase='diverged'] {
        background: var(--danger-soft);
        border-color: var(--danger);
      }
      .cell[data-phase='failed'] .status,
      .cell[data-phase='diverged'] .status {
        color: var(--danger);
        font-weight: 700;
      }
      .cell[data-phase='failed'] .detail,
      .cell[data-phase='diverged'] .detail {
        white-space: normal;
        color: var(--ink);
      }
      /* Not started: a dashed outline and muted words (not transparency, which would fail text contrast). */
      .cell[data-phase='waiting'],
      .cell[data-phase='cancelled'] {
        background: transparent;
        border: 1px dashed var(--rule);
      }
      .cell[data-phase='waiting'] .status,
      .cell[data-phase='cancelled'] .status {
        color: var(--muted);
      }
      .cell[data-phase='waiting'] ff-sparkline,
      .cell[data-phase='cancelled'] ff-sparkline {
        opacity: 0.5;
      }
      .cell[data-phase='ok'] .status {
        color: var(--ok);
      }
    `,
  ];

  constructor() {
    super();
    this.view = null;
    this.state = 'idle';
    this.width = 0;
  }

  private cell(row: RunRow | undefined, list: boolean) {
    if (!row) return html`<div></div>`;
    return html`<div
      class="cell"
      style=${`--arm: ${row.color}`}
      data-run=${row.index}
      data-phase=${row.phase}
      data-kept=${row.kept ? 'yes' : 'no'}
      title=${`${row.arm}, seed ${row.seed}: ${row.status}${row.detail ? ` — ${row.detail}` : ''}`}
    >
      <ff-sparkline .values=${row.losses} color=${row.color} label=${`training loss of ${row.arm}, seed ${row.seed}`}></ff-sparkline>
      <div>
        <div class="status">${list ? html`<span class="who">${row.letter}</span>` : nothing}${row.status}</div>
        <div class="detail" data-reason>${row.detail}</div>
      </div>
    </div>`;
  }

  override render() {
    const v = this.view;
    if (!v || v.total === 0) return null;
    const untouched = this.state !== 'running' && v.rows.every((r) => r.phase === 'waiting');
    if (untouched) {
      return html`<p class="plan" data-plan>
        ${v.total} runs planned: ${v.arms.length} arms × ${v.seeds.length} seed${v.seeds.length === 1 ? '' : 's'}. Each run trains one arm on one seed's graphs,
        then scores it on every rung of the ladder; the arms of a seed share graphs and initial weights, so they are compared in pairs.
      </p>`;
    }
    const percent = Math.round(v.fraction * 100);
    // The grid needs room for every arm's column; otherwise list seed by seed (no sideways scrolling).
    const list = this.width > 0 && this.width < 90 + v.arms.length * MIN_COLUMN_PX;
    const columns = list ? '' : `auto repeat(${v.arms.length}, minmax(0, 1fr))`;
    return html`<div class="overall">
        <div class="summary" aria-live="polite" data-summary>${v.summary}</div>
        <div class="meter" role="progressbar" aria-label="Overall progress" aria-valuemin="0" aria-valuemax="100" aria-valuenow=${percent}>
          <div style=${`width: ${percent}%`}></div>
        </div>
        <div class="eta">${v.elapsed ? `${v.elapsed} elapsed` : nothing}${v.eta ? ` · ${v.eta}` : nothing}</div>
      </div>
      <div
        class=${list ? 'grid list' : 'grid'}
        style=${columns ? `grid-template-columns: ${columns}` : nothing}
        role="group"
        aria-label=${list ? 'Runs, seed by seed; each run names its arm by letter' : 'Runs: seeds down, arms across'}
      >
        ${list ? nothing : html`<div></div>`}
        ${list ? nothing : v.arms.map((a) => html`<div class="colhead" style=${`--arm: ${a.color}`}>${a.letter} · ${a.name}</div>`)}
        ${v.seeds.map(
          (seed) => html`<div class="rowhead">seed ${seed}</div>
            ${v.arms.map((a) => this.cell(v.rows.find((r) => r.seed === seed && r.arm === a.name), list))}`,
        )}
      </div>
      ${list ? html`<p class="key" data-key>${v.arms.map((a) => html`<span style=${`--arm: ${a.color}`}><span class="who">${a.letter}</span>${a.name}</span> `)}</p>` : nothing}`;
  }
}

customElements.define('ff-progress', FfProgress);

declare global {
  interface HTMLElementTagNameMap {
    'ff-progress': FfProgress;
  }
}
