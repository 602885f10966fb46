/**
 * <ff-setup>: the experiment's setup written as sentences with fields in
 * them: task; training graphs; the test ladder and scale shift; seeds;
 * budget; metric. Reports each change as an 'ff-edit' event.
 */
import { LitElement, css, html, nothing, type TemplateResult } from 'lit';
import { DEFAULT_FIT_GATE, type Schedule } from '../experiment/spec.ts';
import type { Draft } from './spec-draft.ts';
import { fieldName, parseNumber, parseNumberList } from './spec-draft.ts';
import type { FamilyInfo, TaskInfo } from './catalogue.ts';
import { OPTIONS, taskInfo } from './catalogue.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';
import './ff-graph-files.ts';

type Path = ReadonlyArray<string | number>;

export class FfSetup extends LitElement {
  static override properties = {
    draft: { attribute: false },
    tasks: { attribute: false },
    families: { attribute: false },
    invalid: { attribute: false },
    disabled: { type: Boolean },
  };
  declare draft: Draft;
  declare tasks: TaskInfo[];
  declare families: FamilyInfo[];
  declare invalid: Set<string>;
  declare disabled: boolean;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .rows {
        display: grid;
        grid-template-columns: 7.5em minmax(0, 1fr);
        gap: 0.75em 1em;
        align-items: baseline;
      }
      .term {
        font-weight: 700;
        font-size: 0.95em;
        text-align: right;
        color: var(--ink);
      }
      .sentence {
        line-height: 2.05;
        font-size: 1em;
      }
      input,
      select {
        min-height: 1.75em;
        padding-block: 0.1em;
        max-width: 100%;
      }
      input[type='number'] {
        width: 4.4em;
      }
      input.wide {
        width: 6.2em;
      }
      input.list.short {
        width: 4.4em;
      }
      input.list {
        width: 8em;
        font-family: var(--mono);
        font-size: 0.92em;
      }
      .gloss {
        display: block;
        color: var(--muted);
        font-size: 0.9em;
        line-height: 1.45;
        margin-top: 0.15em;
      }
      .aligned {
        font-family: var(--mono);
        font-size: 0.88em;
      }
      @media (max-width: 640px) {
        .rows {
          grid-template-columns: minmax(0, 1fr);
        }
        .term {
          text-align: left;
        }
      }
    `,
  ];

  constructor() {
    super();
    this.tasks = [];
    this.families = [];
    this.invalid = new Set();
    this.disabled = false;
  }

  private set(path: Path, value: unknown) {
    emit(this, 'ff-edit', { kind: 'field', path, value });
  }

  private bad(path: Path): 'true' | 'false' {
    return this.invalid.has(fieldName(path)) ? 'true' : 'false';
  }

  private number(path: Path, value: number, label: string, options: { step?: string; min?: number; className?: string } = {}): TemplateResult {
    return html`<input
      type="number"
      class=${options.className ?? ''}
      step=${options.step ?? '1'}
      min=${options.min ?? 0}
      aria-label=${label}
      aria-invalid=${this.bad(path)}
      .value=${Number.isFinite(value) ? String(value) : ''}
      ?disabled=${this.disabled}
      @change=${(e: Event) => this.set(path, parseNumber((e.target as HTMLInputElement).value))}
    />`;
  }

  /** A fraction shown and typed as a percentage. */
  private percentNumber(path: Path, fraction: number, label: string): TemplateResult {
    return html`<input
      type="number"
      step="any"
      min="0.01"
      aria-label=${label}
      aria-invalid=${this.bad(path)}
      .value=${Number.isFinite(fraction) ? String(Number((fraction * 100).toPrecision(6))) : ''}
      ?disabled=${this.disabled}
      @change=${(e: Event) => this.set(path, parseNumber((e.target as HTMLInputElement).value) / 100)}
    />`;
  }

  /** Constant rate, or warm-up then cosine decay (the preset's own warm-up and floor are kept when present). */
  private scheduleChoice(schedule: Schedule | undefined): TemplateResult {
    const cosine = schedule?.kind === 'warmup-cosine';
    return html`rate
      <select
        aria-label="Learning-rate schedule"
        ?disabled=${this.disabled}
        @change=${(e: Event) =>
          this.set(
            ['budget', 'schedule'],
            (e.target as HTMLSelectElement).value === 'warmup-cosine' ? { kind: 'warmup-cosine', warmup: 50, floor: 0.05 } : undefined,
          )}
      >
        <option value="constant" ?selected=${!cosine}>constant</option>
        <option value="warmup-cosine" ?selected=${cosine}>warm-up, then cosine decay</option>
      </select>
      ${cosine
        ? html`over ${this.number(['budget', 'schedule', 'warmup'], schedule.warmup, 'Warm-up steps', { min: 0 })} warm-up steps, down to
            ${this.number(['budget', 'schedule', 'floor'], schedule.floor, 'Final rate as a fraction of the rate', { step: 'any' })} × the rate`
        : nothing}`;
  }

  private list(path: Path, values: readonly number[], label: string, short = false): TemplateResult {
    return html`<input
      type="text"
      class=${short ? 'list short' : 'list'}
      inputmode="decimal"
      aria-label=${label}
      aria-invalid=${this.bad(path)}
      .value=${values.map((v) => (Number.isFinite(v) ? String(v) : '?')).join(', ')}
      ?disabled=${this.disabled}
      @change=${(e: Event) => this.set(path, parseNumberList((e.target as HTMLInputElement).value))}
    />`;
  }

  /** A select; the empty choice ('') leaves the optional field out. */
  private select(path: Path, value: string, label: string, choices: ReadonlyArray<{ value: string; label: string; hint?: string }>): TemplateResult {
    return html`<select
      aria-label=${label}
      aria-invalid=${this.bad(path)}
      ?disabled=${this.disabled}
      @change=${(e: Event) => this.set(path, (e.target as HTMLSelectElement).value || undefined)}
    >
      ${choices.map((c) => html`<option value=${c.value} ?selected=${c.value === value} title=${c.hint ?? ''}>${c.label}</option>`)}
    </select>`;
  }

  override render() {
    const d = this.draft;
    if (!d) return null;
    // A recurrence task (an object in the spec) is not in the picker's list: it is built from its fields.
    const task = typeof d.task === 'string' ? this.tasks.find((t) => t.id === d.task) : taskInfo(d.task);
    const allowed = this.families.filter((f) => !task || task.families.includes(f.id));
    const familyChoices = allowed.map((f) => ({ value: f.id, label: f.id, hint: f.title }));
    const trainFamily = this.families.find((f) => f.id === d.train.family);
    const params = Object.entries(d.train.familyParams ?? {});
    return html`<div class="rows">
      <div class="term" id="t-task">Task</div>
      <div class="sentence">
        <select
          aria-label="Task"
          aria-invalid=${this.bad(['task'])}
          ?disabled=${this.disabled}
          @change=${(e: Event) => emit(this, 'ff-edit', { kind: 'task', task: (e.target as HTMLSelectElement).value })}
        >
          ${typeof d.task !== 'string' ? html`<option value="" selected disabled>${task?.id ?? 'recurrence'}</option>` : nothing}
          ${this.tasks.map((t) => html`<option value=${t.id} ?selected=${t.id === d.task}>${t.id}</option>`)}
        </select>
        ${task
          ? html`<span class="gloss">${task.title}: ${task.describe}<br />Aligned structure, for information only:
                <span class="aligned">${task.alignedStructure}</span> — the aggregator one would expect to fit is
                <strong>${task.alignedAggregator}</strong>.${task.suggestion ? html`<br /><span class="suggestion">Suggested for ${task.suggestion}</span>` : nothing}</span>`
          : null}
      </div>

