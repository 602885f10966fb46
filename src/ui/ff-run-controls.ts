/** <ff-run-controls>: run, cancel, how many workers, and why the sheet cannot run yet. */
import { LitElement, css, html, nothing } from 'lit';
import type { SheetState, EngineSummary } from './run-controller.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';

export class FfRunControls extends LitElement {
  static override properties = {
    state: {},
    problems: { attribute: false },
    total: { type: Number },
    missing: { type: Number },
    kept: { type: Number },
    workers: { type: Number },
    maxWorkers: { type: Number },
    engine: { attribute: false },
    storageNote: {},
    ready: { type: Boolean },
  };
  declare state: SheetState;
  declare problems: string[];
  declare total: number;
  declare missing: number;
  declare kept: number;
  declare workers: number;
  declare maxWorkers: number;
  declare engine: EngineSummary | null;
  declare storageNote: string | null;
  declare ready: boolean;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .bar {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 0.7em 1em;
      }
      button.primary {
        font-size: 1.1em;
        padding: 0.45em 1.3em;
      }
      label {
        display: inline-flex;
        gap: 0.4em;
        align-items: center;
        font-size: 0.92em;
      }
      .note {
        color: var(--muted);
        font-size: 0.92em;
      }
      .problems {
        margin: 0.8em 0 0;
        border-left: 4px solid var(--danger);
        padding: 0.3em 0.8em;
        background: var(--danger-soft);
        border-radius: 0 4px 4px 0;
      }
      .problems ul {
        margin: 0.2em 0;
        padding-left: 1.1em;
        font-family: var(--mono);
        font-size: 0.85em;
      }
      .storage {
        margin: 0.5em 0 0;
        font-size: 0.88em;
        color: var(--ochre);
      }
    `,
  ];

  constructor() {
    super();
    this.state = 'idle';
    this.problems = [];
    this.total = 0;
    this.missing = 0;
    this.kept = 0;
    this.workers = 1;
    this.maxWorkers = 1;
    this.engine = null;
    this.storageNote = null;
    this.ready = false;
  }

  private label(): string {
    if (this.state === 'running') return 'Running…';
    if (this.total === 0) return 'Run';
    if (this.missing === 0) return `All ${this.total} runs done`;
    if (this.missing === this.total) return `Run ${this.total} run${this.total === 1 ? '' : 's'}`;
    return `Run the ${this.missing} missing run${this.missing === 1 ? '' : 's'}`;
  }

  override render() {
    const running = this.state === 'running';
    const blocked = this.problems.length > 0;
    return html`<div class="bar">
        <button
          type="button"
          class="primary"
          data-action="run"
          ?disabled=${!this.ready || running || blocked || this.missing === 0}
          @click=${() => emit(this, 'ff-run', null)}
        >
          ${running ? nothing : '▶ '}${this.label()}
        </button>
        <button type="button" data-action="cancel" ?disabled=${!running} @click=${() => emit(this, 'ff-cancel', null)}>■ Cancel</button>
        <label
          >on
          <select
            aria-label="Workers (runs at a time)"
            ?disabled=${running}
            @change=${(e: Event) => emit(this, 'ff-workers', { count: Number((e.target as HTMLSelectElement).value) })}
          >
            ${Array.from({ length: this.maxWorkers }, (_, i) => i + 1).map((n) => html`<option value=${n} ?selected=${n === this.workers}>${n}</option>`)}
          </select>
          worker${this.workers === 1 ? '' : 's'}</label
        >
        <span class="note">
          ${this.kept > 0 ? html`<span data-kept=${this.kept}>${this.kept} run${this.kept === 1 ? '' : 's'} kept from an earlier visit.</span>` : nothing}
          ${this.engine
            ? html`<span data-engine-simd=${this.engine.simd ? 'on' : 'off'}>Engine: tfjs ${this.engine.backend.toUpperCase()}, ${this.engine.threads} thread${this.engine.threads === 1 ? '' : 's'} per worker${this.engine.backend === 'wasm' ? (this.engine.simd ? ', SIMD kernels' : ', stock kernels (slower, same numbers)') : ''}.</span>`
            : 'Engine: tfjs WASM in web workers, no GPU needed.'}
        </span>
        ${this.kept > 0 && !running
          ? html`<button type="button" class="quiet" data-action="forget" @click=${() => emit(this, 'ff-forget', null)}>Forget kept runs</button>`
          : nothing}
      </div>
      ${blocked
        ? html`<div class="problems" role="status">
            <strong>Fix before running:</strong>
            <ul>
              ${this.problems.map((p) => html`<li>${p}</li>`)}
            </ul>
          </div>`
        : nothing}
      ${this.storageNote ? html`<p class="storage">${this.storageNote}</p>` : nothing}`;
  }
}

customElements.define('ff-run-controls', FfRunControls);

declare global {
  interface HTMLElementTagNameMap {
    'ff-run-controls': FfRunControls;
  }
}
