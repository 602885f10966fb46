/** <ff-masthead>: the sheet's title bar: where the experiment came from, the preset picker, a preset file, the lecture layout switch. */
import { LitElement, css, html } from 'lit';
import type { PresetEntry } from './presets.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';
import { LIMITS } from '../experiment/limits.ts';

export class FfMasthead extends LitElement {
  static override properties = {
    presets: { attribute: false },
    selected: {},
    sourceLabel: {},
    presenter: { type: Boolean },
    disabled: { type: Boolean },
  };
  declare presets: PresetEntry[];
  /** Preset id on the sheet, or '' when the sheet came from a link or a file. */
  declare selected: string;
  declare sourceLabel: string;
  declare presenter: boolean;
  declare disabled: boolean;

  static override styles = [
    controls,
    css`
      :host {
        display: block;
      }
      header {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 0.6em 1.2em;
        padding: 0.7em 0;
        border-bottom: 2px solid var(--ink);
      }
      .brand {
        display: flex;
        align-items: baseline;
        flex-wrap: wrap;
        gap: 0 0.6em;
        margin-right: auto;
        min-width: 0;
      }
      .word {
        font-family: var(--serif);
        font-size: 1.55em;
        font-weight: 700;
        letter-spacing: 0.01em;
      }
      .word span {
        color: var(--teal);
      }
      .kind {
        font-size: 0.85em;
        color: var(--muted);
        letter-spacing: 0.08em;
        text-transform: uppercase;
      }
      .source {
        font-size: 0.85em;
        color: var(--muted);
      }
      label.picker {
        display: flex;
        align-items: center;
        gap: 0.45em;
        font-size: 0.9em;
      }
      select {
        max-width: 15em;
      }
      .file {
        position: relative;
      }
      .file input {
        position: absolute;
        inset: 0;
        opacity: 0;
        width: 100%;
        cursor: pointer;
      }
      .file:focus-within label {
        outline: 3px solid var(--focus);
        outline-offset: 2px;
      }
      .file label {
        display: inline-block;
        border: 1.5px solid var(--ink);
        border-radius: 4px;
        padding: 0.3em 0.8em;
        font-size: 0.9em;
      }
      button[aria-pressed='true'] {
        background: var(--ink);
        color: var(--paper);
      }
    `,
  ];

  constructor() {
    super();
    this.presets = [];
    this.selected = '';
    this.sourceLabel = '';
    this.presenter = false;
    this.disabled = false;
  }

  private onPreset(event: Event) {
    const id = (event.target as HTMLSelectElement).value;
    if (id) emit(this, 'ff-preset', { id });
  }

  private async onFile(event: Event) {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    // Read at most one byte past the preset cap: enough for the parser to refuse a larger file by size.
    const text = await file.slice(0, LIMITS.fileBytes.max + 1).text();
    emit(this, 'ff-file', { name: file.name, text });
  }

  override render() {
    return html`<header>
      <div class="brand">
        <span class="word">Far<span>field</span></span>
        <span class="kind">experiment sheet</span>
        <span class="source" data-source>${this.sourceLabel}</span>
      </div>
      <label class="picker">
        Preset
        <select aria-label="Preset experiment" .value=${this.selected} ?disabled=${this.disabled} @change=${this.onPreset}>
          ${this.selected === '' ? html`<option value="" selected>— from a link or file —</option>` : null}
          ${this.presets.map(
            (p) =>
              html`<option value=${p.id} ?disabled=${!p.ok} ?selected=${p.id === this.selected} title=${p.ok ? p.spec.question : p.error}>
                ${p.id}${p.ok ? '' : ' (unreadable)'}
              </option>`,
          )}
        </select>
      </label>
      <div class="file">
        <label for="file">Open preset file…</label>
        <input id="file" type="file" accept=".json,application/json" aria-label="Open a preset file" ?disabled=${this.disabled} @change=${this.onFile} />
      </div>
      <button type="button" aria-pressed=${this.presenter ? 'true' : 'false'} @click=${() => emit(this, 'ff-presenter', null)}>Lecture layout</button>
    </header>`;
  }
}

customElements.define('ff-masthead', FfMasthead);

declare global {
  interface HTMLElementTagNameMap {
    'ff-masthead': FfMasthead;
  }
}
