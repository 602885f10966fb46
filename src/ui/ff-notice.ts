/** <ff-notice>: a refusal (a bad share link or preset file) explained, above a sheet that still works. */
import { LitElement, css, html } from 'lit';
import type { SheetNotice } from './sheet-controller.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';

export class FfNotice extends LitElement {
  static override properties = {
    notice: { attribute: false },
  };
  declare notice: SheetNotice | null;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      section {
        margin: 1em 0 0;
        border: 2px solid var(--danger);
        border-left-width: 8px;
        background: var(--danger-soft);
        padding: 0.8em 1em;
        border-radius: 4px;
      }
      h2 {
        margin: 0 0 0.3em;
        font-size: 1.1em;
        color: var(--danger);
      }
      p {
        margin: 0.3em 0;
      }
      .message {
        font-family: var(--mono);
        font-size: 0.9em;
        overflow-wrap: anywhere;
      }
      ul {
        margin: 0.3em 0;
        padding-left: 1.2em;
        font-size: 0.92em;
        overflow-wrap: anywhere;
      }
      .row {
        display: flex;
        justify-content: space-between;
        align-items: start;
        gap: 1em;
      }
    `,
  ];

  constructor() {
    super();
    this.notice = null;
  }

  override render() {
    const n = this.notice;
    if (!n) return null;
    return html`<section role="alert" aria-labelledby="title" data-notice>
      <div class="row">
        <h2 id="title">${n.title}</h2>
        <button type="button" class="quiet" aria-label="Dismiss this message" @click=${() => emit(this, 'ff-dismiss', null)}>✕</button>
      </div>
      <p class="message">${n.message}</p>
      ${n.problems.length > 1 ? html`<ul>${n.problems.map((p) => html`<li>${p}</li>`)}</ul>` : null}
      <p>${n.hint}</p>
    </section>`;
  }
}

customElements.define('ff-notice', FfNotice);

declare global {
  interface HTMLElementTagNameMap {
    'ff-notice': FfNotice;
  }
}
