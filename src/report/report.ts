/**
 * The standalone report: one self-contained HTML file laid out as an
 * experiment sheet — the question, the arms side by side, the setup, then the
 * evidence (figures, verdicts with their caveats, baselines, fit gate) and how
 * to reproduce it (fingerprint, spec hash, share link, the whole spec).
 *
 * Host-agnostic: the CLI passes a light DOM's document, the sheet its own;
 * figures are drawn by the sheet's own figure code (src/ui/figure-list.ts) and
 * inlined as SVG. Every sentence about the statistics comes from
 * src/ui/evidence.ts; this module only lays them out.
 *
 * Offline by construction: no script, no external stylesheet, font or image,
 * and a Content-Security-Policy that forbids loading anything, so the file
 * reads the same from a laptop, an e-mail attachment or a printer. Untrusted
 * text (question, arm names, notes, failure reasons) is escaped; the share
 * link is shown as text, not as a link, so nothing in the file points at a
 * server.
 */
import type { ResultsDocument } from '../experiment/results.ts';
import { armModel, type ExperimentSpec } from '../experiment/spec.ts';
import { DEFAULT_LINK_BASE, encodeSpecLink } from '../share/link.ts';
import { AUTO_LOG_DECADES, blownUpLabel, buildEvidence, type EvidenceView, type GateRow, type VerdictRow } from '../ui/evidence.ts';
import { autoLogReason, describeFigure, evidenceFigures } from '../ui/figure-list.ts';
import { num, percent, pValue } from '../ui/format.ts';
import { armLetter } from '../ui/palette.ts';
import { canonicalJson } from '../util/hash.ts';
import { taskLabel } from '../tasks/registry.ts';
import { REPORT_CSS } from './report-style.ts';

