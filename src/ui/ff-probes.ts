/**
 * <ff-probes>: "Probe the networks": look into the trained networks. Pressing the button trains
 * each arm on the first seed in a Web Worker (the same engine as every run),
 * then shows what the probes find: the learned function against exact truth
 * (scale sweep, length sweep, message-function probe) with the training range
 * shaded, the algebraic audit, and the alignment trace on one small graph.
 *
 * The experiment comes from the `spec` property; when the host does not set
 * it, from the enclosing <ff-sheet>'s current draft (read at the press, only
 * when it validates).
 */
import { LitElement, css, html, nothing } from 'lit';
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { ArmProbes, ProbeDocument } from '../inspect/probe-document.ts';
import type { Probe, ProbeKind } from '../inspect/probe.ts';
import { ProbeController } from './probe-controller.ts';
import { probeFigure, type ArmProbe } from './probe-plots.ts';
import { armColor } from './palette.ts';
import { controls } from './styles.ts';
import { armTag, armTagStyles } from './arm-tag.ts';
import { duration } from './format.ts';
import type { AuditArm } from './ff-audit-table.ts';
import type { ArmTrace } from './ff-trace.ts';
import './ff-figure.ts';
import './ff-audit-table.ts';
import './ff-trace.ts';
import { WidthTracker } from './width-tracker.ts';

const KINDS: ProbeKind[] = ['scale', 'length', 'message'];

const CAPTIONS: Record<ProbeKind, string> = {
  scale: 'Every value-carrying input multiplied by λ on fixed graphs of the training sizes (log axes). Dashed: the exact answer; lines: each arm’s mean prediction. An arm that learned the algorithm follows the truth far from λ = 1.',
  length: 'Path graphs of growing length, unit weights, source at one end: the prediction at the far end against the exact value. The shaded band is the range of hops seen in training.',
  message: 'One leaf fed by one settled sender, the edge weight swept far past training: what the learned message function returns against the exact relation.',
};

/** The validated draft of the enclosing sheet, if any (see the file comment). */
function sheetSpec(from: Element): ExperimentSpec | null {
  let node: Node | null = from;
  while (node) {
    if (node instanceof Element && node.localName === 'ff-sheet') {
      const model = (node as unknown as { controller?: { model?: { validation?: { ok: boolean; spec?: ExperimentSpec } } } }).controller?.model;
      return model?.validation?.ok && model.validation.spec ? model.validation.spec : null;
    }
    node = node.parentNode ?? (node instanceof ShadowRoot ? node.host : null);
  }
  return null;
}

export class FfProbes extends LitElement {
  static override properties = {
    spec: { attribute: false },
    width: { state: true },
  };
  declare spec: ExperimentSpec | null;
  declare width: number;

  private probe = new ProbeController(this);
  private readonly widthTracker = new WidthTracker(this);
  private figures: { doc: ProbeDocument | null; width: number; plots: Array<{ kind: ProbeKind; title: string; note: string; figure: Element | null; missing: string[] }> } = { doc: null, width: 0, plots: [] };
  private notice: string | null = null;

