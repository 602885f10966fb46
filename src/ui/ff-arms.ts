/** <ff-arms>: the arms as cards side by side, and a way to add one. */
import { LitElement, css, html } from 'lit';
import type { ArmCardView } from './spec-draft.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';
import './ff-arm-card.ts';

export class FfArms extends LitElement {
  static override properties = {
    arms: { attribute: false },
    invalid: { attribute: false },
    disabled: { type: Boolean },
    maxArms: { type: Number },
  };
  declare arms: ArmCardView[];
  declare invalid: Set<string>;
  declare disabled: boolean;
  declare maxArms: number;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .cards {
        display: flex;
        flex-wrap: wrap;
        gap: 1em;
        align-items: stretch;
      }
      ff-arm-card {
        flex: 1 1 22em;
        /* Never wider than the page: one card per line on a phone. */
        min-width: min(19em, 100%);
        max-width: 36em;
      }
      .add {
        flex: 0 0 8.5em;
        border: 2px dashed var(--rule);
        border-radius: 4px;
        min-height: 8em;
        display: grid;
        place-items: center;
        text-align: center;
        background: transparent;
        color: var(--muted);
        font-size: 1em;
      }
      .add:hover:not(:disabled) {
        border-color: var(--teal);
        color: var(--teal);
        background: transparent;
      }
    `,
  ];

  constructor() {
    super();
    this.arms = [];
    this.invalid = new Set();
    this.disabled = false;
    this.maxArms = 32;
  }

  /** Invalid field names for arm i, relative to the arm ("name", "model.hidden"). */
  private invalidFor(index: number): Set<string> {
    const prefix = `arms[${index}].`;
    return new Set([...this.invalid].filter((f) => f.startsWith(prefix)).map((f) => f.slice(prefix.length)));
  }

  override render() {
    return html`<div class="cards">
      ${this.arms.map((arm) => html`<ff-arm-card .view=${arm} .invalid=${this.invalidFor(arm.index)} ?disabled=${this.disabled}></ff-arm-card>`)}
      <button type="button" class="add" ?disabled=${this.disabled || this.arms.length >= this.maxArms} @click=${() => emit(this, 'ff-edit', { kind: 'arm-add' })}>
        + Add an arm
      </button>
    </div>`;
  }
}

customElements.define('ff-arms', FfArms);

declare global {
  interface HTMLElementTagNameMap {
    'ff-arms': FfArms;
  }
}
