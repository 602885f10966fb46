/**
 * <ff-trace>: the alignment trace on one small graph. The network's decoded
 * state after k message-passing steps against the exact algorithm after k
 * iterations: nodes shaded by |predicted − exact|, the source ringed, a step
 * slider (keyboard: arrows, Home, End), and the mean error at every step.
 * Exportable like the other figures (SVG / PNG of the graph at the chosen k).
 */
import { armLetter } from './palette.ts';
import { LitElement, css, html, nothing, svg, type PropertyValues } from 'lit';
import type { AlignmentTrace } from '../inspect/trace.ts';
import { traceFigure } from './probe-plots.ts';
import { controls, figureFrame } from './styles.ts';
import { emit } from './events.ts';
import { num } from './format.ts';

export interface ArmTrace {
  arm: string;
  /** The arm's position in the spec: its letter code. */
  index: number;
  color: string;
  trace: AlignmentTrace;
}

export class FfTrace extends LitElement {
  static override properties = {
    traces: { attribute: false },
    number: { type: Number },
    width: { type: Number },
    armIndex: { state: true },
    stepIndex: { state: true },
  };
  declare traces: ArmTrace[];
  declare number: number;
  declare width: number;
  declare armIndex: number;
  declare stepIndex: number;

  private drawn: SVGSVGElement | null = null;

  static override styles = [
    controls,
    figureFrame,
    css`
      .body {
        display: grid;
        grid-template-columns: minmax(0, 1fr);
        gap: 0.4em 1.6em;
        margin-top: 0.5em;
      }
      .body.wide {
        grid-template-columns: minmax(0, 3fr) minmax(0, 2fr);
        align-items: start;
      }
      .body.wide .side {
        order: 2;
      }
      .controls {
        display: grid;
        grid-template-columns: minmax(0, 1fr);
        gap: 0.35em;
        margin: 0.3em 0 0.2em;
      }
      .reading {
        display: flex;
        justify-content: space-between;
        gap: 0.6em;
        flex-wrap: wrap;
        align-items: baseline;
      }
      .strip-label {
        font-size: 0.8em;
        color: var(--muted);
        display: flex;
        justify-content: space-between;
      }
      .controls label {
        font-weight: 600;
        font-size: 0.92em;
        white-space: nowrap;
      }
      .controls input[type='range'] {
        width: 100%;
        accent-color: var(--c);
      }
      .now {
        font-family: var(--mono);
        font-size: 0.9em;
        white-space: nowrap;
      }
      .arms {
        display: flex;
        gap: 0.8em;
        flex-wrap: wrap;
        border: 0;
        margin: 0.5em 0 0;
        padding: 0;
        font-size: 0.92em;
      }
      .arms legend {
        float: left;
        margin-right: 0.4em;
        color: var(--muted);
        padding: 0;
      }
      .arms label {
        display: inline-flex;
        gap: 0.3em;
        align-items: center;
        font-weight: 600;
        border-bottom: 3px solid var(--c);
      }
      .strip {
        display: block;
        width: 100%;
        height: 64px;
        margin-top: 0.3em;
      }
    `,
  ];

  constructor() {
    super();
    this.traces = [];
    this.number = 7;
    this.width = 560;
    this.armIndex = 0;
    this.stepIndex = 0;
  }

  /** Side by side (graph left, slider and reading right) when there is room. */
  private wide(): boolean {
    return this.width >= 900;
  }

  private plotWidth(): number {
    return Math.max(340, Math.round(this.wide() ? (this.width - 34) * 0.6 : this.width - 34));
  }

  private current(): ArmTrace | null {
    return this.traces[Math.min(this.armIndex, this.traces.length - 1)] ?? null;
  }

  protected override willUpdate(changed: PropertyValues<this>): void {
    if (changed.has('traces')) {
      this.armIndex = 0;
      // Start at the last step: the answer the network gives; the slider walks back through the rounds.
      this.stepIndex = Math.max(0, (this.traces[0]?.trace.steps.length ?? 1) - 1);
    }
    const t = this.current();
    this.stepIndex = t ? Math.max(0, Math.min(this.stepIndex, t.trace.steps.length - 1)) : 0;
    this.drawn = t && t.trace.steps.length ? traceFigure(t.trace, this.stepIndex, { width: this.plotWidth(), arm: t.arm, color: t.color }) : null;
  }

  private export(format: 'svg' | 'png') {
    if (this.drawn) emit(this, 'ff-export-figure', { name: `trace-${this.current()?.arm ?? 'arm'}-k${this.current()?.trace.steps[this.stepIndex]?.k ?? 0}`, format, svg: this.drawn });
  }

