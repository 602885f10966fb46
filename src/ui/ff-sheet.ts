/**
 * <ff-sheet>: Farfield's experiment sheet, read top to bottom like a lab
 * note: the question; the setup; the arms side by side; run and live
 * progress; the evidence; share and export. It renders the SheetController's
 * model and forwards its children's events to it. `data-state` on this
 * element is idle | running | done | cancelled.
 */
import { LitElement, css, html, nothing } from 'lit';
import { SheetController, type SheetModel } from './sheet-controller.ts';
import { armCards, problemFields, type ArmCardView } from './spec-draft.ts';
import { familyCatalogue, taskCatalogue } from './catalogue.ts';
import { progressView } from './progress-view.ts';
import { armColor } from './palette.ts';
import { problemsInWords } from './problem-words.ts';
import { LIMITS } from '../experiment/limits.ts';
import { controls, sectionHead, tokens } from './styles.ts';
import type { ResultsFormat } from './events.ts';
import './ff-masthead.ts';
import './ff-notice.ts';
import './ff-question.ts';
import './ff-setup.ts';
import './ff-arms.ts';
import './ff-run-controls.ts';
import './ff-run-options.ts';
import type { FfRunControls, RunBarView, PresetSwitch } from './ff-run-controls.ts';
import type { FfRunOptions } from './ff-run-options.ts';
import { DEFAULT_PRESET, FULL_PRESET } from './presets.ts';
import { duration } from './format.ts';
import './ff-progress.ts';
import './ff-evidence.ts';
import './ff-share.ts';

const TASKS = taskCatalogue();
const FAMILIES = familyCatalogue();
const NO_PROBLEMS: string[] = [];

/** The quick demo offers the full experiment and back, by name and rough length. */
function presetSwitch(m: SheetModel): PresetSwitch | null {
  if (m.source.kind !== 'preset' || m.edited) return null;
  if (m.source.id === DEFAULT_PRESET) return { id: FULL_PRESET, label: 'Open the full experiment (under two minutes)' };
  if (m.source.id === FULL_PRESET) return { id: DEFAULT_PRESET, label: 'Back to the quick demo (about ten seconds)' };
  return null;
}

function sourceLabel(m: SheetModel): string {
  const edited = m.edited ? ' · edited' : '';
  switch (m.source.kind) {
    case 'preset':
      return `${m.source.file}${edited}`;
    case 'link':
      return `${m.source.own ? 'this sheet’s address' : 'opened from a share link'}${edited}`;
    case 'file':
      return `file ${m.source.name}${edited}`;
  }
}

export class FfSheet extends LitElement {
  static override properties = {
    presenter: { type: Boolean, reflect: true },
  };
  declare presenter: boolean;

  private controller = new SheetController(this);
  /** Views derived from the draft, rebuilt only when the draft changes (progress ticks re-render the sheet often). */
  private derived: { draft: SheetModel['draft'] | null; validation: SheetModel['validation'] | null; cards: ArmCardView[]; invalid: Set<string>; problems: string[] } = {
    draft: null,
    validation: null,
    cards: [],
    invalid: new Set(),
    problems: NO_PROBLEMS,
  };

  static override styles = [
    tokens,
    controls,
    sectionHead,
    css`
      :host {
        display: block;
        font-size: 17px;
        line-height: 1.45;
        color: var(--ink);
        background: var(--paper);
        min-height: 100vh;
      }
      :host([presenter]) {
        font-size: 22px;
      }
      .page {
        max-width: 1320px;
        margin: 0 auto;
        padding: 0 1.6em 3em;
        display: flex;
        flex-direction: column;
      }
      @media (max-width: 640px) {
        .page {
          padding: 0 0.8em 2em;
        }
      }
      section.part {
        padding: 1.3em 0 1.4em;
        border-bottom: 1px solid var(--rule);
      }
      section.part:last-of-type {
        border-bottom: none;
      }
      .q {
        order: 1;
        padding-top: 1.6em;
      }
      .setup {
        order: 2;
      }
      .arms {
        order: 3;
      }
      .run {
        order: 4;
      }
      .evidence {
        order: 5;
      }
      .share {
        order: 6;
      }
      footer {
        order: 7;
      }
      .skip {
        position: absolute;
        left: 0.5em;
        top: 0.5em;
        z-index: 10;
        display: flex;
        gap: 0.5em;
      }
      .skip button {
        position: absolute;
        width: 1px;
        height: 1px;
        overflow: hidden;
        clip-path: inset(50%);
        white-space: nowrap;
        border: 0;
        padding: 0;
      }
      .skip button:focus {
        position: static;
        width: auto;
        height: auto;
        clip-path: none;
        padding: 0.3em 0.8em;
        background: var(--ink);
        color: var(--paper);
        border-radius: 3px;
      }
      .section-head {
        scroll-margin-top: 4.5em;
      }
      :host([presenter]) .evidence {
        order: 2;
      }
      :host([presenter]) .run {
        order: 3;
      }
      :host([presenter]) .arms {
        order: 4;
      }
      :host([presenter]) .setup {
        order: 5;
      }
      .banner {
        margin: 1em 0 0;
        padding: 0.6em 0.9em;
        border-left: 5px solid var(--teal);
        background: #dcebe6;
        border-radius: 0 4px 4px 0;
        font-size: 0.95em;
      }
      .banner.test-mode {
        border-left-color: var(--ochre);
        background: var(--ochre-soft);
      }
      .banner code {
        font-family: var(--mono);
      }
      footer {
        padding-top: 1.2em;
        font-size: 0.82em;
        color: var(--muted);
      }
    `,
  ];