      <div class="term">Train</div>
      <div class="sentence">
        on ${this.select(['train', 'family'], d.train.family, 'Training graph family', familyChoices)} graphs of
        ${this.number(['train', 'sizes', 0], d.train.sizes[0], 'Smallest training graph (nodes)', { min: 3 })} to
        ${this.number(['train', 'sizes', 1], d.train.sizes[1], 'Largest training graph (nodes)', { min: 3 })} nodes,
        ${this.number(['train', 'graphs'], d.train.graphs, 'Training graphs per seed', { min: 8 })} graphs per seed, edge weights
        from ${this.number(['train', 'weightRange', 0], d.train.weightRange[0], 'Smallest edge weight', { step: 'any' })} to
        ${this.number(['train', 'weightRange', 1], d.train.weightRange[1], 'Largest edge weight', { step: 'any' })}.
        ${trainFamily ? html`<span class="gloss">${trainFamily.title}${params.length ? html`; family parameters ${params.map(([k, v]) => `${k} = ${v}`).join(', ')}` : null}.</span>` : null}
      </div>

      <div class="term">Test ladder</div>
      <div class="sentence">
        on ${this.select(['test', 'family'], d.test.family ?? '', 'Test graph family', [{ value: '', label: 'the same family' }, ...familyChoices])}
        at sizes ${this.list(['test', 'sizes'], d.test.sizes, 'Test sizes (nodes, comma-separated)')} nodes,
        ${this.number(['test', 'graphsPerRung'], d.test.graphsPerRung, 'Test graphs per size', { min: 1 })} graphs per size;
        scale shift: weights ×${this.list(['test', 'weightScales'], d.test.weightScales, 'Weight scales (comma-separated; 1 = as in training)', d.test.weightScales.length < 2)};
        validate in distribution on ${this.number(['test', 'validationGraphs'], d.test.validationGraphs, 'Validation graphs', { min: 4 })} graphs.
      </div>
      <div class="term">Graph files</div><ff-graph-files class="sentence" .files=${d.test.files} .task=${d.task} ?disabled=${this.disabled}></ff-graph-files>

