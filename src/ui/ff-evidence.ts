/**
 * <ff-evidence>: the answer so far, the fit gate per arm, the figures
 * (extrapolation curves with the constant baselines, paired differences,
 * per-seed errors), the verdict table with its caveats, and a marked place for
 * probes. Figures are drawn by src/ui/plots.ts from the
 * evidence rows; this element only decides their width.
 */
import { LitElement, css, html, nothing, type PropertyValues } from 'lit';
import { AUTO_LOG_DECADES, type EvidenceView } from './evidence.ts';
import { differenceFigure, extrapolationFigure, seedFigure } from './plots.ts';
import { autoLogReason, curvesCaption, DIFFERENCES_CAPTION, FIGURE_HEADINGS, seedsCaption } from './figure-list.ts';
import { num } from './format.ts';
import { controls } from './styles.ts';
import { armTag, armTagStyles } from './arm-tag.ts';
import './ff-figure.ts';
import './ff-verdict-table.ts';
import './ff-fit-gate.ts';
import './ff-probes.ts';
import { WidthTracker } from './width-tracker.ts';

/** Something to show: a finished arm at some size, or a run that blew up (which must never vanish). */
function hasEvidence(view: EvidenceView): boolean {
  return view.curves.length > 0 || view.blownUp.length > 0;
}

export class FfEvidence extends LitElement {
  static override properties = {
    evidence: { attribute: false },
    presenter: { type: Boolean },
    width: { state: true },
    logChoice: { state: true },
  };
  declare evidence: EvidenceView | null;
  declare presenter: boolean;
  declare width: number;
  /** The reader's own choice of scale; null: automatic (log when the errors span more than AUTO_LOG_DECADES). */
  declare logChoice: boolean | null;

  private get logY(): boolean {
    return this.logChoice ?? (this.evidence !== null && this.evidence.errorDecades > AUTO_LOG_DECADES);
  }

  private figures: { curves: Element | null; diffs: Element | null; seeds: Element | null } = { curves: null, diffs: null, seeds: null };
  /** Bumped on every redraw, so a stale deferred figure is dropped. */
  private generation = 0;
  private readonly widthTracker = new WidthTracker(this);

  static override styles = [
    armTagStyles,
    controls,
    css`
      :host {
        display: block;
      }
      .empty {
        padding: 1.4em 1.2em;
        border: 2px dashed var(--rule);
        border-radius: 4px;
        color: var(--muted);
        font-size: 1.02em;
        line-height: 1.5;
      }
      .answer {
        display: grid;
        grid-template-columns: 1fr;
        gap: 0.15em;
        margin: 0 0 1em;
        padding: 0.7em 1.1em 0.8em;
        background: var(--ink);
        color: var(--paper);
        border-radius: 4px;
      }
      .answer .a {
        font-size: 0.72em;
        font-weight: 700;
        letter-spacing: 0.12em;
        text-transform: uppercase;
        color: #e9c46a;
        grid-column: 1 / -1;
      }
      .answer .text {
        font-family: var(--serif);
        font-size: 1.45em;
        font-weight: 600;
      }
      .answer .sub {
        font-size: 0.95em;
        opacity: 0.85;
      }
      .answer .fp {
        font-size: 0.85em;
        opacity: 0.75;
        margin-top: 0.2em;
      }
      .answer code {
        font-family: var(--mono);
        letter-spacing: 0.04em;
      }
      .answer[data-kind='too-few-seeds'] .text,
      .answer[data-kind='not-fitted'] .text,
      .answer[data-kind='no-skill'] .text,
      .answer[data-kind='not-tested'] .text {
        color: #f3d28b;
      }
      .answer .mark {
        margin-right: 0.35em;
      }
      .answer .reason {
        font-size: 1em;
        line-height: 1.45;
      }
      .auto-log {
        color: var(--muted);
        font-style: italic;
      }
      .legend {
        display: flex;
        flex-wrap: wrap;
        gap: 0.4em 1.2em;
        align-items: center;
        margin: 0 0 0.7em;
        font-size: 0.95em;
      }
      .key {
        display: inline-flex;
        align-items: center;
        gap: 0.4em;
        font-weight: 600;
      }
      .swatch {
        width: 1.6em;
        height: 0.35em;
        border-radius: 2px;
        background: var(--c);
      }
      .legend .train {
        display: inline-flex;
        align-items: center;
        gap: 0.4em;
        color: var(--muted);
      }
      .legend .train i {
        width: 1.2em;
        height: 0.9em;
        background: #e3d8bf;
        display: inline-block;
      }
      .legend .ref {
        display: inline-flex;
        align-items: center;
        gap: 0.4em;
        color: var(--muted);
      }
      .legend .ref svg {
        flex: none;
      }
      .legend label {
        margin-left: auto;
        display: inline-flex;
        gap: 0.35em;
        align-items: center;
        font-size: 0.92em;
      }
      .figs {
        display: grid;
        grid-template-columns: minmax(0, 1fr);
        gap: 1em;
      }
      .pair {
        display: grid;
        grid-template-columns: minmax(0, 1fr) minmax(0, 1fr);
        gap: 1em;
      }
      .pair.single {
        grid-template-columns: minmax(0, 1fr);
      }
      .partial {
        color: var(--ochre);
        font-size: 0.92em;
        margin: 0 0 0.6em;
      }
      #probes {
        margin-top: 1.2em;
        padding: 0.8em 1em;
        border: 1px dashed var(--rule);
        border-radius: 4px;
      }
      #probes h3 {
        margin: 0 0 0.2em;
        font-family: var(--serif);
        font-size: 1.05em;
      }
      #probes p {
        margin: 0;
        color: var(--muted);
        font-size: 0.9em;
      }
    `,
  ];

