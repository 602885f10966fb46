/**
 * The sheet's state and everything it does: which spec is on the sheet and
 * where it came from (preset, share link, file, edits), its validation, the
 * runs (through RunController), the evidence derived from the results, the
 * share link and the exports. A lit ReactiveController: the sheet element
 * renders `model` and forwards its children's events here; the controller
 * starts its workers with the sheet and terminates them when it goes away.
 */
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { ExperimentSpec } from '../experiment/spec.ts';
import { buildResults, ENGINE_VERSION, specHash, type ResultsDocument } from '../experiment/results.ts';
import { decodeSpecLink, encodeSpecLink, LinkError } from '../share/link.ts';
import { parsePresetText, PresetError } from '../share/preset-file.ts';
import { applyEdit, sameSpec, validateDraft, type Draft, type SpecEdit, type Validation } from './spec-draft.ts';
import { DEFAULT_PRESET, loadPresets, type PresetEntry } from './presets.ts';
import { RunController, type RunSnapshot } from './run-controller.ts';
import { estimateCost, type CostEstimate } from '../experiment/cost.ts';
import { armNamesOf, problemsInWords } from './problem-words.ts';
import { openRunStore, memoryRunStore, type RunStore } from './run-store.ts';
import { wrapWebWorker, type FaultKind, type PoolWorker } from './worker-pool.ts';
import { buildEvidence, type EvidenceView } from './evidence.ts';
import { download, resultsCsv, resultsJson, svgToPng, svgText } from './export.ts';
import { wasmPaths } from './wasm-paths.ts';
import { LOAD_FAULT_WORKER_NAME } from '../../workers/protocol.ts';
import type { ResultsFormat } from './events.ts';
import { savedNetworkFiles } from '../experiment/saved-network.ts';

export type SheetSource =
  | { kind: 'preset'; id: string; file: string }
  | { kind: 'link'; own: boolean }
  | { kind: 'file'; name: string };

/** A refusal shown in the error panel (a bad link or file), with the sheet still usable underneath. */
export interface SheetNotice {
  title: string;
  message: string;
  problems: string[];
  hint: string;
}

export interface ShareState {
  link: string | null;
  error: string | null;
  status: string | null;
}

export interface FingerprintCheck {
  /** The fingerprint the opened link carried. */
  expected: string;
  /** 'pending' until every run is in; 'stale' when the spec was edited after opening the link. */
  verdict: 'pending' | 'match' | 'differ' | 'stale';
}

/** A run whose trained network the sheet can offer for download. */
export interface NetworkChoice {
  index: number;
  label: string;
}

export interface SheetModel {
  ready: boolean;
  presets: PresetEntry[];
  source: SheetSource;
  /** The draft differs from where it came from. */
  edited: boolean;
  draft: Draft;
  validation: Validation;
  notice: SheetNotice | null;
  run: RunSnapshot;
  doc: ResultsDocument | null;
  evidence: EvidenceView | null;
  share: ShareState;
  fingerprintCheck: FingerprintCheck | null;
  presenter: boolean;
  workers: number;
  maxWorkers: number;
  faults: ReadonlyMap<number, FaultKind>;
  /** Test mode `?fault=load`: every run worker throws while loading. */
  loadFault: boolean;
}

/** `?fault=1:throw,3:exit` → run 1's worker throws, run 3's worker dies (tests of failure handling). */
export function parseFaults(search: string): Map<number, FaultKind> {
  const faults = new Map<number, FaultKind>();
  const value = new URLSearchParams(search).get('fault');
  if (!value) return faults;
  for (const part of value.split(',')) {
    const m = /^(\d+):(throw|exit)$/.exec(part.trim());
    if (m) faults.set(Number(m[1]), m[2] as FaultKind);
  }
  return faults;
}

/**
 * `?fault=load` (alone or with run faults, `?fault=load,1:throw`) → every run
 * worker throws while loading, so the pool's give-up rule can be tested in a
 * real browser. Read from the query only: a share link lives after '#'.
 */
export function parseLoadFault(search: string): boolean {
  const value = new URLSearchParams(search).get('fault');
  return value ? value.split(',').some((part) => part.trim() === 'load') : false;
}

function pageBase(): string {
  return `${location.origin}${location.pathname}`;
}

