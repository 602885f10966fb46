/**
 * <ff-graph-files>: graph files scored as extra rungs. Files are dropped on
 * the zone or picked, read and checked here (the readers name file and line
 * on refusal), hashed with SHA-256, and kept in this page only; the spec
 * records each file's name and hash ('ff-edit' on test.files). A spec from a
 * share link lists files this page does not hold yet: each asks for its file,
 * and a file whose hash differs is refused with both hashes.
 */
import { LitElement, css, html, nothing } from 'lit';
import type { ExperimentSpec, GraphFileSpec } from '../experiment/spec.ts';
import { contentHash, readGraphFile } from '../graphs/files/read.ts';
import { GRAPH_FILE_LIMITS } from '../graphs/files/caps.ts';
import { checkFile } from '../tasks/file-instance.ts';
import { getTask } from '../tasks/registry.ts';
import { controls } from './styles.ts';
import { emit } from './events.ts';
import { hasGraphFile, onGraphFiles, provideGraphFile, shippedGraphFile } from './graph-file-store.ts';

const ACCEPT = '.csv,.tsv,.txt,.edges,.gr,.dimacs,.graphml,.gexf';

interface Note {
  kind: 'ok' | 'error';
  text: string;
}

export class FfGraphFiles extends LitElement {
  static override properties = {
    files: { attribute: false },
    task: { attribute: false },
    disabled: { type: Boolean },
    notes: { state: true },
    over: { state: true },
  };
  declare files: GraphFileSpec[] | undefined;
  declare task: ExperimentSpec['task'];
  declare disabled: boolean;
  declare notes: Note[];
  declare over: boolean;
  private unsubscribe: (() => void) | null = null;

  constructor() {
    super();
    this.notes = [];
    this.over = false;
    this.disabled = false;
  }

  static override styles = [
    controls,
    css`
      :host {
        display: block;
        line-height: 1.6;
      }
      .zone {
        border: 1.5px dashed var(--rule);
        border-radius: 6px;
        padding: 0.45em 0.7em;
        background: var(--field);
      }
      .zone.over {
        border-color: var(--teal);
        background: var(--card);
      }
      ul {
        margin: 0.2em 0;
        padding-left: 1.1em;
      }
      .hash,
      code {
        font-family: var(--mono);
        font-size: 0.88em;
      }
      .missing {
        color: var(--ochre);
      }
      .error {
        color: var(--danger);
      }
      .ok {
        color: var(--ok);
      }
      .gloss {
        color: var(--muted);
        font-size: 0.9em;
      }
      input.source {
        width: 7em;
      }
      /* The file picker's own width must not push a 360 px page sideways. */
      input[type='file'] {
        max-width: 100%;
      }
    `,
  ];

  override connectedCallback(): void {
    super.connectedCallback();
    this.unsubscribe = onGraphFiles(() => this.requestUpdate());
  }

  override disconnectedCallback(): void {
    this.unsubscribe?.();
    this.unsubscribe = null;
    super.disconnectedCallback();
  }

  override updated(changed: Map<string, unknown>): void {
    if (changed.has('files')) void this.provideShipped();
  }

  /**
   * Files the page does not hold whose base name is a shipped example graph:
   * provide it, and record its hash where the spec has none (as the CLI does),
   * or refuse it where the spec records another hash.
   */
  private async provideShipped(): Promise<void> {
    const files = this.files ?? [];
    let next = files;
    for (const [i, f] of files.entries()) {
      if (hasGraphFile(f.sha256)) continue;
      const bytes = await shippedGraphFile(f.name);
      if (!bytes) continue;
      const sha256 = await contentHash(bytes);
      if (f.sha256 && f.sha256 !== sha256) continue;
      provideGraphFile(sha256, bytes);
      if (!f.sha256) next = next.map((g, j) => (j === i ? { ...g, sha256 } : g));
    }
    if (next !== files && this.files === files) this.setFiles(next);
  }

  private setFiles(files: GraphFileSpec[]): void {
    emit(this, 'ff-edit', { kind: 'field', path: ['test', 'files'], value: files.length ? files : undefined });
  }

