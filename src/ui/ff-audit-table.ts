/**
 * <ff-audit-table>: the algebraic audit of every probed arm — one row per
 * check and arm: what is checked, on which component, the mean and worst
 * residual, what a practitioner expects, and whether it holds (✓ / ✗, or —
 * where the architecture promises nothing and the number is only reported).
 */
import { armLetter } from './palette.ts';
import { LitElement, css, html, nothing } from 'lit';
import type { AuditRow } from '../inspect/audit.ts';
import { controls } from './styles.ts';
import { num } from './format.ts';

export interface AuditArm {
  arm: string;
  /** The arm's position in the spec: its letter code and marks. */
  index: number;
  color: string;
  /** Seeds the rows are a mean over. */
  seeds: number;
  rows: AuditRow[];
}

interface Line {
  row: AuditRow;
  arm: AuditArm;
  first: boolean;
  span: number;
}

export class FfAuditTable extends LitElement {
  static override properties = {
    arms: { attribute: false },
  };
  declare arms: AuditArm[];

  static override styles = [
    controls,
    css`
      :host {
        display: block;
        min-width: 0;
      }
      .frame {
        background: var(--card);
        border: 1px solid var(--rule);
        border-radius: 4px;
        padding: 0.8em 1em 0.7em;
        overflow-x: auto;
      }
      h3 {
        margin: 0 0 0.4em;
        font-family: var(--serif);
        font-size: 1.05em;
      }
      .sum {
        font-family: var(--sans);
        font-weight: 400;
        font-size: 0.85em;
        color: var(--muted);
        margin-left: 0.5em;
      }
      table {
        border-collapse: collapse;
        width: 100%;
        font-size: 0.92em;
      }
      th {
        text-align: left;
        font-size: 0.82em;
        font-weight: 600;
        color: var(--muted);
        padding: 0.3em 0.6em;
        border-bottom: 1px solid var(--rule);
        white-space: nowrap;
      }
      td {
        padding: 0.32em 0.6em;
        border-bottom: 1px solid #ebe3d2;
        vertical-align: top;
      }
      tr.group td {
        border-top: 1px solid var(--rule);
      }
      td.check {
        font-weight: 600;
        max-width: 22em;
      }
      td.num {
        text-align: right;
        font-family: var(--mono);
        font-size: 0.95em;
        white-space: nowrap;
      }
      th.num {
        text-align: right;
      }
      .subject {
        display: block;
        font-size: 0.85em;
        color: var(--muted);
      }
      /* Arm names in ink, underlined in the arm's colour (arm colours reach 3:1, not the 4.5:1 text needs). */
      .arm {
        font-weight: 700;
        border-bottom: 3px solid var(--c);
        white-space: nowrap;
      }
      td.expected {
        color: var(--muted);
        font-size: 0.93em;
      }
      td.pass {
        text-align: center;
        font-size: 1.15em;
        font-weight: 700;
        width: 3.2em;
      }
      td.pass[data-pass='yes'] {
        color: var(--ok);
      }
      td.pass[data-pass='no'] {
        color: var(--danger);
        background: var(--danger-soft);
      }
      td.pass[data-pass='none'] {
        color: var(--muted);
      }
      .foot {
        margin: 0.5em 0 0;
        color: var(--muted);
        font-size: 0.85em;
        line-height: 1.45;
      }
    `,
  ];

  constructor() {
    super();
    this.arms = [];
  }

  /** Rows grouped by check, the arms of one check next to each other. */
  private lines(): Line[] {
    const byCheck = new Map<string, Array<{ row: AuditRow; arm: AuditArm }>>();
    for (const arm of this.arms) for (const row of arm.rows) {
      const key = `${row.component}\u0000${row.check}`;
      if (!byCheck.has(key)) byCheck.set(key, []);
      byCheck.get(key)!.push({ row, arm });
    }
    return [...byCheck.values()].flatMap((group) => group.map((g, i) => ({ ...g, first: i === 0, span: group.length })));
  }

  override render() {
    const lines = this.lines();
    if (!lines.length) return nothing;
    const fails = lines.filter((l) => l.row.pass === false).length;
    const passes = lines.filter((l) => l.row.pass === true).length;
    const seeds = Math.max(...this.arms.map((a) => a.seeds));
    return html`<div class="frame">
      <h3 id="audit-h">
        Algebraic audit
        <span class="sum" data-audit-summary>${passes} hold ✓ · ${fails} fail ✗ · ${lines.length - passes - fails} reported only —</span>
      </h3>
      <table aria-labelledby="audit-h">
        <thead>
          <tr>
            <th scope="col">Check</th>
            <th scope="col">Component</th>
            <th scope="col">Arm</th>
            <th scope="col" class="num">Mean</th>
            <th scope="col" class="num">Worst</th>
            <th scope="col">Expected</th>
            <th scope="col">Pass</th>
          </tr>
        </thead>
        <tbody>
          ${lines.map(
            (l) => html`<tr class=${l.first ? 'group' : ''} data-check=${l.row.check} data-arm=${l.arm.arm}>
              ${l.first ? html`<td class="check" rowspan=${l.span}>${l.row.check}</td><td rowspan=${l.span}>${l.row.component}</td>` : nothing}
              <td><span class="arm" style=${`--c: ${l.arm.color}`}><b>${armLetter(l.arm.index)}</b> ${l.arm.arm}</span>${l.row.subject !== l.arm.arm ? html`<span class="subject">${l.row.subject}</span>` : nothing}</td>
              <td class="num" title=${`${l.row.measure} residual over ${l.row.samples} samples`}>${num(l.row.mean)}</td>
              <td class="num">${num(l.row.worst)}</td>
              <td class="expected">${l.row.expected}</td>
              <td class="pass" data-pass=${l.row.pass === null ? 'none' : l.row.pass ? 'yes' : 'no'} aria-label=${l.row.pass === null ? 'nothing promised' : l.row.pass ? 'holds' : 'fails'}>
                ${l.row.pass === null ? '—' : l.row.pass ? '✓' : '✗'}
              </td>
            </tr>`,
          )}
        </tbody>
      </table>
      <p class="foot">
        Mean and worst residual of each identity (relative: |deviation| / |exact|, absolute otherwise)${seeds > 1 ? `, mean over ${seeds} seeds and worst of the worsts` : ' on the first seed'}. ✓ meets
        what is expected; ✗ does not; — the architecture promises nothing there, so the number is only reported.
      </p>
    </div>`;
  }
}

customElements.define('ff-audit-table', FfAuditTable);

declare global {
  interface HTMLElementTagNameMap {
    'ff-audit-table': FfAuditTable;
  }
}
