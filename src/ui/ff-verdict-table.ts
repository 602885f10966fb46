/**
 * <ff-verdict-table>: per rung of the ladder, what actually shifted (depth,
 * degree) next to the node count, the best constant predictor's error, each
 * arm pair's errors (with relative error, a "!" where an arm does not beat the
 * constant, and runs that blew up), the paired difference, the probability of
 * improvement, the raw and the adjusted signed-rank p and the verdict; the
 * caveats underneath, "too few seeds to tell" first. Every sentence comes from
 * src/ui/evidence.ts.
 */
import { LitElement, css, html, nothing } from 'lit';
import type { AdjustmentView, ArmKey, CaveatNote, FailureNote, RankingRow, VerdictRow } from './evidence.ts';
import { blownUpLabel } from './evidence.ts';
import { num, percent, pValue } from './format.ts';
import { controls } from './styles.ts';
import { armLetter } from './palette.ts';

export class FfVerdictTable extends LitElement {
  static override properties = {
    verdicts: { attribute: false },
    rankings: { attribute: false },
    caveats: { attribute: false },
    failures: { attribute: false },
    arms: { attribute: false },
    adjustment: { attribute: false },
    noSkill: { attribute: false },
    metric: {},
  };
  declare verdicts: VerdictRow[];
  /** Shown when there are more than two arms: each rung's arms by mean error. */
  declare rankings: RankingRow[];
  declare caveats: CaveatNote[];
  declare failures: FailureNote[];
  declare arms: ArmKey[];
  /** How p was adjusted: the column heading and the one line that explains it. */
  declare adjustment: AdjustmentView | null;
  /** Sentences for rungs where no arm beats the best constant predictor. */
  declare noSkill: string[];
  declare metric: string;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
        container-type: inline-size;
      }
      .arm {
        white-space: nowrap;
      }
      .arm b {
        border-bottom: 3px solid var(--arm);
        margin-right: 0.2em;
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
      .verdict[data-kind='no-difference'],
      .verdict[data-kind='not-tested'] {
        color: var(--muted);
      }
      .verdict[data-kind='not-tested'] {
        font-weight: 400;
        font-style: italic;
      }
      .verdict[data-kind='not-fitted'],
      .verdict[data-kind='no-skill'] {
        color: var(--danger);
      }
      .verdict .mark {
        display: inline-block;
        margin-right: 0.3em;
        font-style: normal;
      }
      .sub {
        display: block;
        color: var(--muted);
        font-size: 0.86em;
      }
      .bang {
        display: inline-block;
        margin-left: 0.15em;
        padding: 0 0.3em;
        border-radius: 2px;
        background: var(--danger-soft);
        color: var(--danger);
        font-weight: 800;
        cursor: help;
      }
      .blew {
        display: block;
        font-family: var(--sans);
        color: var(--danger);
        font-size: 0.86em;
        font-weight: 600;
        white-space: normal;
      }
      .blew-inline {
        color: var(--danger);
      }
      tr[data-tested='no'] td.p-adj {
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
      .notes li.fail,
      .notes li.skill {
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
      /* Narrow: one card per rung, each value under its own heading (no sideways scrolling). */
      @container (max-width: 46em) {
        table.verdicts,
        table.verdicts tbody,
        table.verdicts tr,
        table.verdicts td {
          display: block;
        }
        table.verdicts caption {
          display: block;
        }
        table.verdicts thead {
          position: absolute;
          width: 1px;
          height: 1px;
          overflow: hidden;
          clip-path: inset(50%);
        }
        table.verdicts tr {
          border-top: 2px solid var(--rule);
          padding: 0.4em 0.2em;
        }
        table.verdicts td {
          display: grid;
          grid-template-columns: minmax(6.5em, 38%) minmax(0, 1fr);
          gap: 0 0.6em;
          text-align: left;
          white-space: normal;
          border-bottom: none;
          padding: 0.15em 0.7em;
          min-width: 0;
        }
        table.verdicts td::before {
          content: attr(data-label);
          color: var(--muted);
          font-size: 0.85em;
          font-weight: 600;
        }
        table.verdicts td.verdict {
          min-width: 0;
        }
        .ranking td,
        .arm {
          white-space: normal;
          overflow-wrap: anywhere;
        }
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
    this.adjustment = null;
    this.noSkill = [];
    this.metric = 'mae';
  }

  /** An arm as its letter code (underlined in its colour) and its name. */
  private tag(name: string) {
    const key = this.arms.find((a) => a.name === name);
    if (!key) return name;
    return html`<span class="arm" style=${`--arm: ${key.color}`}><b>${armLetter(key.index)}</b>${name}</span>`;
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
              <td class="l num">${r.file ? html`${r.file}, ` : nothing}n = ${r.size}${r.scale !== 1 ? html`, ×${r.scale}` : nothing}</td>
              <td class="l order">
                ${r.order.map(
                  (o, i) => html`${i > 0 ? html`<span class="lt"> &lt; </span>` : nothing}${this.tag(o.arm)}
                    <span class="ci">${o.n ? num(o.mean) : nothing}${o.blownUp ? html` <span class="blew-inline">(${blownUpLabel(o.blownUp)})</span>` : nothing}</span>`,
                )}
              </td>
            </tr>`,
          )}
        </tbody>
      </table>
      <div class="foot">A ranking is not a verdict: neighbours often overlap. Pick two arms and give them more seeds for a paired verdict.</div>
    </div>`;
  }

  /** One arm's cell: its mean error, relative error, a "!" if it does not beat the constant, and runs that blew up. */
  private armCell(v: VerdictRow, side: 'A' | 'B') {
    const mean = side === 'A' ? v.meanA : v.meanB;
    const relative = side === 'A' ? v.relativeA : v.relativeB;
    const blown = side === 'A' ? v.blownUpA : v.blownUpB;
    const blownNote = side === 'A' ? v.blownUpNoteA : v.blownUpNoteB;
    const warning = side === 'A' ? v.constantWarningA : v.constantWarningB;
    if (!v.n && !blown) return '—';
    // A run that blew up says more than "!": its words stand in for the mean, with the constant sentence as the tooltip.
    if (blown) return html`<span class="blew" data-blown-up=${side} title=${warning}>${blownNote}</span>`;
    return html`${num(mean)}${warning
        ? html`<span class="bang" title=${warning} data-constant-warning=${side}>!<span class="visually-hidden"> ${warning}</span></span>`
        : nothing}<span class="sub">rel. ${percent(relative)}</span>`;
  }

  private verdictCell(v: VerdictRow) {
    const mark = v.kind === 'not-fitted' || v.kind === 'no-skill' ? '⚠' : v.kind === 'not-tested' ? '○' : '';
    return html`<td class="l verdict" data-kind=${v.kind} data-label="Verdict">
      ${mark ? html`<span class="mark" aria-hidden="true">${mark}</span>` : nothing}${v.text}
    </td>`;
  }

  override render() {
    if (this.verdicts.length === 0) return null;
    const adjusted = this.adjustment?.header ?? 'p (adjusted)';
    const blownAnywhere = this.verdicts.some((v) => v.blownUpA || v.blownUpB);
    return html`${this.ranking()}<div class="wrap">
        <table class="verdicts">
          <caption>
            Verdicts per rung of the ladder
          </caption>
          <thead>
            <tr>
              <th class="l" scope="col">Test size</th>
              <th class="l" scope="col">What shifted</th>
              <th scope="col">best constant</th>
              <th class="l" scope="col">Pair: 1st vs 2nd arm</th>
              <th scope="col">${this.metric} of 1st</th>
              <th scope="col">${this.metric} of 2nd</th>
              <th scope="col">1st − 2nd [95% interval]</th>
              <th scope="col">P(1st &lt; 2nd)</th>
              <th scope="col">p (raw)</th>
              <th scope="col" data-p-adjusted-header>${adjusted}</th>
              <th class="l" scope="col">Verdict</th>
            </tr>
          </thead>
          <tbody>
            ${this.verdicts.map(
              (v) => html`<tr data-size=${v.size} data-tested=${v.tested ? 'yes' : 'no'} data-kind=${v.kind}>
                <td class="l num" data-label="Test size">${v.file ? html`${v.file}, ` : nothing}n = ${v.size}${v.scale !== 1 ? html`, ×${v.scale}` : nothing}${v.inTrainingRange ? html`<span class="star" title="inside the training size range">*</span>` : nothing}</td>
                <td class="l shift" data-label="What shifted">depth ${num(v.depthMean, 2)} · <wbr />degree ${num(v.meanDegree, 2)}</td>
                <td class="num" data-constant data-label="best constant">${num(v.constant)}${Number.isFinite(v.constantTrain) ? html`<span class="sub">train-fitted ${num(v.constantTrain)}</span>` : nothing}</td>
                <td class="l" data-label="Pair">${this.tag(v.a)} vs ${this.tag(v.b)}</td>
                <td class="num" data-label=${`${this.metric} of 1st`}>${this.armCell(v, 'A')}</td>
                <td class="num" data-label=${`${this.metric} of 2nd`}>${this.armCell(v, 'B')}</td>
                <td class="num" data-label="1st − 2nd [95% interval]">
                  ${!v.n ? '—' : v.blownUpA || v.blownUpB ? html`<span class="ci">no interval: a run blew up</span>` : html`${num(v.diff)} <span class="ci">[${num(v.diffLow)}, ${num(v.diffHigh)}]</span>`}
                </td>
                <td class="num" data-label="P(1st < 2nd)">${v.n ? num(v.probabilityOfImprovement, 2) : '—'}</td>
                <td class="num" data-p-raw data-label="p (raw)">${v.n ? pValue(v.pRaw) : '—'}</td>
                <td class="num p-adj" data-p-adjusted data-label=${adjusted} title=${v.tested ? '' : 'descriptive only: nothing is tested at this rung'}>
                  ${v.n && v.tested ? pValue(v.pAdjusted) : v.n ? 'not tested' : '—'}
                </td>
                ${this.verdictCell(v)}
              </tr>`,
            )}
          </tbody>
        </table>
        <div class="foot">
          * inside the training size range. Depth: rounds the exact algorithm needs on these graphs; degree: mean incoming messages per node. Lower ${this.metric} is
          better; rel.: mean relative error |y − t|/|t|. Best constant: the error of predicting one number for every node, the best such number for that size
          (train-fitted: the number fitted on the training graphs); <strong>!</strong> marks an arm that does not beat it. P(1st &lt; 2nd) is the share of seed pairs
          where the 1st arm had the lower error (ties count half).${blownAnywhere ? ' A run that blew up (diverged, failed or gave a non-finite error) ranks as the worst outcome in the paired test.' : ''}
        </div>
        ${this.adjustment ? html`<div class="foot" data-adjustment-note>${this.adjustment.note}</div>` : nothing}
      </div>
      ${this.caveats.length || this.failures.length || this.noSkill.length
        ? html`<ul class="notes" aria-label="Caveats">
            ${this.noSkill.map((text) => html`<li class="skill" data-no-skill><strong>No skill.</strong> ${text}</li>`)}
            ${this.caveats.map(
              (c) => html`<li class=${c.tooFewSeeds ? 'few' : ''} data-caveat=${c.tooFewSeeds ? 'too-few-seeds' : 'other'}>
                ${c.tooFewSeeds ? html`<strong>Too few seeds to tell.</strong> ` : nothing}${c.text}
                ${c.where.length ? html`<span class="where">— ${c.where.join('; ')}</span>` : nothing}
              </li>`,
            )}
            ${this.failures.map(
              (f) => html`<li class="fail" data-failure>
                <strong>${f.arm}, seed ${f.seed}: ${f.status}.</strong> ${f.reason}${/[.!?]$/.test(f.reason) || !f.reason ? '' : '.'} ${f.treatment}
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