  static override styles = [
    armTagStyles,
    controls,
    css`
      :host {
        display: block;
        margin-top: 0.4em;
      }
      .intro {
        display: flex;
        flex-wrap: wrap;
        gap: 0.6em 1em;
        align-items: center;
      }
      .intro p {
        margin: 0;
        flex: 1 1 26em;
        color: var(--muted);
        font-size: 0.92em;
        line-height: 1.45;
      }
      button.go {
        font-weight: 700;
        padding: 0.45em 1.1em;
        background: var(--teal);
        border-color: var(--teal-deep);
        color: #fff;
      }
      button.go:hover:not(:disabled) {
        background: var(--teal-deep);
      }
      .progress {
        margin-top: 0.8em;
        display: grid;
        grid-template-columns: minmax(10em, 1fr) auto;
        gap: 0.3em 1em;
        align-items: center;
        font-size: 0.92em;
      }
      .bar {
        height: 0.55em;
        background: var(--paper-deep);
        border-radius: 3px;
        overflow: hidden;
        grid-column: 1 / -1;
      }
      .bar i {
        display: block;
        height: 100%;
        background: var(--teal);
        transition: width 0.2s;
      }
      .error {
        margin-top: 0.8em;
        padding: 0.5em 0.8em;
        background: var(--danger-soft);
        color: var(--danger);
        border-radius: 4px;
      }
      .meta {
        margin: 0.8em 0 0.6em;
        font-size: 0.88em;
        color: var(--muted);
      }
      .meta code {
        font-family: var(--mono);
      }
      .grid {
        display: grid;
        gap: 1em;
        grid-template-columns: minmax(0, 1fr);
      }
      .grid.three {
        grid-template-columns: repeat(3, minmax(0, 1fr));
      }
      .grid.two {
        grid-template-columns: repeat(2, minmax(0, 1fr));
      }
      .stack {
        display: grid;
        gap: 1em;
        margin-top: 1em;
      }
      .lower {
        display: grid;
        gap: 1em;
        grid-template-columns: minmax(0, 1fr);
      }
      .lower.side {
        grid-template-columns: minmax(0, 1.25fr) minmax(0, 1fr);
        align-items: start;
      }
      .key {
        display: flex;
        flex-wrap: wrap;
        gap: 0.3em 1.2em;
        font-size: 0.92em;
        align-items: center;
      }
      .key span {
        display: inline-flex;
        gap: 0.4em;
        align-items: center;
        font-weight: 600;
      }
      .key i {
        width: 1.6em;
        height: 0.35em;
        border-radius: 2px;
        background: var(--c);
      }
      .key i.dash {
        height: 0;
        border-top: 2px dashed var(--ink);
        background: none;
      }
      .key i.band {
        width: 1.2em;
        height: 0.9em;
        background: #e3d8bf;
      }
      .key .muted {
        font-weight: 400;
        color: var(--muted);
      }
      details {
        margin: 0.35em 0.2em 0;
        font-size: 0.82em;
        color: var(--muted);
      }
      details summary {
        cursor: pointer;
      }
      details p {
        margin: 0.3em 0 0;
        line-height: 1.45;
      }
      .na {
        color: var(--muted);
        font-size: 0.85em;
        margin: 0.3em 0 0;
      }
    `,
  ];

  constructor() {
    super();
    this.spec = null;
    this.width = 1000;
  }

  private look(): void {
    const spec = this.spec ?? sheetSpec(this);
    if (!spec) {
      this.notice = 'The experiment above has a problem to fix first (see the marked fields); nothing to look inside yet.';
      this.requestUpdate();
      return;
    }
    this.notice = null;
    this.probe.start(spec, 1);
  }

  private columns(): number {
    return this.width >= 1100 ? 3 : this.width >= 720 ? 2 : 1;
  }

  /** Redraw the probe plots only when the document or the width changes. */
  private plots(doc: ProbeDocument) {
    if (this.figures.doc === doc && this.figures.width === this.width) return this.figures.plots;
    const cols = this.columns();
    const w = Math.max(300, Math.floor((Math.min(this.width, 1600) - (cols - 1) * 16) / cols) - 34);
    const plots = KINDS.map((kind) => {
      const per: ArmProbe[] = [];
      const missing: string[] = [];
      let title: string = kind;
      let note = '';
      for (const entry of doc.arms) {
        const p = probeOf(entry, kind);
        if (!p) continue;
        title = p.title;
        note ||= p.unavailable ? '' : p.note;
        if (p.unavailable || !p.points.length) missing.push(`${entry.arm}: ${p.unavailable ?? 'no points'}`);
        else per.push({ arm: entry.arm, index: entry.armIndex, color: armColor(entry.armIndex), probe: p });
      }
      return { kind, title, note, missing, figure: per.length ? probeFigure(per, { width: w }) : null };
    });
    this.figures = { doc, width: this.width, plots };
    return plots;
  }