  private chooseArm(index: number) {
    const steps = this.traces[index]?.trace.steps.length ?? 1;
    this.armIndex = index;
    this.stepIndex = Math.min(this.stepIndex, steps - 1);
  }

  /** Mean |predicted − exact| at every step, the chosen one highlighted (a picture of the numbers announced beside the slider). */
  private strip(t: ArmTrace) {
    const steps = t.trace.steps;
    const maes = steps.map((s) => (s.mae != null && Number.isFinite(s.mae) ? s.mae : null));
    const top = Math.max(1e-9, ...maes.map((m) => m ?? 0));
    const w = 100 / steps.length;
    return svg`<svg class="strip" viewBox="0 0 100 54" preserveAspectRatio="none" aria-hidden="true">
      ${steps.map((s, i) => {
        const m = maes[i];
        const h = m == null ? 0 : Math.max(1.5, (m / top) * 40);
        return svg`<rect x=${i * w + w * 0.15} y=${44 - h} width=${w * 0.7} height=${h} fill=${i === this.stepIndex ? t.color : '#cfc4ad'}></rect>`;
      })}
      <line x1="0" x2="100" y1="44.5" y2="44.5" stroke="#b9ad94" stroke-width="0.4"></line>
    </svg>`;
  }

  override render() {
    const t = this.current();
    if (!t) return nothing;
    const steps = t.trace.steps;
    const step = steps[this.stepIndex];
    if (!step) {
      return html`<p>No alignment trace steps for ${t.arm}.</p>`;
    }
    const last = steps.length - 1;
    return html`<figure aria-labelledby="trace-h" style=${`--c: ${t.color}`}>
      <div class="top">
        <h3 id="trace-h"><span class="no">Fig. ${this.number}</span>Alignment trace on one small graph</h3>
        <div class="tools">
          <button type="button" aria-label=${`Export figure ${this.number} as SVG`} @click=${() => this.export('svg')}>SVG</button>
          <button type="button" aria-label=${`Export figure ${this.number} as PNG`} @click=${() => this.export('png')}>PNG</button>
        </div>
      </div>
      ${this.traces.length > 1
        ? html`<fieldset class="arms">
            <legend>Arm</legend>
            ${this.traces.map(
              (a, i) => html`<label style=${`--c: ${a.color}`}
                ><input type="radio" name="trace-arm" .checked=${i === this.armIndex} @change=${() => this.chooseArm(i)} />${armLetter(a.index)} ${a.arm}</label
              >`,
            )}
          </fieldset>`
        : nothing}
      <div class=${this.wide() ? 'body wide' : 'body'}>
        <div class="side">
          <div class="controls">
            <div class="reading">
              <label for="k">Message-passing step k</label>
              <span class="now" data-trace-step=${step.k} data-trace-mae=${step.mae == null ? '' : String(step.mae)} aria-live="polite"
                >k = ${step.k} of ${steps[last]!.k} · MAE ${step.mae == null ? '—' : num(step.mae)}</span
              >
            </div>
            <input
              id="k"
              type="range"
              min="0"
              max=${last}
              step="1"
              .value=${String(this.stepIndex)}
              aria-valuetext=${`k = ${step.k}, mean error ${step.mae == null ? 'not defined' : num(step.mae)}`}
              @input=${(e: Event) => (this.stepIndex = Number((e.target as HTMLInputElement).value))}
            />
            ${this.strip(t)}
            <div class="strip-label" aria-hidden="true"><span>MAE at k = ${steps[0]!.k}</span><span>k = ${steps[last]!.k}</span></div>
          </div>
          <figcaption>
            <strong>${t.arm}</strong> on a ${t.trace.nodes}-node ${t.trace.family} graph (${t.trace.task}; the exact algorithm needs ${t.trace.depth} rounds). Each node shows
            decode(hᵏ) after k message-passing steps, shaded by its distance from the exact algorithm after k iterations${step.counted ? ` (MAE over ${step.counted} nodes)` : ''};
            hatched: not reached yet. Agreement at every k means the network runs the algorithm step for step; agreement only at the end means it computes the answer some
            other way.
          </figcaption>
        </div>
        <div class="plot">${this.drawn ?? nothing}</div>
      </div>
    </figure>`;
  }
}

customElements.define('ff-trace', FfTrace);

declare global {
  interface HTMLElementTagNameMap {
    'ff-trace': FfTrace;
  }
}