  constructor() {
    super();
    this.presenter = false;
  }

  protected override willUpdate(): void {
    this.presenter = this.controller.model.presenter;
  }

  protected override updated(): void {
    const m = this.controller.model;
    this.dataset.state = m.run.state;
    this.dataset.ready = m.ready ? 'yes' : 'no';
  }

  private skipToRun(): void {
    this.renderRoot.querySelector<FfRunControls>('ff-run-controls')?.focusRun();
  }

  private skipToEvidence(): void {
    const head = this.renderRoot.querySelector<HTMLElement>('#h-evidence');
    head?.scrollIntoView({ block: 'start' });
    head?.focus();
  }

  override render() {
    const c = this.controller;
    const m = c.model;
    const running = m.run.state === 'running';
    const d = this.derived;
    if (d.draft !== m.draft || d.validation !== m.validation) {
      const problems = m.validation.ok ? NO_PROBLEMS : m.validation.problems;
      // Inputs are marked by the spec paths; the reader is told in the sheet's own labels.
      const words = problems.length ? problemsInWords(problems, m.draft.arms.map((a) => a.name)) : NO_PROBLEMS;
      this.derived = { draft: m.draft, validation: m.validation, cards: armCards(m.draft, armColor), invalid: problemFields(problems), problems: words };
    }
    const { cards, invalid, problems } = this.derived;
    const progress = progressView(m.run, Date.now());
    const missing = m.validation.ok ? c.missingCount() : 0;
    const fp = m.doc && m.doc.complete ? m.doc.fingerprint : '';
    const masthead = html`<ff-masthead
      .presets=${m.presets}
      selected=${m.source.kind === 'preset' ? m.source.id : ''}
      sourceLabel=${sourceLabel(m)}
      ?presenter=${m.presenter}
      ?disabled=${running}
      @ff-preset=${(e: CustomEvent<{ id: string }>) => c.choosePreset(e.detail.id)}
      @ff-file=${(e: CustomEvent<{ name: string; text: string }>) => c.loadFile(e.detail.name, e.detail.text)}
      @ff-presenter=${() => c.togglePresenter()}
    ></ff-masthead>`;

    const est = c.estimate();
    const bar: RunBarView = {
      state: m.run.state,
      ready: m.ready,
      total: m.run.tracks.length,
      missing,
      carried: m.run.keptCount + m.run.reusedCount,
      arms: progress.arms.length,
      seeds: progress.seeds.length,
      problems: problems.length,
      estimate: est && est.runs > 0 ? `≈ ${duration(est.wallSeconds)} on ${m.workers} worker${m.workers === 1 ? '' : 's'}` : '',
      done: progress.done,
      fraction: progress.fraction,
      timing: m.run.state === 'running' ? [progress.elapsed && `${progress.elapsed} elapsed`, progress.eta].filter(Boolean).join(' · ') : progress.elapsed ? `in ${progress.elapsed}` : '',
      switchTo: presetSwitch(m),
    };

    return html`<div class="page" @ff-edit=${(e: CustomEvent) => c.edit(e.detail)}>
      <div class="skip" role="navigation" aria-label="Skip links">
        <button type="button" data-skip="run" @click=${() => this.skipToRun()}>Skip to Run</button>
        <button type="button" data-skip="evidence" @click=${() => this.skipToEvidence()}>Skip to the evidence</button>
      </div>
      ${masthead}
      <ff-run-controls
        .view=${bar}
        @ff-run=${() => c.run()}
        @ff-again=${() => c.runAgain()}
        @ff-cancel=${() => c.cancel()}
        @ff-preset=${(e: CustomEvent<{ id: string }>) => c.choosePreset(e.detail.id)}
        @ff-show-problems=${() => this.renderRoot.querySelector<FfRunOptions>('ff-run-options')?.showProblems()}
      ></ff-run-controls>
      <ff-notice .notice=${m.notice} @ff-dismiss=${() => c.dismissNotice()}></ff-notice>
      ${m.faults.size || m.loadFault
        ? html`<p class="banner test-mode" data-fault-banner>
            Test mode (<code>?fault=</code> in the address):
            ${m.loadFault ? 'every run worker will throw while loading, before it is ready' : nothing}${m.loadFault && m.faults.size ? '; ' : nothing}
            ${m.faults.size
              ? `the workers of run${m.faults.size === 1 ? '' : 's'} ${[...m.faults.entries()].map(([run, how]) => `${run} (${how})`).join(', ')} will fail`
              : nothing}
            on purpose.
          </p>`
        : nothing}
      ${m.source.kind === 'link' && !m.source.own
        ? html`<p class="banner" data-link-banner>
            Opened from a share link: the whole experiment is below. Nothing runs until you press <strong>Run</strong>.
            ${m.fingerprintCheck ? html`The link carries results fingerprint <code>${m.fingerprintCheck.expected}</code>.` : nothing}
          </p>`
        : nothing}

      <section class="part q" aria-label="The question and what is expected">
        <ff-question question=${m.draft.question} expectation=${m.draft.expectation} ?disabled=${running} ?invalid=${invalid.has('question')}></ff-question>
      </section>

      <section class="part setup" aria-labelledby="h-setup">
        <h2 class="section-head" id="h-setup"><span class="mark">§1</span> Setup</h2>
        <ff-setup .draft=${m.draft} .tasks=${TASKS} .families=${FAMILIES} .invalid=${invalid} ?disabled=${running}></ff-setup>
      </section>

      <section class="part arms" aria-labelledby="h-arms">
        <h2 class="section-head" id="h-arms">
          <span class="mark">§2</span> Arms <span class="aside">side by side; switches that differ between arms are marked ≠ — that is what this experiment tests.</span>
        </h2>
        <ff-arms .arms=${cards} .invalid=${invalid} ?disabled=${running} .maxArms=${LIMITS.arms.max}></ff-arms>
      </section>

      <section class="part run" aria-labelledby="h-run">
        <h2 class="section-head" id="h-run"><span class="mark">§3</span> Run <span class="aside">in web workers on this machine; nothing leaves the page.</span></h2>
        <ff-run-options
          state=${m.run.state}
          .problems=${problems}
          .kept=${m.run.keptCount}
          .reused=${m.run.reusedCount}
          .workers=${m.workers}
          .maxWorkers=${m.maxWorkers}
          .engine=${m.run.engine}
          .storageNote=${m.run.storageNote}
          @ff-forget=${() => void c.forgetKept()}
          @ff-workers=${(e: CustomEvent<{ count: number }>) => c.setWorkers(e.detail.count)}
        ></ff-run-options>
        <ff-progress .view=${progress} state=${m.run.state}></ff-progress>
      </section>

      <section class="part evidence" aria-labelledby="h-evidence">
        <h2 class="section-head" id="h-evidence" tabindex="-1"><span class="mark">§4</span> Evidence</h2>
        <ff-evidence
          id="results"
          data-fingerprint=${fp || nothing}
          data-complete=${m.doc?.complete ? 'yes' : 'no'}
          .evidence=${m.evidence}
          ?presenter=${m.presenter}
          @ff-export-figure=${(e: CustomEvent<{ name: string; format: 'svg' | 'png'; svg: SVGSVGElement }>) => void c.exportFigure(e.detail.name, e.detail.format, e.detail.svg)}
        ></ff-evidence>
      </section>

      <section class="part share" aria-labelledby="h-share">
        <h2 class="section-head" id="h-share"><span class="mark">§5</span> Share and export</h2>
        <ff-share
          .share=${m.share}
          fingerprint=${fp}
          specHash=${m.doc?.specHash ?? ''}
          .check=${m.fingerprintCheck}
          ?hasResults=${Boolean(m.doc)}
          ?edited=${m.edited}
          @ff-copy-link=${() => void c.copyShareLink()}
          @ff-export-results=${(e: CustomEvent<{ format: ResultsFormat }>) => void c.exportResults(e.detail.format)}
          .networks=${c.networkChoices()}
          @ff-download-network=${(e: CustomEvent<{ index: number }>) => c.downloadNetwork(e.detail.index)}
        ></ff-share>
      </section>
      <footer>
        Farfield runs every experiment in this browser on the tfjs WASM backend — the same engine, the same numbers as <code>npx farfield run</code>.
        ${m.run.persistent
          ? 'Finished runs are kept in this browser (IndexedDB) until you forget them.'
          : 'This browser does not let the page keep runs between visits: finished runs last until the tab closes.'}
      </footer>
    </div>`;
  }
}

customElements.define('ff-sheet', FfSheet);

declare global {
  interface HTMLElementTagNameMap {
    'ff-sheet': FfSheet;
  }
}