function createBrowserWorker(loadFault: boolean): PoolWorker {
  const name = loadFault ? LOAD_FAULT_WORKER_NAME : 'farfield-run';
  return wrapWebWorker(new Worker(new URL('../../workers/browser-worker.ts', import.meta.url), { type: 'module', name }));
}

const EDIT_SETTLE_MS = 200;
const EVIDENCE_EVERY_MS = 2000;
const PROGRESS_EVERY_MS = 400;

export class SheetController implements ReactiveController {
  model: SheetModel;
  private runs: RunController;
  private origin: ExperimentSpec;
  private linkFingerprint: string | null = null;
  private docFor: RunSnapshot['results'] | null = null;
  private showTimer: ReturnType<typeof setTimeout> | null = null;
  private ticker: ReturnType<typeof setInterval> | null = null;
  private shareToken = 0;
  private evidenceAt = 0;
  private progressAt = 0;
  private progressTimer: ReturnType<typeof setTimeout> | null = null;
  private evidenceTimer: ReturnType<typeof setTimeout> | null = null;
  private readonly onHashChange = () => void this.openFromAddress();
  private readonly faults = parseFaults(location.search);
  private readonly loadFault = parseLoadFault(location.search);

  constructor(private readonly host: ReactiveControllerHost) {
    host.addController(this);
    const presets = loadPresets();
    const fallback = presets.find((p) => p.ok && p.id === DEFAULT_PRESET) ?? presets.find((p) => p.ok);
    if (!fallback || !fallback.ok) throw new Error('ui/sheet-controller: no preset could be loaded');
    this.origin = fallback.spec;
    const maxWorkers = Math.max(1, Math.min(16, navigator.hardwareConcurrency || 2));
    this.runs = this.makeRuns(memoryRunStore());
    this.model = {
      ready: false,
      presets,
      source: { kind: 'preset', id: fallback.id, file: fallback.file },
      edited: false,
      draft: fallback.spec,
      validation: validateDraft(fallback.spec),
      notice: null,
      run: this.runs.snapshot,
      doc: null,
      evidence: null,
      share: { link: null, error: null, status: null },
      fingerprintCheck: null,
      presenter: false,
      workers: maxWorkers,
      maxWorkers,
      faults: this.faults,
      loadFault: this.loadFault,
    };
  }

  private makeRuns(store: RunStore): RunController {
    return new RunController({
      createWorker: () => createBrowserWorker(this.loadFault),
      init: { type: 'init', backend: 'wasm', threads: 1, wasmPaths: wasmPaths() },
      store,
      faults: this.faults,
      onChange: () => this.onRunsChanged(),
    });
  }

  hostConnected(): void {
    window.addEventListener('hashchange', this.onHashChange);
    void this.start();
  }

  hostDisconnected(): void {
    window.removeEventListener('hashchange', this.onHashChange);
    this.runs.dispose();
    this.stopTicker();
    if (this.showTimer) clearTimeout(this.showTimer);
    if (this.evidenceTimer) clearTimeout(this.evidenceTimer);
    if (this.progressTimer) clearTimeout(this.progressTimer);
  }

  private async start(): Promise<void> {
    const store = await openRunStore();
    this.runs.dispose();
    this.runs = this.makeRuns(store);
    await this.openFromAddress();
    this.set({ ready: true });
  }

  private set(patch: Partial<SheetModel>): void {
    this.model = { ...this.model, ...patch };
    this.host.requestUpdate();
  }

  /**
   * Progress-only changes arrive several times a second per worker; redraw
   * them at most every PROGRESS_EVERY_MS so the page stays responsive.
   */
  private setProgress(patch: Partial<SheetModel>): void {
    this.model = { ...this.model, ...patch };
    if (this.progressTimer) return;
    const wait = Math.max(0, PROGRESS_EVERY_MS - (Date.now() - this.progressAt));
    this.progressTimer = setTimeout(() => {
      this.progressTimer = null;
      this.progressAt = Date.now();
      this.host.requestUpdate();
    }, wait);
  }

  // ---------------------------------------------------------------- sources

