/**
 * <ff-run-options>: how the runs are run (workers), on what engine, the runs
 * kept from earlier visits, what storage the browser allows, and why the
 * sheet cannot run yet. Run itself is in the run bar (<ff-run-controls>).
 */
import { LitElement, css, html, nothing } from 'lit';
import type { SheetState, EngineSummary } from './run-controller.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';

export class FfRunOptions extends LitElement {
  static override properties = {
    state: {},
    problems: { attribute: false },
    kept: { type: Number },
    reused: { type: Number },
    workers: { type: Number },
    maxWorkers: { type: Number },
    engine: { attribute: false },
    storageNote: {},
  };
  declare state: SheetState;
  declare problems: string[];
  declare kept: number;
  declare reused: number;
  declare workers: number;
  declare maxWorkers: number;
  declare engine: EngineSummary | null;
  declare storageNote: string | null;

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
        gap: 0.5em 1em;
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
        font-size: 0.92em;
        overflow-wrap: anywhere;
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
    this.kept = 0;
    this.reused = 0;
    this.workers = 1;
    this.maxWorkers = 1;
    this.engine = null;
    this.storageNote = null;
  }

  /** Bring the list of problems into view and focus it (the run bar's "fix N problems first"). */
  showProblems(): void {
    const box = this.renderRoot.querySelector<HTMLElement>('.problems');
    box?.scrollIntoView({ block: 'center' });
    box?.focus();
  }

  override render() {
    const running = this.state === 'running';
    return html`<div class="bar">
        <label
          >Run on
          <select
            aria-label="Workers (runs at a time)"
            ?disabled=${running}
            @change=${(e: Event) => emit(this, 'ff-workers', { count: Number((e.target as HTMLSelectElement).value) })}
          >
            ${Array.from({ length: this.maxWorkers }, (_, i) => i + 1).map((n) => html`<option value=${n} ?selected=${n === this.workers}>${n}</option>`)}
          </select>
          worker${this.workers === 1 ? '' : 's'} at a time</label
        >
        <span class="note">
          ${this.kept > 0 ? html`<span data-kept=${this.kept}>${this.kept} run${this.kept === 1 ? '' : 's'} kept from an earlier visit.</span>` : nothing}
          ${this.reused > 0 ? html`<span data-reused=${this.reused}>${this.reused} run${this.reused === 1 ? '' : 's'} reused: your edit left them unchanged.</span>` : nothing}
          ${this.engine
            ? html`<span data-engine-simd=${this.engine.simd ? 'on' : 'off'}>Engine: tfjs ${this.engine.backend.toUpperCase()}, ${this.engine.threads} thread${this.engine.threads === 1 ? '' : 's'} per worker${this.engine.backend === 'wasm' ? (this.engine.simd ? ', SIMD kernels' : ', stock kernels (slower, same numbers)') : ''}.</span>`
            : 'Engine: tfjs WASM in web workers, no GPU needed.'}
        </span>
        ${this.kept > 0 && !running
          ? html`<button type="button" class="quiet" data-action="forget" @click=${() => emit(this, 'ff-forget', null)}>Forget kept runs</button>`
          : nothing}
      </div>
      ${this.problems.length > 0
        ? html`<div class="problems" role="status" tabindex="-1" data-problems>
            <strong>Fix before running:</strong>
            <ul>
              ${this.problems.map((p) => html`<li>${p}</li>`)}
            </ul>
          </div>`
        : nothing}
      ${this.storageNote ? html`<p class="storage" data-storage-note>${this.storageNote}</p>` : nothing}`;
  }
}

customElements.define('ff-run-options', FfRunOptions);

declare global {
  interface HTMLElementTagNameMap {
    'ff-run-options': FfRunOptions;
  }
}
