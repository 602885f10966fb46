/**
 * <ff-arm-card>: one arm of the experiment, every model switch the engine
 * supports, with the switches that differ between arms marked — those are
 * the thing under test.
 */
import { LitElement, css, html, nothing, type TemplateResult } from 'lit';
import type { ArmCardView, StepKey, SwitchKey } from './spec-draft.ts';
import { parseNumber } from './spec-draft.ts';
import { OPTIONS, type Choice } from './catalogue.ts';
import type { TransformName } from '../experiment/spec.ts';
import { aggregatorRecord, messageRecord } from '../model/catalogue.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';

export class FfArmCard extends LitElement {
  static override properties = {
    view: { attribute: false },
    invalid: { attribute: false },
    disabled: { type: Boolean },
  };
  declare view: ArmCardView;
  /** Invalid field names under this arm ("name", "model.steps.count", …). */
  declare invalid: Set<string>;
  declare disabled: boolean;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      article {
        background: var(--card);
        border: 1px solid var(--rule);
        border-top: 6px solid var(--arm);
        border-radius: 4px;
        padding: 0.7em 0.9em 0.9em;
        height: 100%;
        box-shadow: 0 1px 0 rgba(28, 33, 48, 0.06);
      }
      .head {
        display: flex;
        align-items: center;
        gap: 0.5em;
      }
      .letter {
        flex: none;
        width: 1.7em;
        height: 1.7em;
        border-radius: 50%;
        /* Ink on card inside a ring of the arm's colour: arm colours reach 3:1, text needs 4.5:1. */
        border: 3px solid var(--arm);
        background: var(--card);
        color: var(--ink);
        font-weight: 700;
        display: grid;
        place-items: center;
        font-size: 0.95em;
      }
      .name {
        flex: 1;
        min-width: 0;
        font-size: 1.15em;
        font-weight: 700;
        color: var(--ink);
      }
      .tools {
        display: flex;
        justify-content: flex-end;
        gap: 0.2em;
        margin-top: 0.6em;
        padding-top: 0.4em;
        border-top: 1px solid var(--rule);
      }
      .tools button {
        font-size: 0.82em;
        padding-inline: 0.5em;
      }
      textarea {
        width: 100%;
        margin: 0.45em 0 0.5em;
        font-size: 0.9em;
        resize: vertical;
        min-height: 2.2em;
        field-sizing: content;
      }
      dl {
        display: grid;
        grid-template-columns: 7.3em minmax(0, 1fr);
        gap: 0.3em 0.6em;
        margin: 0;
        align-items: start;
      }
      dt {
        font-size: 0.88em;
        color: var(--muted);
        padding: 0.3em 0 0.2em 0.4em;
        border-left: 3px solid transparent;
      }
      dd {
        margin: 0;
        display: flex;
        flex-wrap: wrap;
        gap: 0.3em 0.5em;
        align-items: center;
        min-width: 0;
      }
      dt.differs {
        color: var(--ink);
        font-weight: 700;
        border-left-color: var(--ochre);
        background: linear-gradient(90deg, var(--ochre-soft), transparent);
      }
      dd.differs select,
      dd.differs input {
        border-color: var(--ochre);
        border-bottom-width: 2px;
        font-weight: 600;
      }
      .badge {
        font-size: 0.75em;
        color: var(--ochre);
        font-weight: 700;
        white-space: nowrap;
      }
      .sub {
        font-size: 0.85em;
        color: var(--muted);
        display: inline-flex;
        flex-wrap: wrap;
        max-width: 100%;
        gap: 0.3em;
        align-items: center;
      }
      dd > select {
        width: 9.5em;
      }
      select {
        max-width: 100%;
      }
      input[type='number'] {
        width: 5.2em;
      }
      .hint {
        font-size: 0.8em;
        color: var(--muted);
        flex-basis: 100%;
      }
      .inherit {
        font-size: 0.75em;
        color: var(--muted);
      }
    `,
  ];

  constructor() {
    super();
    this.invalid = new Set();
    this.disabled = false;
  }

  private switchEdit(key: SwitchKey, value: unknown) {
    emit(this, 'ff-edit', { kind: 'arm-switch', arm: this.view.index, key, value });
  }

  private stepEdit(key: StepKey, value: unknown) {
    emit(this, 'ff-edit', { kind: 'arm-step', arm: this.view.index, key, value });
  }

  private bad(field: string): 'true' | 'false' {
    return this.invalid.has(field) ? 'true' : 'false';
  }

  private row(key: string, label: string, control: TemplateResult, hint?: string): TemplateResult {
    // `key` may name several switches ("a|b"): the row is marked if any differs.
    const differs = key.split('|').some((k) => this.view.differs.has(k));
    return html`<dt class=${differs ? 'differs' : ''}>${label}</dt>
      <dd class=${differs ? 'differs' : ''}>
        ${control} ${differs ? html`<span class="badge" title="This switch differs between arms">≠ differs</span>` : nothing}
        ${hint ? html`<span class="hint">${hint}</span>` : nothing}
      </dd>`;
  }

  private choice(key: SwitchKey, value: string, choices: readonly Choice[], label: string): TemplateResult {
    return html`<select
      aria-label=${`${label}, arm ${this.view.name}`}
      aria-invalid=${this.bad(`model.${key}`)}
      ?disabled=${this.disabled}
      @change=${(e: Event) => this.switchEdit(key, (e.target as HTMLSelectElement).value)}
    >
      ${choices.map((c) => html`<option value=${c.value} ?selected=${c.value === value} title=${c.hint ?? ''}>${c.label}</option>`)}
    </select>`;
  }

  private numberInput(label: string, value: number, field: string, onChange: (v: number) => void, step = 'any'): TemplateResult {
    return html`<input
      type="number"
      step=${step}
      aria-label=${`${label}, arm ${this.view.name}`}
      aria-invalid=${this.bad(field)}
      .value=${Number.isFinite(value) ? String(value) : ''}
      ?disabled=${this.disabled}
      @change=${(e: Event) => onChange(parseNumber((e.target as HTMLInputElement).value))}
    />`;
  }

  /** One select per input feature; all equal collapses back to a single name. */
  private transforms(key: 'nodeTransform' | 'edgeTransform', features: string[], value: TransformName | TransformName[]): TemplateResult {
    const list: TransformName[] = Array.isArray(value) ? value : features.map(() => value);
    const change = (i: number, name: TransformName) => {
      const next = list.map((v, j) => (j === i ? name : v));
      this.switchEdit(key, next.every((v) => v === next[0]) ? next[0] : next);
    };
    return html`${features.map(
      (feature, i) => html`<span class="sub">
        ${features.length > 1 || feature !== 'one' ? html`<span>${feature}</span>` : nothing}
        <select
          aria-label=${`${key === 'nodeTransform' ? 'Node' : 'Edge'} input transform for ${feature}, arm ${this.view.name}`}
          aria-invalid=${this.bad(`model.${key}`)}
          ?disabled=${this.disabled}
          @change=${(e: Event) => change(i, (e.target as HTMLSelectElement).value as TransformName)}
        >
          ${OPTIONS.transform.map((c) => html`<option value=${c.value} ?selected=${c.value === list[i]} title=${c.hint ?? ''}>${c.label}</option>`)}
        </select>
      </span>`,
    )}`;
  }

  override render() {
    const v = this.view;
    if (!v) return null;
    const m = v.model;
    const s = m.steps;
    const hintOf = (choices: readonly Choice[], value: string) => choices.find((c) => c.value === value)?.hint;
    return html`<article style=${`--arm: ${v.color}`} aria-label=${`Arm ${v.letter}: ${v.name}`}>
      <div class="head">
        <span class="letter" aria-hidden="true">${v.letter}</span>
        <input
          class="name"
          type="text"
          maxlength="40"
          aria-label=${`Name of arm ${v.letter}`}
          aria-invalid=${this.bad('name')}
          .value=${v.name}
          ?disabled=${this.disabled}
          @change=${(e: Event) => emit(this, 'ff-edit', { kind: 'arm-name', arm: v.index, name: (e.target as HTMLInputElement).value })}
        />
      </div>
      <textarea
        rows="1"
        maxlength="400"
        placeholder="What this arm changes, and why"
        aria-label=${`Note for arm ${v.name}`}
        .value=${v.note}
        ?disabled=${this.disabled}
        @change=${(e: Event) => emit(this, 'ff-edit', { kind: 'arm-note', arm: v.index, note: (e.target as HTMLTextAreaElement).value })}
      ></textarea>
      <dl>
        ${this.row(
          'aggregator',
          'Aggregator',
          html`${this.choice('aggregator', m.aggregator, OPTIONS.aggregator, 'Aggregator')}
          ${aggregatorRecord(m.aggregator).takesTemperature
            ? html`<span class="sub">τ ${this.numberInput('Aggregator temperature', m.aggregatorTemperature, 'model.aggregatorTemperature', (x) => this.switchEdit('aggregatorTemperature', x))}</span>`
            : nothing}`,
          hintOf(OPTIONS.aggregator, m.aggregator),
        )}
        ${this.row(
          'message',
          'Message',
          html`${this.choice('message', m.message, OPTIONS.message, 'Message function')}
          ${messageRecord(m.message).takesTemperature
            ? html`<span class="sub">τ ${this.numberInput('Message temperature', m.messageTemperature, 'model.messageTemperature', (x) => this.switchEdit('messageTemperature', x))}</span>`
            : nothing}`,
          hintOf(OPTIONS.message, m.message),
        )}
        ${this.row('update', 'Update', this.choice('update', m.update, OPTIONS.update, 'Update function'), hintOf(OPTIONS.update, m.update))}
        ${this.row('activation', 'Activation', this.choice('activation', m.activation, OPTIONS.activation, 'Activation'))}
        ${this.row(
          'bias',
          'Bias',
          html`<label class="sub"
            ><input
              type="checkbox"
              aria-label=${`Bias in every layer, arm ${v.name}`}
              .checked=${m.bias}
              ?disabled=${this.disabled}
              @change=${(e: Event) => this.switchEdit('bias', (e.target as HTMLInputElement).checked)}
            />${m.bias ? 'every layer has a bias' : 'bias-free (homogeneous)'}</label
          >`,
        )}
        ${this.row(
          'learningRate',
          'Learning rate',
          html`<input
            type="number"
            step="any"
            placeholder=${String(v.sharedLearningRate)}
            aria-label=${`Learning rate (empty: the budget's), arm ${v.name}`}
            aria-invalid=${this.bad('learningRate')}
            .value=${v.learningRate === undefined ? '' : String(v.learningRate)}
            ?disabled=${this.disabled}
            @change=${(e: Event) => {
              const text = (e.target as HTMLInputElement).value.trim();
              emit(this, 'ff-edit', { kind: 'arm-learning-rate', arm: v.index, value: text === '' ? undefined : parseNumber(text) });
            }}
          /><span class="inherit">${v.learningRate === undefined ? 'as the budget' : 'this arm only'}</span>`,
        )}
        ${this.row('training', 'Training', html`<span class="sub">${v.training.text}</span><span class="inherit">${v.training.own ? 'this arm only' : 'as the budget'}</span>`)}
        ${this.row('hidden', 'Hidden width', this.numberInput('Hidden width', m.hidden, 'model.hidden', (x) => this.switchEdit('hidden', x), '1'))}
        ${this.row('nodeTransform', 'Node input', this.transforms('nodeTransform', v.nodeFeatures, m.nodeTransform))}
        ${this.row('edgeTransform', 'Edge input', this.transforms('edgeTransform', v.edgeFeatures, m.edgeTransform))}
        ${this.row(
          'steps.rule|steps.count|steps.factor|steps.tolerance',
          'Step rule',
          html`<select
              aria-label=${`Message-passing step rule, arm ${v.name}`}
              aria-invalid=${this.bad('model.steps.rule')}
              ?disabled=${this.disabled}
              @change=${(e: Event) => this.stepEdit('rule', (e.target as HTMLSelectElement).value)}
            >
              ${OPTIONS.stepRule.map((c) => html`<option value=${c.value} ?selected=${c.value === s.rule} title=${c.hint ?? ''}>${c.label}</option>`)}
            </select>
            ${s.rule === 'fixed' ? html`<span class="sub">count ${this.numberInput('Fixed step count', s.count, 'model.steps.count', (x) => this.stepEdit('count', x), '1')}</span>` : nothing}
            ${s.rule === 'proportional' ? html`<span class="sub">× ${this.numberInput('Steps per node', s.factor, 'model.steps.factor', (x) => this.stepEdit('factor', x))}</span>` : nothing}
            ${s.rule === 'until-stable' ? html`<span class="sub">tol ${this.numberInput('Stability tolerance', s.tolerance, 'model.steps.tolerance', (x) => this.stepEdit('tolerance', x))}</span>` : nothing}`,
          hintOf(OPTIONS.stepRule, s.rule),
        )}
        ${this.row(
          'steps.cap|steps.trainJitter',
          'Step limits',
          html`<span class="sub">cap ${this.numberInput('Most message-passing steps', s.cap, 'model.steps.cap', (x) => this.stepEdit('cap', x), '1')}</span>
            <span class="sub" title="Training only: up to this many extra steps per batch, so states stay stable under more steps at test"
              >+ jitter ${this.numberInput('Training step jitter', s.trainJitter, 'model.steps.trainJitter', (x) => this.stepEdit('trainJitter', x), '1')}</span
            >`,
        )}
      </dl>
      <div class="tools">
        <button type="button" class="quiet" title="Duplicate this arm" aria-label=${`Duplicate arm ${v.name}`} ?disabled=${this.disabled} @click=${() => emit(this, 'ff-edit', { kind: 'arm-duplicate', arm: v.index })}>duplicate</button>
        <button
          type="button"
          class="quiet"
          title=${v.canRemove ? 'Remove this arm' : 'An experiment needs at least two arms'}
          aria-label=${`Remove arm ${v.name}`}
          ?disabled=${this.disabled || !v.canRemove}
          @click=${() => emit(this, 'ff-edit', { kind: 'arm-remove', arm: v.index })}
        >remove</button>
      </div>
    </article>`;
  }
}

customElements.define('ff-arm-card', FfArmCard);

declare global {
  interface HTMLElementTagNameMap {
    'ff-arm-card': FfArmCard;
  }
}