export interface ReportOptions {
  /** The document figures are drawn into (the page's, or a light DOM's in Node). */
  document: Document;
  /** Page the share link opens (default DEFAULT_LINK_BASE). */
  linkBase?: string;
  /** Width of every figure in CSS pixels; 720 fits an A4 page's text column. */
  figureWidth?: number;
  /** The fingerprint is the one the file recorded and could not be recomputed (see results-file.ts). */
  fingerprintUnverified?: boolean;
}

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text made safe for HTML content and attribute values. */
export function esc(text: string | number): string {
  return String(text).replace(/[&<>"']/g, (c) => ESCAPES[c]!);
}

function section(id: string, mark: string, title: string, body: string): string {
  return `<section id="${id}" aria-labelledby="${id}-h"><h2 id="${id}-h"><span class="mark">${mark}</span>${esc(title)}</h2>${body}</section>`;
}

/** A value of the spec in words: arrays joined, objects as "key value" pairs. */
function specValue(value: unknown): string {
  if (Array.isArray(value)) return value.map(specValue).join(', ');
  if (value && typeof value === 'object') {
    return Object.entries(value as Record<string, unknown>)
      .map(([k, v]) => `${k} ${specValue(v)}`)
      .join(' · ');
  }
  return String(value);
}

function pairs(record: object): string {
  const rows = Object.entries(record as Record<string, unknown>).filter(([, v]) => v !== undefined);
  if (rows.length === 0) return '<p class="muted">no overrides: the shared model</p>';
  return `<dl class="kv">${rows.map(([k, v]) => `<dt>${esc(k)}</dt><dd>${esc(specValue(v))}</dd>`).join('')}</dl>`;
}

/** An arm as its letter code (underlined in its colour, as in the figures' keys) and its name. */
function armTag(view: EvidenceView, name: string): string {
  const key = view.arms.find((a) => a.name === name);
  if (!key) return esc(name);
  return `<span class="arm-tag" style="text-decoration-color:${esc(key.color)}"><b>${esc(armLetter(key.index))}</b> ${esc(name)}</span>`;
}

function answer(view: EvidenceView): string {
  const h = view.headline;
  const partial = view.complete ? '' : `<p class="partial">Partial evidence: ${view.runsDone} of ${view.runsExpected} runs in. Verdicts use complete seed pairs only.</p>`;
  if (!h) return `<div class="answer"><p class="kicker">Answer</p><p class="lead">No finished runs: nothing to judge yet.</p></div>${partial}`;
  return `<div class="answer" data-kind="${esc(h.kind)}">
    <p class="kicker">Answer</p>
    <p class="lead">${esc(h.lead)}</p>
    ${h.reason ? `<p class="reason">${esc(h.reason)}</p>` : ''}
    <p class="detail">${esc(h.pair)} on ${esc(h.where)} (depth ${esc(num(h.depthMean, 2))}); ${esc(h.detail)}.</p>
  </div>${partial}`;
}

function gateCell(gate: GateRow | undefined): string {
  if (!gate) return '';
  return `<p class="gate" data-gate="${esc(gate.status)}"><strong>${esc(gate.label)}</strong> — ${esc(gate.detail)}</p>`;
}

/** The arms side by side: what each changes, and whether it fitted what it was trained on. */
function armsSection(spec: ExperimentSpec, view: EvidenceView): string {
  const cards = spec.arms.map((arm, i) => {
    const key = view.arms[i]!;
    const training: Record<string, unknown> = { learningRate: arm.learningRate, schedule: arm.schedule, sparsity: arm.sparsity, stepSupervision: arm.stepSupervision };
    const inDist = view.inDistribution.find((p) => p.armIndex === i);
    return `<article class="arm" style="border-top-color:${esc(key.color)}" data-arm="${esc(arm.name)}">
      <h3>${armTag(view, arm.name)}</h3>
      ${arm.note ? `<p class="note">${esc(arm.note)}</p>` : ''}
      ${pairs({ ...arm.model, ...training })}
      ${inDist ? `<p class="muted">in-distribution ${esc(view.metric)} ${esc(num(inDist.mean))} [${esc(num(inDist.low))}, ${esc(num(inDist.high))}], ${inDist.n} seed${inDist.n === 1 ? '' : 's'}</p>` : ''}
      ${gateCell(view.gates.find((g) => g.armIndex === i))}
      <details class="resolved"><summary>every model option of this arm</summary>${pairs(armModel(spec, i))}</details>
    </article>`;
  });
  return section('arms', '§2', 'Arms, side by side', `<p class="muted">${esc(view.gateNote)}</p><div class="arms">${cards.join('')}</div>`);
}

function setupSection(spec: ExperimentSpec, view: EvidenceView): string {
  const t = spec.test;
  const rows: Array<[string, string]> = [
    ['task', taskLabel(spec.task)],
    ['metric', `${view.metricLabel} (also picks the kept weights)`],
    ['training graphs', `${spec.train.graphs} ${spec.train.family} graphs of ${spec.train.sizes[0]}–${spec.train.sizes[1]} nodes, weights in [${spec.train.weightRange.join(', ')}]${Object.keys(spec.train.familyParams).length ? `, ${specValue(spec.train.familyParams)}` : ''}`],
    [
      'test ladder',
      `${t.family ?? spec.train.family} graphs of ${t.sizes.join(', ')} nodes${t.weightScales.length > 1 || t.weightScales[0] !== 1 ? `, weights ×${t.weightScales.join(', ×')}` : ''}; ${t.graphsPerRung} graphs per rung`,
    ],
    ['in-distribution sets', `${t.validationGraphs} validation graphs (choose the kept weights), ${t.fitGraphs ?? t.validationGraphs} fresh fit graphs (the fit gate)`],
    ...(t.primary ? ([['primary rung', `n = ${t.primary.size}${t.primary.scale !== 1 ? `, weights ×${t.primary.scale}` : ''}`]] as Array<[string, string]>) : []),
    ['budget', specValue(spec.budget)],
    ['seeds', `${spec.seeds.count}, from base ${spec.seeds.base}; every arm of a seed sees the same graphs and starting weights`],
    ['shared model', specValue(spec.model)],
  ];
  const body = `<dl class="kv setup">${rows.map(([k, v]) => `<dt>${esc(k)}</dt><dd>${esc(v)}</dd>`).join('')}</dl>`;
  return section('setup', '§3', 'Setup', body);
}

function legend(view: EvidenceView, logY: boolean): string {
  const arms = view.arms.map((a) => `<span class="key">${armTag(view, a.name)}</span>`).join('');
  const log = logY ? `<span class="muted">Errors on a log scale: ${esc(autoLogReason(view))}.</span>` : '';
  return `<p class="legend">${arms}<span class="muted">shaded: training sizes ${view.trainSizes[0]}–${view.trainSizes[1]} (◇ in-distribution error); grey dashes: constant predictors</span>${log}</p>`;
}

function figuresHtml(view: EvidenceView, options: ReportOptions): string {
  const logY = view.errorDecades > AUTO_LOG_DECADES;
  const width = options.figureWidth ?? 720;
  const figures = evidenceFigures(view).map((f) => {
    const drawn = f.draw({ width, logY: f.logScale && logY, document: options.document });
    const svg = drawn.tagName.toLowerCase() === 'svg' ? drawn : drawn.querySelector('svg');
    if (svg) describeFigure(svg, f.number, f.heading);
    return `<figure class="fig" data-figure="${f.name}">
      <h3><span class="no">Fig. ${f.number}</span>${esc(f.heading)}</h3>
      ${drawn.outerHTML}
      <figcaption>${esc(f.caption)}</figcaption>
    </figure>`;
  });
  return legend(view, logY) + figures.join('');
}

function armCell(v: VerdictRow, side: 'A' | 'B'): string {
  const mean = side === 'A' ? v.meanA : v.meanB;
  const relative = side === 'A' ? v.relativeA : v.relativeB;
  const blown = side === 'A' ? v.blownUpNoteA : v.blownUpNoteB;
  const warning = side === 'A' ? v.constantWarningA : v.constantWarningB;
  if (!v.n && !blown) return '—';
  if (blown) return `<span class="danger">${esc(blown)}</span>`;
  return `${esc(num(mean))}${warning ? ` <span class="bang" title="${esc(warning)}">!</span>` : ''}<span class="sub">rel. ${esc(percent(relative))}</span>`;
}

function verdictTable(view: EvidenceView): string {
  const color = (name: string) => view.arms.find((a) => a.name === name)?.color ?? 'inherit';
  const rows = view.verdicts.map((v) => {
    const size = `n = ${v.size}${v.scale !== 1 ? `, ×${v.scale}` : ''}${v.inTrainingRange ? '*' : ''}`;
    const diff = !v.n ? '—' : v.blownUpA || v.blownUpB ? 'no interval: a run blew up' : `${num(v.diff)} <span class="sub">[${num(v.diffLow)}, ${num(v.diffHigh)}]</span>`;
    const pAdj = v.n && v.tested ? pValue(v.pAdjusted) : v.n ? 'not tested' : '—';
    const winner = v.kind === 'a-better' ? color(v.a) : v.kind === 'b-better' ? color(v.b) : '';
    return `<tr data-kind="${esc(v.kind)}">
      <td class="l">${esc(size)}<span class="sub">depth ${esc(num(v.depthMean, 2))} · degree ${esc(num(v.meanDegree, 2))}</span></td>
      <td>${esc(num(v.constant))}${Number.isFinite(v.constantTrain) ? `<span class="sub">train-fitted ${esc(num(v.constantTrain))}</span>` : ''}</td>
      <td class="l">${armTag(view, v.a)} vs ${armTag(view, v.b)}</td>
      <td>${armCell(v, 'A')}</td>
      <td>${armCell(v, 'B')}</td>
      <td>${diff}</td>
      <td>${v.n ? esc(num(v.probabilityOfImprovement, 2)) : '—'}</td>
      <td>${v.n ? esc(pValue(v.pRaw)) : '—'}<span class="sub">${esc(pAdj)}</span></td>
      <td class="l verdict"${winner ? ` style="color:${esc(winner)}"` : ''}>${esc(v.text)}</td>
    </tr>`;
  });
  return `<table class="verdicts" data-verdict-table>
    <caption>Verdicts per rung of the ladder</caption>
    <thead><tr>
      <th class="l" scope="col">Test size (what shifted)</th><th scope="col">best constant</th><th class="l" scope="col">Arms A vs B</th>
      <th scope="col">${esc(view.metric)} of A</th><th scope="col">${esc(view.metric)} of B</th><th scope="col">A − B [95%]</th>
      <th scope="col">P(A &lt; B)</th><th scope="col">p raw<span class="sub">${esc(view.adjustment.header)}</span></th><th class="l" scope="col">Verdict</th>
    </tr></thead>
    <tbody>${rows.join('')}</tbody>
  </table>
  <p class="foot">* inside the training size range. ${esc(view.adjustment.note)}</p>`;
}

/** With more than two arms: each rung's arms from lowest to highest mean error (not a verdict). */
function rankingTable(view: EvidenceView): string {
  if (view.arms.length <= 2 || view.rankings.length === 0) return '';
  const rows = view.rankings.map((r) => {
    const order = r.order
      .map((o) => `${armTag(view, o.arm)} <span class="muted">${o.n ? esc(num(o.mean)) : ''}${o.blownUp ? ` (${esc(blownUpLabel(o.blownUp))})` : ''}</span>`)
      .join(' &lt; ');
    return `<tr><td class="l">n = ${r.size}${r.scale !== 1 ? `, ×${r.scale}` : ''}</td><td class="l">${order}</td></tr>`;
  });
  return `<table class="ranking" data-ranking>
    <caption>Ranking by mean ${esc(view.metric)}, lowest first (neighbours often overlap: only the verdicts below test a difference)</caption>
    <thead><tr><th class="l" scope="col">Test size</th><th class="l" scope="col">Arms, best to worst (mean over seeds)</th></tr></thead>
    <tbody>${rows.join('')}</tbody>
  </table>`;
}

function notes(view: EvidenceView): string {
  const items = [
    ...view.noSkill.map((t) => `<li class="danger-note"><strong>No skill.</strong> ${esc(t)}</li>`),
    ...view.caveats.map((c) => `<li class="${c.tooFewSeeds ? 'few' : ''}">${c.tooFewSeeds ? '<strong>Too few seeds to tell.</strong> ' : ''}${esc(c.text)}${c.where.length ? ` <span class="muted">— ${esc(c.where.join('; '))}</span>` : ''}</li>`),
    ...view.failures.map((f) => `<li class="danger-note"><strong>${esc(f.arm)}, seed ${f.seed}: ${esc(f.status)}.</strong> ${esc(f.reason)} ${esc(f.treatment)}</li>`),
  ];
  return items.length ? `<h3>Caveats</h3><ul class="notes" data-caveats>${items.join('')}</ul>` : '<p class="muted">No caveats.</p>';
}

function baselinesTable(view: EvidenceView): string {
  if (!view.baselines.some((b) => Number.isFinite(b.best))) return '';
  const rows = view.baselines.map(
    (b) => `<tr><td class="l">n = ${b.size}${b.scale !== 1 ? `, ×${b.scale}` : ''}</td><td>${esc(num(b.best))}</td><td>${esc(percent(b.bestRelative))}</td><td>${esc(num(b.train))}</td><td>${esc(percent(b.trainRelative))}</td><td class="l">${b.noArmBeatsConstant ? '<span class="danger">no arm beats it</span>' : 'beaten'}</td></tr>`,
  );
  return `<table class="baselines" data-baselines>
    <caption>Constant predictors: the error of predicting one number for every node (mean over seeds, ${esc(view.metric)})</caption>
    <thead><tr><th class="l" scope="col">Test size</th><th scope="col">best constant</th><th scope="col">rel.</th><th scope="col">training constant</th><th scope="col">rel.</th><th class="l" scope="col">by an arm?</th></tr></thead>
    <tbody>${rows.join('')}</tbody>
  </table>`;
}

function reproduceSection(doc: ResultsDocument, link: string | null, linkError: string | null, unverified: boolean): string {
  const e = doc.engine;
  const how = unverified
    ? "as recorded: some errors are not finite numbers, which a results file cannot hold, so it could not be recomputed here"
    : "every run's rounded errors; not times or machines";
  const body = `<dl class="kv">
      <dt>results fingerprint</dt><dd><code class="fp" data-fingerprint>${esc(doc.fingerprint)}</code> <span class="muted">(${how})</span></dd>
      <dt>spec hash</dt><dd><code>${esc(doc.specHash)}</code></dd>
      <dt>runs</dt><dd>${doc.runs.length} of ${doc.runsExpected}${doc.shard ? ` (shard ${doc.shard.index}/${doc.shard.count})` : ''}</dd>
      <dt>engine</dt><dd>farfield ${esc(e.version)} on ${esc(e.backend)}, ${e.threads} thread${e.threads === 1 ? '' : 's'} per worker, ${esc(e.host)}</dd>
    </dl>
    <h3>Share link</h3>
    ${link ? `<p class="link" data-share-link>${esc(link)}</p>` : `<p class="danger">No share link: ${esc(linkError ?? 'unknown reason')}</p>`}
    <p class="muted">Open it in the sheet, or run it again from a terminal with <code>npx farfield run '&lt;link&gt;'</code>; the fingerprint should come out the same.</p>
    <h3>The whole spec</h3>
    <p class="muted">As hashed: canonical JSON, every default filled in (save it as a .json file to run it as a preset).</p>
    <pre class="spec" data-spec>${esc(canonicalJson(doc.spec))}</pre>`;
  return section('reproduce', '§5', 'Reproduce', body);
}

/** The report as one HTML document. */
export async function buildReport(doc: ResultsDocument, options: ReportOptions): Promise<string> {
  const view = buildEvidence(doc);
  const spec = doc.spec;
  let link: string | null = null;
  let linkError: string | null = null;
  try {
    link = await encodeSpecLink(spec, { base: options.linkBase ?? DEFAULT_LINK_BASE, ...(doc.complete ? { fingerprint: doc.fingerprint } : {}) });
  } catch (error) {
    linkError = error instanceof Error ? error.message : String(error);
  }
  const hasEvidence = view.curves.length > 0 || view.blownUp.length > 0;
  const evidence = hasEvidence
    ? `${figuresHtml(view, options)}${rankingTable(view)}${verdictTable(view)}${notes(view)}${baselinesTable(view)}`
    : '<p class="muted">No finished runs: no figures or verdicts yet.</p>';
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<title>${esc(spec.question)} — Farfield report</title>
<style>${REPORT_CSS}</style>
</head>
<body>
<main>
<header>
  <p class="kicker">Farfield experiment sheet · ${esc(taskLabel(spec.task))} · ${spec.arms.length} arms × ${spec.seeds.count} seeds</p>
  <h1 data-question>${esc(spec.question)}</h1>
  ${spec.expectation ? `<p class="expectation"><strong>Expectation.</strong> ${esc(spec.expectation)}</p>` : ''}
</header>
${section('answer', '§1', 'The answer', answer(view))}
${armsSection(spec, view)}
${setupSection(spec, view)}
${section('evidence', '§4', 'Evidence', evidence)}
${reproduceSection(doc, link, linkError, Boolean(options.fingerprintUnverified))}
</main>
</body>
</html>
`;
}
