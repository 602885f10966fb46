/**
 * <ff-fit-gate>: the fit gate per arm, in words with the numbers, above the
 * verdicts. An arm that is not fitted is marked by a word, a shape and a
 * frame, not by colour alone. The rows and their sentences come from
 * src/ui/evidence.ts.
 */
import { LitElement, css, html, nothing, svg } from 'lit';
import type { GateRow, GateStatus } from './evidence.ts';
import { controls } from './styles.ts';

/** A shape per status, so the status reads without colour: a tick in a disc, a bar in a triangle, an open ring. */
function icon(status: GateStatus) {
  const shape =
    status === 'fitted'
      ? svg`<circle cx="9" cy="9" r="8" fill="currentColor" /><path d="M5 9.3l2.6 2.6L13.2 6" fill="none" stroke="#fff" stroke-width="2.2" stroke-linecap="round" stroke-linejoin="round" />`
      : status === 'not-fitted'
        ? svg`<path d="M9 1.2L17.2 16.4H0.8Z" fill="currentColor" /><path d="M9 6.2v5" stroke="#fff" stroke-width="2.2" stroke-linecap="round" /><circle cx="9" cy="13.9" r="1.2" fill="#fff" />`
        : svg`<circle cx="9" cy="9" r="7" fill="none" stroke="currentColor" stroke-width="2" stroke-dasharray="3 2.4" />`;
  return html`<svg class="icon" viewBox="0 0 18 18" width="18" height="18" aria-hidden="true" focusable="false">${shape}</svg>`;
}

export class FfFitGate extends LitElement {
  static override properties = {
    gates: { attribute: false },
    note: {},
  };
  declare gates: GateRow[];
  declare note: string;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      section {
        margin: 0 0 1em;
        background: var(--card);
        border: 1px solid var(--rule);
        border-radius: 4px;
        padding: 0.6em 0.9em 0.7em;
      }
      h3 {
        margin: 0;
        font-family: var(--serif);
        font-size: 1.05em;
      }
      .note {
        margin: 0.15em 0 0.5em;
        color: var(--muted);
        font-size: 0.9em;
        line-height: 1.45;
      }
      ul {
        margin: 0;
        padding: 0;
        list-style: none;
        display: grid;
        gap: 0.35em;
      }
      li {
        display: grid;
        grid-template-columns: auto 1fr;
        gap: 0.55em;
        align-items: start;
        padding: 0.35em 0.6em;
        border-left: 4px solid transparent;
        border-radius: 0 3px 3px 0;
        line-height: 1.45;
      }
      .icon {
        margin-top: 0.12em;
        flex: none;
      }
      li[data-gate='fitted'] .icon {
        color: var(--ok);
      }
      li[data-gate='not-run'] {
        color: var(--muted);
      }
      li[data-gate='not-fitted'] {
        border: 2px solid var(--danger);
        border-left-width: 6px;
        background: var(--danger-soft);
      }
      li[data-gate='not-fitted'] .icon {
        color: var(--danger);
      }
      .arm {
        font-weight: 700;
      }
      .swatch {
        display: inline-block;
        width: 0.8em;
        height: 0.8em;
        border-radius: 2px;
        margin-right: 0.3em;
        vertical-align: -0.05em;
        background: var(--c);
      }
      .label {
        font-weight: 700;
      }
      li[data-gate='not-fitted'] .label {
        color: var(--danger);
        text-transform: uppercase;
        letter-spacing: 0.04em;
      }
    `,
  ];

  constructor() {
    super();
    this.gates = [];
    this.note = '';
  }

  override render() {
    if (this.gates.length === 0) return nothing;
    const missed = this.gates.filter((g) => g.status === 'not-fitted').length;
    return html`<section aria-labelledby="gate-h" data-fit-gate=${missed ? 'missed' : 'ok'}>
      <h3 id="gate-h">Fit gate${missed ? ` — ${missed} arm${missed === 1 ? '' : 's'} not fitted` : ''}</h3>
      ${this.note ? html`<p class="note">${this.note}</p>` : nothing}
      <ul>
        ${this.gates.map(
          (g) => html`<li data-gate=${g.status} data-arm=${g.arm}>
            ${icon(g.status)}
            <span
              ><span class="arm"><span class="swatch" style=${`--c: ${g.color}`}></span>${g.arm}</span>: <span class="label">${g.label}</span> — ${g.detail}</span
            >
          </li>`,
        )}
      </ul>
    </section>`;
  }
}

customElements.define('ff-fit-gate', FfFitGate);

declare global {
  interface HTMLElementTagNameMap {
    'ff-fit-gate': FfFitGate;
  }
}
