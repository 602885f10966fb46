/**
 * <ff-verdict-table>: per rung of the ladder, what actually shifted (depth,
 * degree) next to the node count, each arm pair's paired difference, the
 * probability of improvement, the signed-rank p and the verdict; the caveats
 * underneath, "too few seeds to tell" first.
 */
import { LitElement, css, html, nothing } from 'lit';
import type { ArmKey, CaveatNote, FailureNote, RankingRow, VerdictRow } from './evidence.ts';
import { num, pValue } from './format.ts';
import { controls } from './styles.ts';

export class FfVerdictTable extends LitElement {
  static override properties = {
    verdicts: { attribute: false },
    rankings: { attribute: false },
    caveats: { attribute: false },
    failures: { attribute: false },
    arms: { attribute: false },
    metric: {},
  };
  declare verdicts: VerdictRow[];
  /** Shown when there are more than two arms: each rung's arms by mean error. */
  declare rankings: RankingRow[];
  declare caveats: CaveatNote[];
  declare failures: FailureNote[];
  declare arms: ArmKey[];
  declare metric: string;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .wrap {
        overflow-x: auto;
        background: var(--card);
        border: 1px solid var(--rule);
        border-radius: 4px;
      }
      table {
        border-collapse: collapse;
        width: 100%;
        font-size: 0.93em;
      }
      caption {
        text-align: left;
        padding: 0.7em 0.9em 0.2em;
        font-family: var(--serif);
        font-weight: 700;
        font-size: 1.05em;
      }
      th,
      td {
        padding: 0.4em 0.7em;
        text-align: right;
        border-bottom: 1px solid var(--rule);
        white-space: nowrap;
      }
      th {
        font-size: 0.82em;
        font-weight: 600;
        color: var(--muted);
        vertical-align: bottom;
      }
      th.l,
      td.l {
        text-align: left;
      }
      td.num {
        font-size: 0.92em;
      }
      .shift {
        color: var(--muted);
        font-size: 0.88em;
        white-space: normal;
        min-width: 7em;
      }
      th {
        white-space: normal;
      }
      .verdict {
        font-weight: 700;
        white-space: normal;
        min-width: 11em;
      }
      .verdict[data-kind='too-few-seeds'] {
        color: var(--ochre);
        font-style: italic;
      }
      .verdict[data-kind='no-difference'] {
        color: var(--muted);
      }
      .ci {
        color: var(--muted);
      }
      .ranking {
        margin-bottom: 1em;
      }
      td.order {
        white-space: normal;
        line-height: 1.6;
      }
      .lt {
        color: var(--muted);
      }
      .star {
        color: var(--ochre);
      }
      .notes {
        margin: 0.8em 0 0;
        padding: 0;
        list-style: none;
        display: grid;
        gap: 0.4em;
      }
      .notes li {
        padding: 0.45em 0.8em;
        border-left: 4px solid var(--rule);
        background: var(--card);
        border-radius: 0 4px 4px 0;
        font-size: 0.93em;
        line-height: 1.45;
      }
      .notes li.few {
        border-left-color: var(--ochre);
        background: var(--ochre-soft);
      }
      .notes li.fail {
        border-left-color: var(--danger);
        background: var(--danger-soft);
      }
      .where {
        color: var(--muted);
        font-size: 0.9em;
      }
      .foot {
        font-size: 0.82em;
        color: var(--muted);
        padding: 0.4em 0.9em 0.6em;
      }
    `,
  ];

  constructor() {
    super();
    this.verdicts = [];
    this.rankings = [];
    this.caveats = [];
    this.failures = [];
    this.arms = [];
    this.metric = 'mae';
  }

  private colorOf(name: string): string {
    return this.arms.find((a) => a.name === name)?.color ?? 'inherit';
  }

  private ranking() {
    if (this.arms.length <= 2 || this.rankings.length === 0) return nothing;
    return html`<div class="wrap ranking">
      <table>
        <caption>
          Ranking by mean ${this.metric}, lowest first
        </caption>
        <thead>
          <tr>
            <th class="l" scope="col">Test size</th>
            <th class="l" scope="col">Arms, best to worst (mean over seeds)</th>
          </tr>
        </thead>
        <tbody>
          ${this.rankings.map(
            (r) => html`<tr>
              <td class="l num">n = ${r.size}${r.scale !== 1 ? html`, ×${r.scale}` : nothing}</td>
              <td class="l order">
                ${r.order.map(
                  (o, i) => html`${i > 0 ? html`<span class="lt"> &lt; </span>` : nothing}<span style=${`color: ${o.color}`}>${o.arm}</span>
                    <span class="ci">${num(o.mean)}</span>`,
                )}
              </td>
            </tr>`,
          )}
        </tbody>
      </table>
      <div class="foot">A ranking is not a verdict: neighbours often overlap. Pick two arms and give them more seeds for a paired verdict.</div>
    </div>`;
  }

  override render() {
    if (this.verdicts.length === 0) return null;
    return html`${this.ranking()}<div class="wrap">
        <table>
          <caption>
            Verdicts per rung of the ladder
          </caption>
          <thead>
            <tr>
              <th class="l" scope="col">Test size</th>
              <th class="l" scope="col">What shifted</th>
              <th class="l" scope="col">Arms A vs B</th>
              <th scope="col">${this.metric} of A</th>
              <th scope="col">${this.metric} of B</th>
              <th scope="col">A − B [95% interval]</th>
              <th scope="col">P(A &lt; B)</th>
              <th scope="col">signed-rank p</th>
              <th class="l" scope="col">Verdict</th>
            </tr>
          </thead>
          <tbody>
            ${this.verdicts.map(
              (v) => html`<tr data-size=${v.size}>
                <td class="l num">n = ${v.size}${v.scale !== 1 ? html`, ×${v.scale}` : nothing}${v.inTrainingRange ? html`<span class="star" title="inside the training size range">*</span>` : nothing}</td>
                <td class="l shift">depth ${num(v.depthMean, 2)} · <wbr />degree ${num(v.meanDegree, 2)}</td>
                <td class="l"><span style=${`color: ${this.colorOf(v.a)}`}>${v.a}</span> vs <span style=${`color: ${this.colorOf(v.b)}`}>${v.b}</span></td>
                <td class="num">${v.n ? num(v.meanA) : '—'}</td>
                <td class="num">${v.n ? num(v.meanB) : '—'}</td>
                <td class="num">${v.n ? html`${num(v.diff)} <span class="ci">[${num(v.diffLow)}, ${num(v.diffHigh)}]</span>` : '—'}</td>
                <td class="num">${v.n ? num(v.probabilityOfImprovement, 2) : '—'}</td>
                <td class="num">${v.n ? pValue(v.p) : '—'}</td>
                <td
                  class="l verdict"
                  data-kind=${v.kind}
                  style=${v.kind === 'a-better' ? `color: ${this.colorOf(v.a)}` : v.kind === 'b-better' ? `color: ${this.colorOf(v.b)}` : ''}
                >
                  ${v.text}
                </td>
              </tr>`,
            )}
          </tbody>
        </table>
        <div class="foot">
          * inside the training size range. Depth: rounds the exact algorithm needs on these graphs; degree: mean incoming messages per node. Lower ${this.metric} is
          better; P(A &lt; B) is the share of seed pairs where A had the lower error (ties count half).
        </div>
      </div>
      ${this.caveats.length || this.failures.length
        ? html`<ul class="notes" aria-label="Caveats">
            ${this.caveats.map(
              (c) => html`<li class=${c.tooFewSeeds ? 'few' : ''} data-caveat=${c.tooFewSeeds ? 'too-few-seeds' : 'other'}>
                ${c.tooFewSeeds ? html`<strong>Too few seeds to tell.</strong> ` : nothing}${c.text}
                ${c.where.length ? html`<span class="where">— ${c.where.join('; ')}</span>` : nothing}
              </li>`,
            )}
            ${this.failures.map(
              (f) => html`<li class="fail" data-failure>
                <strong>${f.arm}, seed ${f.seed}: ${f.status}.</strong> ${f.reason}${/[.!?]$/.test(f.reason) || !f.reason ? '' : '.'} This run is left out of the
                statistics.
              </li>`,
            )}
          </ul>`
        : nothing}`;
  }
}

customElements.define('ff-verdict-table', FfVerdictTable);

declare global {
  interface HTMLElementTagNameMap {
    'ff-verdict-table': FfVerdictTable;
  }
}
