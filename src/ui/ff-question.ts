/** <ff-question>: the experiment's question and its honest expectation, at the head of the sheet. */
import { LitElement, css, html } from 'lit';
import { controls } from './styles.ts';
import { emit } from './events.ts';

export class FfQuestion extends LitElement {
  static override properties = {
    question: {},
    expectation: {},
    disabled: { type: Boolean },
    invalid: { type: Boolean },
  };
  declare question: string;
  declare expectation: string;
  declare disabled: boolean;
  declare invalid: boolean;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .q {
        display: grid;
        grid-template-columns: auto 1fr;
        gap: 0 0.6em;
        align-items: start;
      }
      .mark {
        font-family: var(--serif);
        font-size: 2.6em;
        line-height: 1;
        color: var(--teal);
        font-weight: 700;
        padding-top: 0.05em;
      }
      textarea {
        width: 100%;
        resize: none;
        border: 1px solid transparent;
        background: transparent;
        padding: 0.1em 0.2em;
        field-sizing: content;
      }
      textarea:hover:not(:disabled),
      textarea:focus {
        border-color: var(--rule);
        background: var(--field);
      }
      textarea:disabled {
        color: inherit;
      }
      .question {
        font-family: var(--serif);
        font-size: 1.9em;
        line-height: 1.2;
        font-weight: 600;
        min-height: 1.5em;
      }
      .expectation {
        font-family: var(--serif);
        font-style: italic;
        font-size: 1.05em;
        line-height: 1.45;
        color: var(--muted);
        min-height: 2.5em;
      }
      /* A phone: the question stays a heading without filling the first screen. */
      @media (max-width: 640px) {
        .question {
          font-size: 1.35em;
        }
        .mark {
          font-size: 1.9em;
        }
      }
      .label {
        font-size: 0.75em;
        letter-spacing: 0.1em;
        text-transform: uppercase;
        color: var(--ochre);
        font-weight: 700;
        margin: 0.4em 0 0 0.25em;
      }
    `,
  ];

  constructor() {
    super();
    this.question = '';
    this.expectation = '';
    this.disabled = false;
    this.invalid = false;
  }

  override render() {
    return html`<div class="q">
      <div class="mark" aria-hidden="true">Q</div>
      <div>
        <textarea
          class="question"
          rows="1"
          aria-label="Question"
          aria-invalid=${this.invalid ? 'true' : 'false'}
          maxlength="300"
          .value=${this.question}
          ?disabled=${this.disabled}
          @change=${(e: Event) => emit(this, 'ff-edit', { kind: 'field', path: ['question'], value: (e.target as HTMLTextAreaElement).value })}
        ></textarea>
        <div class="label" id="exp-label">Expected, and held equal</div>
        <textarea
          class="expectation"
          rows="2"
          aria-labelledby="exp-label"
          maxlength="2000"
          placeholder="What do you expect, and what is held equal between the arms?"
          .value=${this.expectation}
          ?disabled=${this.disabled}
          @change=${(e: Event) => emit(this, 'ff-edit', { kind: 'field', path: ['expectation'], value: (e.target as HTMLTextAreaElement).value })}
        ></textarea>
      </div>
    </div>`;
  }
}

customElements.define('ff-question', FfQuestion);

declare global {
  interface HTMLElementTagNameMap {
    'ff-question': FfQuestion;
  }
}