  /** Read the spec from the address: a share link after '#', or the default preset. */
  private async openFromAddress(): Promise<void> {
    const hash = location.hash;
    if (hash.length > 1) {
      try {
        const { spec, fingerprint } = await decodeSpecLink(hash);
        const own = (history.state as { farfieldOwn?: boolean } | null)?.farfieldOwn === true;
        this.linkFingerprint = fingerprint ?? null;
        // The sheet's own address after a reload: name the preset it holds, if it is one.
        const preset = own ? this.model.presets.find((p) => p.ok && sameSpec(p.spec, spec)) : undefined;
        if (preset && preset.ok) this.load(spec, { kind: 'preset', id: preset.id, file: preset.file }, null);
        else this.load(spec, { kind: 'link', own }, null);
        return;
      } catch (error) {
        this.linkFingerprint = null;
        const notice = linkNotice(error);
        const preset = this.defaultPreset();
        this.load(preset.spec, { kind: 'preset', id: preset.id, file: preset.file }, notice);
        return;
      }
    }
    this.linkFingerprint = null;
    const preset = this.defaultPreset();
    this.load(preset.spec, { kind: 'preset', id: preset.id, file: preset.file }, null);
  }

  private defaultPreset(): Extract<PresetEntry, { ok: true }> {
    const entry = this.model.presets.find((p) => p.ok && p.id === DEFAULT_PRESET) ?? this.model.presets.find((p) => p.ok);
    return entry as Extract<PresetEntry, { ok: true }>;
  }

  private load(spec: ExperimentSpec, source: SheetSource, notice: SheetNotice | null): void {
    this.origin = spec;
    this.set({
      source,
      draft: spec,
      edited: false,
      validation: validateDraft(spec),
      notice,
      fingerprintCheck: this.linkFingerprint && source.kind === 'link' ? { expected: this.linkFingerprint, verdict: 'pending' } : null,
    });
    this.showDraft(0);
  }

  choosePreset(id: string): void {
    if (this.runs.running) return;
    const entry = this.model.presets.find((p) => p.id === id);
    if (!entry || !entry.ok) return;
    this.linkFingerprint = null;
    history.replaceState(null, '', `${location.pathname}${location.search}`);
    this.load(entry.spec, { kind: 'preset', id: entry.id, file: entry.file }, null);
  }

  loadFile(name: string, text: string): void {
    if (this.runs.running) return;
    try {
      const spec = parsePresetText(text, name);
      this.linkFingerprint = null;
      history.replaceState(null, '', `${location.pathname}${location.search}`);
      this.load(spec, { kind: 'file', name }, null);
    } catch (error) {
      // Each problem once, in the sheet's own words; the message only counts them when they are listed below.
      const problems = error instanceof PresetError ? problemsInWords(error.problems, armNamesOf(text)) : [];
      const message = problems.length > 1 ? `${problems.length} problems in this file:` : problems.length === 1 ? problems[0]! : error instanceof Error ? error.message : String(error);
      this.set({
        notice: {
          title: `Could not open ${name}`,
          message,
          problems,
          hint: 'The sheet below is unchanged.',
        },
      });
    }
  }

  dismissNotice(): void {
    this.set({ notice: null });
  }

  // ---------------------------------------------------------------- editing

  edit(edit: SpecEdit): void {
    if (this.runs.running) return;
    const draft = applyEdit(this.model.draft, edit);
    const validation = validateDraft(draft);
    const edited = !(validation.ok && sameSpec(validation.spec, this.origin));
    const check = this.model.fingerprintCheck;
    this.set({
      draft,
      validation,
      edited,
      fingerprintCheck: check ? { ...check, verdict: edited ? 'stale' : 'pending' } : null,
    });
    this.showDraft(EDIT_SETTLE_MS);
  }

  /** Point the runs at the current draft (after edits settle), so kept runs of that spec show up. */
  private showDraft(delay: number): void {
    if (this.showTimer) clearTimeout(this.showTimer);
    const go = () => {
      this.showTimer = null;
      const v = this.model.validation;
      const spec = v.ok ? v.spec : null;
      if (spec && this.model.run.specHash === specHash(spec)) return;
      void this.runs.show(spec);
      void this.refreshShareLink();
    };
    if (delay === 0) go();
    else this.showTimer = setTimeout(go, delay);
  }

  // ---------------------------------------------------------------- running

  /** Runs of the sheet's spec that still need running (none kept, or failed last time). */
  missingCount(): number {
    return this.runs.missing().length;
  }