  /** Read, check and keep one file; returns what to tell the user. */
  private async take(file: File): Promise<Note> {
    const name = file.name;
    const cap = Math.max(GRAPH_FILE_LIMITS.graphFileBytes.max, GRAPH_FILE_LIMITS.graphFileXmlBytes.max);
    if (file.size > cap) return { kind: 'error', text: `${name}: ${file.size} bytes; allowed at most ${cap} bytes` };
    const bytes = new Uint8Array(await file.arrayBuffer());
    const sha256 = await contentHash(bytes);
    const files = this.files ?? [];
    const named = files.findIndex((f) => f.name.replace(/^.*[\\/]/, '') === name);
    const entry: GraphFileSpec = named >= 0 ? files[named]! : { name };
    if (entry.sha256 && entry.sha256 !== sha256) {
      return {
        kind: 'error',
        text: `${name} does not match the file this experiment names: it records sha256 ${entry.sha256.slice(0, 12)}…, this file is ${sha256.slice(0, 12)}… (a different or edited file)`,
      };
    }
    try {
      const graph = readGraphFile({ name, format: entry.format, weight: entry.weight, directed: entry.directed }, bytes);
      // Checked, not solved: solving a graph at the caps takes seconds, and the workers solve it anyway.
      const { source, reachable } = checkFile(getTask(this.task), graph, { source: entry.source });
      provideGraphFile(sha256, bytes);
      const next = named >= 0 ? files.map((f, i) => (i === named ? { ...f, sha256 } : f)) : [...files, { ...entry, sha256 }];
      if (named < 0 || !files[named]!.sha256) this.setFiles(next);
      const reach = source === undefined ? '' : `; ${reachable} reachable from source '${graph.ids[source]}'`;
      return { kind: 'ok', text: `${name}: ${graph.ids.length} nodes, ${graph.src.length} edges${reach}. Kept in this page only.` };
    } catch (error) {
      return { kind: 'error', text: error instanceof Error ? error.message : String(error) };
    }
  }

  private async takeAll(list: FileList | null): Promise<void> {
    if (!list || this.disabled) return;
    const notes: Note[] = [];
    for (const file of Array.from(list)) notes.push(await this.take(file));
    this.notes = notes;
  }

  private onDrop(event: DragEvent): void {
    event.preventDefault();
    this.over = false;
    void this.takeAll(event.dataTransfer?.files ?? null);
  }

  private onDragOver(event: DragEvent): void {
    event.preventDefault();
    this.over = true;
  }

  override render() {
    const files = this.files ?? [];
    return html`<div
      class="zone ${this.over ? 'over' : ''}"
      data-testid="graph-drop"
      @dragover=${(e: DragEvent) => this.onDragOver(e)}
      @dragleave=${() => (this.over = false)}
      @drop=${(e: DragEvent) => this.onDrop(e)}
    >
      ${files.length
        ? html`<ul>
            ${files.map(
              (f, i) => html`<li data-file=${f.name}>
                <code>${f.name}</code>
                ${f.sha256 ? html`<span class="hash">sha256 ${f.sha256.slice(0, 12)}…</span>` : nothing}
                ${hasGraphFile(f.sha256)
                  ? html`<span class="ok">ready</span>`
                  : html`<span class="missing">missing: drop or pick ${f.name.replace(/^.*[\\/]/, '')}</span>`}
                · source
                <input
                  class="source"
                  aria-label=${`Source node in ${f.name}`}
                  .value=${f.source ?? ''}
                  placeholder="first node"
                  ?disabled=${this.disabled}
                  @change=${(e: Event) => {
                    const v = (e.target as HTMLInputElement).value.trim();
                    this.setFiles(files.map((g, j) => (j === i ? { ...g, source: v || undefined } : g)));
                  }}
                />
                <button type="button" ?disabled=${this.disabled} aria-label=${`Remove ${f.name}`} @click=${() => this.setFiles(files.filter((_, j) => j !== i))}>remove</button>
              </li>`,
            )}
          </ul>`
        : nothing}
      <label
        >Drop graph files here or
        <input type="file" multiple accept=${ACCEPT} aria-label="Pick graph files" ?disabled=${this.disabled} @change=${(e: Event) => void this.takeAll((e.target as HTMLInputElement).files)}
      /></label>
      <span class="gloss"
        >Edge list (CSV/TSV with a header), DIMACS <code>.gr</code>, GraphML or GEXF; each becomes one more rung in every figure. Files stay in this browser: they
        are never uploaded, and a share link carries only their names and SHA-256 hashes.</span
      >
      ${this.notes.map((n) => html`<div class=${n.kind} role=${n.kind === 'error' ? 'alert' : 'status'}>${n.text}</div>`)}
    </div>`;
  }
}

customElements.define('ff-graph-files', FfGraphFiles);

declare global {
  interface HTMLElementTagNameMap {
    'ff-graph-files': FfGraphFiles;
  }
}