  constructor() {
    super();
    this.evidence = null;
    this.presenter = false;
    this.width = 1000;
    this.logChoice = null;
  }

  protected override willUpdate(changed: PropertyValues<this>): void {
    if (changed.has('evidence') || changed.has('width') || changed.has('logChoice') || changed.has('presenter')) {
      const view = this.evidence;
      if (!view || !hasEvidence(view)) {
        this.generation++;
        this.figures = { curves: null, diffs: null, seeds: null };
        return;
      }
      // The lecture layout draws at a smaller logical width; the SVG is scaled up to the
      // column, so its text grows with the page's.
      const zoom = this.presenter ? 1.35 : 1;
      const side = this.sideBySide();
      const full = Math.round(Math.max(420, Math.min(this.width, 1400) - 34) / zoom);
      const half = side ? Math.round(Math.max(380, Math.floor((this.width - 16) / 2) - 34) / zoom) : full;
      const pairs = new Set(view.diffs.map((d) => d.pair)).size;
      // Side by side, the two smaller figures share a height.
      const height = side && pairs <= 1 ? 320 : undefined;
      // The first figure now; the other two in later tasks, so no single task holds the page for long.
      const generation = ++this.generation;
      this.figures = { ...this.figures, curves: extrapolationFigure(view, { width: full, logY: this.logY }) };
      const later = (build: () => Partial<FfEvidence['figures']>, then?: () => void) =>
        setTimeout(() => {
          if (generation !== this.generation) return;
          this.figures = { ...this.figures, ...build() };
          this.requestUpdate();
          then?.();
        }, 0);
      later(
        () => ({ diffs: view.diffs.length ? differenceFigure(view, { width: half, ...(height ? { height } : {}) }) : null }),
        () => later(() => ({ seeds: seedFigure(view, { width: half, logY: this.logY, ...(height ? { height } : {}) }) })),
      );
    }
  }

  /** Figures 2 and 3 side by side when there is room. */
  private sideBySide(): boolean {
    return this.width >= (this.presenter ? 1250 : 1000);
  }

