/** <ff-share>: the share link, the results fingerprint (and whether it matches the link's), results exports and trained networks. */
import { LitElement, css, html, nothing } from 'lit';
import type { FingerprintCheck, NetworkChoice, ShareState } from './sheet-controller.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';

export class FfShare extends LitElement {
  static override properties = {
    share: { attribute: false },
    fingerprint: {},
    specHash: {},
    check: { attribute: false },
    hasResults: { type: Boolean },
    edited: { type: Boolean },
    networks: { attribute: false },
    network: { state: true },
  };
  declare share: ShareState;
  /** The results fingerprint, once every run is in; '' before. */
  declare fingerprint: string;
  declare specHash: string;
  declare check: FingerprintCheck | null;
  declare hasResults: boolean;
  declare edited: boolean;
  /** Runs of this visit whose trained network can be downloaded. */
  declare networks: NetworkChoice[];
  /** The run index picked in the network list; -1: the first. */
  declare network: number;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      .grid {
        display: grid;
        grid-template-columns: minmax(0, 3fr) minmax(16em, 2fr);
        gap: 1.2em;
      }
      @media (max-width: 900px) {
        .grid {
          grid-template-columns: minmax(0, 1fr);
        }
      }
      /* Commands and hashes wrap on a phone instead of widening the page. */
      code {
        overflow-wrap: anywhere;
      }
      .box {
        background: var(--card);
        border: 1px solid var(--rule);
        border-radius: 4px;
        padding: 0.8em 1em;
      }
      h3 {
        margin: 0 0 0.4em;
        font-size: 1em;
        font-family: var(--serif);
      }
      .row {
        display: flex;
        gap: 0.5em;
        align-items: center;
        flex-wrap: wrap;
      }
      input.link {
        flex: 1 1 18em;
        min-width: 0;
        font-family: var(--mono);
        font-size: 0.82em;
      }
      .status {
        font-size: 0.88em;
        color: var(--muted);
        margin: 0.4em 0 0;
      }
      .error {
        color: var(--danger);
      }
      .fp {
        font-family: var(--mono);
        font-size: 1.35em;
        font-weight: 700;
        letter-spacing: 0.06em;
      }
      .check {
        margin: 0.5em 0 0;
        padding: 0.35em 0.6em;
        border-radius: 3px;
        font-size: 0.93em;
      }
      .check[data-verdict='match'] {
        background: #dfeacc;
        color: #2d4d12;
      }
      .check[data-verdict='differ'] {
        background: var(--danger-soft);
        color: var(--danger);
      }
      .check[data-verdict='pending'],
      .check[data-verdict='stale'] {
        background: var(--paper-deep);
        color: var(--muted);
      }
      .exports {
        margin-top: 0.8em;
      }
      p.small {
        font-size: 0.85em;
        color: var(--muted);
        margin: 0.4em 0 0;
        line-height: 1.4;
      }
    `,
  ];

  constructor() {
    super();
    this.share = { link: null, error: null, status: null };
    this.fingerprint = '';
    this.specHash = '';
    this.check = null;
    this.hasResults = false;
    this.edited = false;
    this.networks = [];
    this.network = -1;
  }

  private networkRow() {
    const choices = this.networks;
    if (choices.length === 0) return nothing;
    const picked = choices.some((n) => n.index === this.network) ? this.network : choices[0]!.index;
    return html`<div class="row exports" data-networks>
        <select aria-label="Trained network (arm and seed)" @change=${(e: Event) => (this.network = Number((e.target as HTMLSelectElement).value))}>
          ${choices.map((n) => html`<option value=${n.index} ?selected=${n.index === picked}>${n.label}</option>`)}
        </select>
        <button type="button" data-action="download-network" @click=${() => emit(this, 'ff-download-network', { index: picked })}>Download network</button>
      </div>
      <p class="small">
        Two files in TensorFlow.js's weights format: a JSON manifest with the spec, arm and seed, and its binary shard. Keep them side by side;
        <code>npx farfield score &lt;file&gt;.json</code> rescores the network without retraining.
      </p>`;
  }

  private checkText(c: FingerprintCheck): string {
    switch (c.verdict) {
      case 'match':
        return `✓ Matches the fingerprint in the link (${c.expected}): same spec, same numbers.`;
      case 'differ':
        return `✗ Differs from the fingerprint in the link (${c.expected}). Same spec, different numbers: compare the engine versions in the two results files.`;
      case 'pending':
        return `The link carries fingerprint ${c.expected}; run every run to compare.`;
      case 'stale':
        return `The link carried fingerprint ${c.expected}, but the spec has been edited since, so it no longer applies.`;
    }
  }

  override render() {
    const s = this.share;
    return html`<div class="grid">
      <div class="box">
        <h3>Share this experiment</h3>
        <div class="row">
          <button type="button" data-action="copy-link" ?disabled=${!s.link} @click=${() => emit(this, 'ff-copy-link', null)}>Copy share link</button>
          <input class="link" type="text" readonly aria-label="Share link" .value=${s.link ?? ''} @focus=${(e: Event) => (e.target as HTMLInputElement).select()} />
        </div>
        ${s.error ? html`<p class="status error">${s.error}</p>` : nothing}
        ${s.status ? html`<p class="status" role="status">${s.status}</p>` : nothing}
        <p class="small">
          The link holds the whole spec${this.fingerprint ? ' and the fingerprint of these results' : ''}; it never reaches a server. Whoever opens it sees the
          setup first and nothing runs until they press Run. The same link runs from the command line:
          <code>npx farfield run '&lt;link&gt;'</code>.
        </p>
      </div>
      <div class="box">
        <h3>Results</h3>
        ${this.fingerprint
          ? html`<div>Fingerprint <span class="fp" data-results-fingerprint=${this.fingerprint}>${this.fingerprint}</span></div>`
          : html`<div class="muted">${this.hasResults ? 'The fingerprint appears when every run is in.' : 'No results yet.'}</div>`}
        ${this.specHash ? html`<p class="small">Spec hash <span class="num">${this.specHash}</span>. The fingerprint covers every run's rounded errors, not times or machines.</p>` : nothing}
        ${this.check ? html`<p class="check" data-verdict=${this.check.verdict} data-fingerprint-check=${this.check.verdict}>${this.checkText(this.check)}</p>` : nothing}
        <div class="row exports">
          <button type="button" data-action="export-json" ?disabled=${!this.hasResults} @click=${() => emit(this, 'ff-export-results', { format: 'json' })}>Results JSON</button>
          <button type="button" data-action="export-csv" ?disabled=${!this.hasResults} @click=${() => emit(this, 'ff-export-results', { format: 'csv' })}>Results CSV</button>
          <button
            type="button"
            data-action="export-report"
            title="One HTML file with the question, arms, setup, every figure, the verdicts and the share link; opens offline and prints to A4"
            ?disabled=${!this.hasResults}
            @click=${() => emit(this, 'ff-export-results', { format: 'html' })}
          >
            Report (HTML)
          </button>
        </div>
        ${this.networkRow()}
      </div>
    </div>`;
  }
}

customElements.define('ff-share', FfShare);

declare global {
  interface HTMLElementTagNameMap {
    'ff-share': FfShare;
  }
}