  override render() {
    const c = this.probe;
    const running = c.state === 'running';
    const p = c.progress;
    return html`<div class="intro">
        <p>
          Train each arm once (the first seed) and look inside the trained networks: the learned function against the exact one far outside training, an algebraic
          audit of each part, and the network's state step by step against the algorithm's. Runs in a background worker; the page stays usable.
        </p>
        ${running
          ? html`<button type="button" data-action="stop-probes" @click=${() => c.stop()}>Stop</button>`
          : html`<button type="button" class="go" data-action="look-inside" aria-label=${`${c.doc ? 'Probe the networks again' : 'Probe the networks'}: train each arm once and show its probes, audit and alignment trace`} @click=${() => this.look()}>
              ${c.doc ? 'Probe the networks again' : 'Probe the networks'}
            </button>`}
      </div>
      ${this.notice ? html`<p class="error" role="alert">${this.notice}</p>` : nothing}
      ${running && p
        ? html`<div class="progress" role="status" data-probe-progress>
            <span>
              ${p.phase === 'starting'
                ? 'Starting the worker…'
                : p.phase === 'training'
                  ? html`Training <strong>${p.arm}</strong> (seed ${p.seed}) — step ${p.step} of ${p.totalSteps}`
                  : html`Probing <strong>${p.arm}</strong>: scale and length sweeps, message probe, audit, trace…`}
            </span>
            <span>${p.index + 1} of ${p.total}</span>
            <div class="bar" role="progressbar" aria-label="Look-inside progress" aria-valuemin="0" aria-valuemax="100" aria-valuenow=${Math.round(p.fraction * 100)}>
              <i style=${`width: ${(p.fraction * 100).toFixed(1)}%`}></i>
            </div>
          </div>`
        : nothing}
      ${c.state === 'error' ? html`<p class="error" role="alert" data-probe-error>Looking inside failed: ${c.error}</p>` : nothing}
      ${c.state === 'stopped' ? html`<p class="meta">Stopped.</p>` : nothing}
      ${c.doc ? this.results(c.doc) : nothing}`;
  }

  private results(doc: ProbeDocument) {
    const plots = this.plots(doc);
    const cols = this.columns();
    const audit: AuditArm[] = doc.arms.flatMap((a) => (a.mean ? [{ arm: a.arm, index: a.armIndex, color: armColor(a.armIndex), seeds: a.mean.seeds, rows: a.mean.audit }] : []));
    const traces: ArmTrace[] = doc.arms.flatMap((a) => {
      const run = a.runs.find((r) => r.trace);
      return run?.trace ? [{ arm: a.arm, index: a.armIndex, color: armColor(a.armIndex), trace: run.trace }] : [];
    });
    const failed = doc.arms.flatMap((a) => a.runs.filter((r) => r.status !== 'ok').map((r) => `${a.arm} (seed ${r.seed}): ${r.status}${r.reason ? ` — ${r.reason}` : ''}`));
    return html`<p class="meta" data-probe-doc=${doc.specHash}>
        Looked inside ${doc.arms.length} arm${doc.arms.length === 1 ? '' : 's'} trained on seed ${doc.seeds.join(', ')} of spec <code>${doc.specHash}</code>${this.probe.ms
          ? ` in ${duration(this.probe.ms / 1000)}`
          : ''}.
        ${failed.length ? html`<br />Not probed: ${failed.join('; ')}.` : nothing}
      </p>
      <div class="key" role="group" aria-label="Probe legend">
        ${doc.arms.map((a) => html`<span>${armTag(a.armIndex, a.arm, ' predicted')}</span>`)}
        <span><i class="dash"></i>exact truth</span>
        <span class="muted"><i class="band"></i>seen in training</span>
      </div>
      <div class="stack">
        <div class=${cols === 3 ? 'grid three' : cols === 2 ? 'grid two' : 'grid'}>
          ${plots.map(
            (pl, i) => html`<div data-probe=${pl.kind}>
              <ff-figure .number=${4 + i} heading=${pl.title} name=${`probe-${pl.kind}`} .figure=${pl.figure} caption=${CAPTIONS[pl.kind]}></ff-figure>
              ${pl.note ? html`<details><summary>Exactly what is plotted</summary><p>${pl.note}</p></details>` : nothing}
              ${pl.missing.length ? html`<p class="na">Not drawn for ${pl.missing.join('; ')}.</p>` : nothing}
            </div>`,
          )}
        </div>
        <div class="lower">
          ${audit.length ? html`<ff-audit-table .arms=${audit}></ff-audit-table>` : nothing}
          ${traces.length
            ? html`<ff-trace .traces=${traces} .number=${7} .width=${Math.min(this.width, 1600)}></ff-trace>`
            : html`<p class="na">No alignment trace: this task has no step-by-step exact algorithm to compare against.</p>`}
        </div>
      </div>`;
  }
}

function probeOf(entry: ArmProbes, kind: ProbeKind): Probe | undefined {
  return entry.mean?.probes.find((p) => p.kind === kind) ?? entry.runs.find((r) => r.probes.length)?.probes.find((p) => p.kind === kind);
}

customElements.define('ff-probes', FfProbes);

declare global {
  interface HTMLElementTagNameMap {
    'ff-probes': FfProbes;
  }
}