  override render() {
    const v = this.evidence;
    if (!v || !hasEvidence(v)) {
      return html`<div class="empty" data-empty>
          No evidence yet. Press <strong>Run</strong>: as each run finishes, its errors on the ladder appear here — curves with 95% intervals, the paired
          difference between arms, every seed's error, and a verdict with its caveats.
        </div>
        ${this.probes()}`;
    }
    const h = v.headline;
    const mark = h?.kind === 'not-fitted' || h?.kind === 'no-skill' ? '⚠' : h?.kind === 'not-tested' ? '○' : '';
    const hasBaselines = v.baselines.some((b) => Number.isFinite(b.best));
    const refKey = (dash: string, label: string) =>
      html`<span class="ref"
        ><svg width="30" height="10" viewBox="0 0 30 10" aria-hidden="true"><line x1="1" y1="5" x2="29" y2="5" stroke="currentColor" stroke-width="2" stroke-dasharray=${dash} /></svg
        >${label}</span
      >`;
    return html`${h
        ? html`<div class="answer" data-kind=${h.kind} data-headline data-winner=${h.winner ?? ''}>
            <span class="a">Answer so far</span>
            <span class="text">${mark ? html`<span class="mark" aria-hidden="true">${mark}</span>` : nothing}${h.lead}</span>
            ${h.reason ? html`<span class="reason" data-reason>${h.reason}</span>` : nothing}
            <span class="sub">${h.pair} on ${h.where} (depth ${num(h.depthMean, 2)}); ${h.detail}.</span>
            ${v.complete ? html`<span class="fp">All ${v.runsExpected} runs in · results fingerprint <code>${v.fingerprint}</code></span>` : nothing}
          </div>`
        : nothing}
      ${v.complete ? nothing : html`<p class="partial">Partial evidence: ${v.runsDone} of ${v.runsExpected} runs in. Verdicts use complete seed pairs only.</p>`}
      <ff-fit-gate .gates=${v.gates} note=${v.gateNote}></ff-fit-gate>
      <div class="legend" role="group" aria-label="Legend">
        ${v.arms.map((a) => html`<span class="key">${armTag(a.index, a.name)}</span>`)}
        <span class="train"><i></i>training sizes ${v.trainSizes[0]}–${v.trainSizes[1]} (◇ in-distribution error)</span>
        ${hasBaselines ? html`${refKey('7 4', 'best constant')}${refKey('2 3', 'training constant')}` : nothing}
        <label><input type="checkbox" .checked=${this.logY} @change=${(e: Event) => (this.logChoice = (e.target as HTMLInputElement).checked)} aria-label="Log scale for errors" />log scale</label>
        ${this.logChoice === null && this.logY
          ? html`<span class="auto-log" data-auto-log>on by itself: ${autoLogReason(v)}</span>`
          : nothing}
      </div>
      <div class="figs">
        <ff-figure
          .number=${1}
          heading=${FIGURE_HEADINGS.curves}
          name="curves"
          .figure=${this.figures.curves}
          caption=${curvesCaption(v)}
        ></ff-figure>
        <div class=${this.sideBySide() ? 'pair' : 'pair single'}>
          ${v.diffs.length
            ? html`<ff-figure
                .number=${2}
                heading=${FIGURE_HEADINGS.differences}
                name="differences"
                .figure=${this.figures.diffs}
                caption=${DIFFERENCES_CAPTION}
              ></ff-figure>`
            : nothing}
          <ff-figure
            .number=${v.diffs.length ? 3 : 2}
            heading=${FIGURE_HEADINGS.seeds}
            name="seeds"
            .figure=${this.figures.seeds}
            caption=${seedsCaption(v)}
          ></ff-figure>
        </div>
        <ff-verdict-table
          .verdicts=${v.verdicts}
          .rankings=${v.rankings}
          .caveats=${v.caveats}
          .failures=${v.failures}
          .arms=${v.arms}
          .adjustment=${v.adjustment}
          .noSkill=${v.noSkill}
          metric=${v.metric}
        ></ff-verdict-table>
      </div>
      ${this.probes()}`;
  }

  /** Reserved: probe plots, the audit table and the alignment trace go here (slot "probes"). */
  private probes() {
    return html`<section id="probes" aria-labelledby="probes-h">
      <slot name="probes">
        <h3 id="probes-h">Probes, audit and alignment trace</h3>
        <ff-probes></ff-probes>
      </slot>
    </section>`;
  }
}

customElements.define('ff-evidence', FfEvidence);

declare global {
  interface HTMLElementTagNameMap {
    'ff-evidence': FfEvidence;
  }
}