  /** About how long the missing runs take on the chosen workers (the cost model of experiment/cost.ts). */
  estimate(): CostEstimate | null {
    const v = this.model.validation;
    if (!v.ok || this.model.run.specHash !== specHash(v.spec)) return null;
    // Only complete runs say how long a run takes (a diverged or failed one stopped early).
    const observed = this.model.run.results.filter((r) => r.status === 'ok').map((r) => ({ armIndex: r.armIndex, seconds: r.seconds }));
    return estimateCost(v.spec, this.runs.missing().map((p) => p.armIndex), this.model.workers, observed);
  }

  setWorkers(count: number): void {
    if (Number.isInteger(count) && count >= 1 && count <= this.model.maxWorkers) this.set({ workers: count });
  }

  run(): void {
    const v = this.model.validation;
    if (!v.ok || this.runs.running) return;
    if (this.showTimer) {
      clearTimeout(this.showTimer);
      this.showTimer = null;
    }
    const go = async () => {
      if (this.model.run.specHash !== specHash(v.spec)) await this.runs.show(v.spec);
      this.rememberInAddress(v.spec);
      this.runs.start(this.model.workers);
    };
    void go();
  }

  /** Run every run of the sheet's spec afresh (nothing missing: the reader wants to see it again). */
  runAgain(): void {
    const v = this.model.validation;
    if (!v.ok || this.runs.running || this.model.run.specHash !== specHash(v.spec)) return;
    this.rememberInAddress(v.spec);
    void this.runs.again(this.model.workers);
  }

  cancel(): void {
    this.runs.cancel();
  }

  async forgetKept(): Promise<void> {
    await this.runs.forget();
  }

  /**
   * Put the spec in the address (as its share link, without a fingerprint),
   * so a reload comes back to this sheet and its kept runs. A link the page
   * was opened with stays untouched when it is still what is on the sheet.
   */
  private rememberInAddress(spec: ExperimentSpec): void {
    if (this.model.source.kind === 'link' && !this.model.edited) return;
    void encodeSpecLink(spec, { base: pageBase() })
      .then((link) => {
        const hash = link.slice(link.indexOf('#'));
        history.replaceState({ farfieldOwn: true }, '', `${location.pathname}${location.search}${hash}`);
      })
      .catch(() => undefined);
  }

  private onRunsChanged(): void {
    const run = this.runs.snapshot;
    const patch: Partial<SheetModel> = { run };
    // While runs finish one after another, redraw the evidence at most every EVIDENCE_EVERY_MS.
    const due = run.state !== 'running' || Date.now() - this.evidenceAt >= EVIDENCE_EVERY_MS;
    if (run.results !== this.docFor && !due) {
      this.evidenceTimer ??= setTimeout(() => {
        this.evidenceTimer = null;
        this.onRunsChanged();
      }, EVIDENCE_EVERY_MS);
    }
    if (run.results !== this.docFor && due) {
      this.evidenceAt = Date.now();
      if (this.evidenceTimer) clearTimeout(this.evidenceTimer);
      this.evidenceTimer = null;
      this.docFor = run.results;
      const v = this.model.validation;
      if (run.results.length > 0 && v.ok && specHash(v.spec) === run.specHash) {
        const engine = run.engine ?? { backend: 'wasm', threads: 1 };
        const doc = buildResults(v.spec, run.results, { name: 'farfield', version: ENGINE_VERSION, backend: engine.backend, threads: engine.threads, host: 'browser' });
        patch.doc = doc;
        patch.evidence = buildEvidence(doc);
      } else {
        patch.doc = null;
        patch.evidence = null;
      }
      const check = this.model.fingerprintCheck;
      if (check && check.verdict !== 'stale') {
        const doc = patch.doc;
        patch.fingerprintCheck = { ...check, verdict: doc && doc.complete ? (doc.fingerprint === check.expected ? 'match' : 'differ') : 'pending' };
      }
    }
    const progressOnly = Object.keys(patch).length === 1 && run.state === 'running' && this.model.run.state === 'running' && run.results === this.model.run.results;
    if (progressOnly) this.setProgress(patch);
    else this.set(patch);
    if (run.state === 'running') this.startTicker();
    else this.stopTicker();
    if (patch.doc !== undefined) void this.refreshShareLink();
  }

  private startTicker(): void {
    this.ticker ??= setInterval(() => this.host.requestUpdate(), 1000);
  }

  private stopTicker(): void {
    if (this.ticker) clearInterval(this.ticker);
    this.ticker = null;
  }

  // ---------------------------------------------------------------- sharing and export