      <div class="term">Seeds</div>
      <div class="sentence">
        ${this.number(['seeds', 'count'], d.seeds.count, 'Seeds per arm', { min: 1 })} per arm, starting at seed
        ${this.number(['seeds', 'base'], d.seeds.base, 'First seed', { min: 0 })}; every arm of a seed sees the same graphs and initial weights
        (${d.arms.length} arms × ${Number.isFinite(d.seeds.count) ? d.seeds.count : '?'} seeds = ${Number.isFinite(d.seeds.count) ? d.arms.length * d.seeds.count : '?'} runs).
      </div>

      <div class="term">Budget</div>
      <div class="sentence">
        ${this.number(['budget', 'steps'], d.budget.steps, 'Training steps', { min: 1 })} steps of
        ${this.number(['budget', 'batchGraphs'], d.budget.batchGraphs, 'Graphs per batch', { min: 1 })} graphs, learning rate
        ${this.number(['budget', 'learningRate'], d.budget.learningRate, 'Learning rate', { step: 'any', className: 'wide' })}, gradient clip
        ${this.number(['budget', 'clipNorm'], d.budget.clipNorm, 'Gradient clip norm', { step: 'any' })},
        ${this.select(['budget', 'loss'], d.budget.loss, 'Loss', OPTIONS.loss)} loss; keep the best weights on validation every
        ${this.number(['budget', 'validateEvery'], d.budget.validateEvery, 'Validate every k steps (0: keep the last weights)')} steps;
        ${this.scheduleChoice(d.budget.schedule)}.
      </div>

      <div class="term">Fit gate</div>
      <div class="sentence">
        judge an arm only if its in-distribution relative error on fresh graphs (median over seeds) is at most
        ${this.percentNumber(['budget', 'fitGate'], d.budget.fitGate ?? DEFAULT_FIT_GATE, 'Fit gate, in percent')} %; an arm above it is
        "not fitted" and no verdict calls a winner for it.
      </div>

      <div class="term">Score</div>
      <div class="sentence">by ${this.select(['metric'], d.metric, 'Metric', OPTIONS.metric)} on every rung of the ladder.</div>
    </div>`;
  }
}

customElements.define('ff-setup', FfSetup);

declare global {
  interface HTMLElementTagNameMap {
    'ff-setup': FfSetup;
  }
}