  private async refreshShareLink(): Promise<void> {
    const token = ++this.shareToken;
    const v = this.model.validation;
    if (!v.ok) {
      this.set({ share: { link: null, error: 'Fix the problems in the setup to get a share link.', status: null } });
      return;
    }
    const doc = this.model.doc;
    const fingerprint = doc && doc.complete && doc.specHash === specHash(v.spec) ? doc.fingerprint : undefined;
    try {
      const link = await encodeSpecLink(v.spec, { base: pageBase(), ...(fingerprint ? { fingerprint } : {}) });
      if (token === this.shareToken) this.set({ share: { link, error: null, status: null } });
    } catch (error) {
      if (token === this.shareToken) this.set({ share: { link: null, error: error instanceof Error ? error.message : String(error), status: null } });
    }
  }

  async copyShareLink(): Promise<void> {
    await this.refreshShareLink();
    const link = this.model.share.link;
    if (!link) return;
    try {
      await navigator.clipboard.writeText(link);
      this.set({ share: { ...this.model.share, status: 'Copied to the clipboard.' } });
    } catch {
      this.set({ share: { ...this.model.share, status: 'The clipboard is not available here: select the link below and copy it.' } });
    }
  }

  /** Finished runs of this visit whose trained network can be downloaded. */
  networkChoices(): NetworkChoice[] {
    const doc = this.model.doc;
    if (!doc) return [];
    return doc.runs.filter((r) => r.status === 'ok' && this.runs.trainedWeights(doc.spec, r)).map((r) => ({ index: r.index, label: `${r.arm}, seed ${r.seed}` }));
  }

  /** The run's trained network in TensorFlow.js's weights format: the JSON manifest (with spec, arm, seed), then its shard. */
  downloadNetwork(index: number): void {
    const doc = this.model.doc;
    const run = doc?.runs.find((r) => r.index === index);
    const weights = doc && run ? this.runs.trainedWeights(doc.spec, run) : undefined;
    if (!doc || !run || !weights) return;
    const { json, shard } = savedNetworkFiles(doc.spec, run, weights, ENGINE_VERSION);
    download(json.name, json.text, 'application/json');
    download(shard.name, new Blob([shard.bytes as Uint8Array<ArrayBuffer>], { type: 'application/octet-stream' }));
  }

  async exportResults(format: ResultsFormat): Promise<void> {
    if (format === 'json') this.exportJson();
    else if (format === 'csv') this.exportCsv();
    else await this.exportReport();
  }

  /** The standalone report (src/report/), loaded on first use so the sheet's start stays light. */
  async exportReport(): Promise<void> {
    const doc = this.model.doc;
    if (!doc) return;
    const { buildReport } = await import('../report/report.ts');
    const html = await buildReport(doc, { document, linkBase: pageBase() });
    download(`farfield-${doc.specHash}-report.html`, html, 'text/html');
  }

  exportJson(): void {
    const doc = this.model.doc;
    if (doc) download(`farfield-${doc.specHash}-results.json`, resultsJson(doc), 'application/json');
  }

  exportCsv(): void {
    const doc = this.model.doc;
    if (doc) download(`farfield-${doc.specHash}-results.csv`, resultsCsv(doc), 'text/csv');
  }

  async exportFigure(name: string, format: 'svg' | 'png', svg: SVGSVGElement): Promise<void> {
    const base = `farfield-${this.model.doc?.specHash ?? 'sheet'}-${name}`;
    if (format === 'svg') download(`${base}.svg`, svgText(svg), 'image/svg+xml');
    else download(`${base}.png`, await svgToPng(svg, 2));
  }

  togglePresenter(): void {
    this.set({ presenter: !this.model.presenter });
  }
}

function linkNotice(error: unknown): SheetNotice {
  if (error instanceof LinkError) {
    const problems = problemsInWords(error.problems, []);
    return {
      title: 'This share link could not be opened',
      message: problems.length > 1 ? `${problems.length} problems in this link:` : problems.length === 1 ? problems[0]! : error.message,
      problems,
      hint: 'It was probably cut short or changed on the way. The default experiment is shown below instead; ask the sender for the link again, or for the preset file.',
    };
  }
  return {
    title: 'This share link could not be opened',
    message: error instanceof Error ? error.message : String(error),
    problems: [],
    hint: 'The default experiment is shown below instead.',
  };
}
