/** Plain-text rendering of results for the terminal. */
import type { ResultsDocument } from '../experiment/results.ts';
import type { RungComparison } from '../experiment/compare.ts';
import { taskLabel } from '../tasks/registry.ts';

export function num(x: number, digits = 3): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return x.toExponential(2);
  return Number(x.toPrecision(digits)).toString();
}

function pad(text: string, width: number): string {
  const len = [...text].length;
  return len >= width ? text : text + ' '.repeat(width - len);
}

export function renderTable(rows: string[][]): string {
  const widths: number[] = [];
  for (const row of rows) row.forEach((cell, i) => (widths[i] = Math.max(widths[i] ?? 0, [...cell].length)));
  return rows.map((row) => row.map((cell, i) => pad(cell, widths[i]! + 2)).join('').trimEnd()).join('\n');
}

const METRIC_WORDS: Record<string, string> = {
  mae: 'mean absolute error (lower is better)',
  mre: 'mean relative error (lower is better)',
  miss: 'share of nodes outside 5% tolerance (lower is better)',
};

function rungLabel(r: RungComparison): string {
  // A graph-file rung: the file's name and its node count.
  if (r.family.startsWith('file:')) return `${r.family.slice(5)} (${r.size})`;
  return `${r.size}${r.scale !== 1 ? ` ×${r.scale}` : ''}`;
}

export function renderResults(doc: ResultsDocument): string {
  const { spec, comparison } = doc;
  const lines: string[] = [];
  lines.push(`Question: ${spec.question}`);
  lines.push(
    `Task ${taskLabel(spec.task)} · trained on ${spec.train.family} graphs of ${spec.train.sizes[0]}–${spec.train.sizes[1]} nodes · tested on ${spec.test.family ?? spec.train.family} · ${spec.seeds.count} seeds per arm · ${spec.budget.steps} training steps`,
  );
  lines.push(`Metric: ${METRIC_WORDS[comparison.metric] ?? comparison.metric}; mean over seeds [95% bootstrap interval]`);
  lines.push('');
  lines.push(...renderFit(comparison));
  lines.push('');
  const arms = spec.arms.map((a) => a.name);
  const header = ['size', 'depth', 'degree', ...arms, 'rel. error ' + arms.join('/'), 'constant best/train', 'gap ' + arms.join('/')];
  const rows: string[][] = [header];
  for (const rung of comparison.rungs) {
    rows.push([
      rungLabel(rung) + (rung.inTrainingRange ? '*' : ''),
      num(rung.depthMean, 2),
      num(rung.meanDegree, 2),
      ...rung.arms.map((a) => armCell(a)),
      rung.arms.map((a) => percent(a.relative)).join('/'),
      `${num(rung.baseline?.best ?? NaN)}/${num(rung.baseline?.train ?? NaN)}`,
      rung.arms.map((a) => num(a.gap, 2)).join('/'),
    ]);
  }
  lines.push(renderTable(rows));
  lines.push(
    '* inside the training size range. depth: mean rounds the exact algorithm needs. degree: mean degree. rel. error: mean |y − t|/|t|. ' +
      'constant: error of predicting one number everywhere (best: the optimal constant for that rung; train: the constant fitted on the training graphs); ' +
      '! marks an arm that does not beat the best constant. gap: error ÷ in-distribution error.',
  );
  const useless = comparison.rungs.filter((r) => r.noArmBeatsConstant);
  if (useless.length) lines.push(`No arm beats the best constant predictor at ${useless.map(rungLabel).join(', ')}: nothing was learned there that a verdict could compare.`);
  lines.push('');
  if (spec.arms.length > 2) {
    lines.push('Ranking per size (lowest error first; intervals overlap = not separated):');
    for (const rung of comparison.rungs) {
      const ordered = rung.ranking.map((name) => rung.arms.find((a) => a.arm === name)!);
      lines.push(`  ${rungLabel(rung)}: ${ordered.map((a, i) => `${i + 1}. ${a.arm} ${num(a.summary.mean)} [${num(a.summary.meanLow)}, ${num(a.summary.meanHigh)}]`).join('  ')}`);
    }
    lines.push('');
  }
  const adj = comparison.adjustment;
  const adjLabel = adj ? (adj.method === 'primary' ? `p adj. (primary rung, ${adj.tests} test${adj.tests === 1 ? '' : 's'})` : `p adj. (Holm, ${adj.tests} tests)`) : 'p adj.';
  const pairRows: string[][] = [['size', 'pair', 'mean diff [95%]', 'P(A<B)', 'signed-rank p', adjLabel, 'verdict']];
  const caveats = new Map<string, Set<string>>();
  for (const rung of comparison.rungs) {
    for (const pair of rung.pairs) {
      const v = pair.verdict;
      pairRows.push([
        rungLabel(rung),
        `${pair.a} − ${pair.b}`,
        v.n ? `${num(v.meanDiff.estimate)} [${num(v.meanDiff.low)}, ${num(v.meanDiff.high)}]` : '—',
        v.n ? num(v.probabilityOfImprovement, 2) : '—',
        v.n ? num(v.wilcoxon.pTwoSided, 3) : '—',
        v.n && rung.tested !== false ? num(v.pAdjusted ?? v.wilcoxon.pTwoSided, 3) : '—',
        v.text,
      ]);
      for (const c of v.caveats) {
        const key = `${pair.a} vs ${pair.b}`;
        if (!caveats.has(c)) caveats.set(c, new Set());
        caveats.get(c)!.add(`${rungLabel(rung)} (${key})`);
      }
    }
  }
  lines.push(renderTable(pairRows));
  if (caveats.size) {
    lines.push('');
    lines.push('Caveats:');
    for (const [text, where] of caveats) {
      const list = [...where];
      lines.push(`  - ${text}${list.length < comparison.rungs.length * Math.max(1, comparison.rungs[0]?.pairs.length ?? 1) ? ` [${list.join(', ')}]` : ''}`);
    }
  }
  const counts = comparison.statusCounts;
  const bad = Object.entries(counts).filter(([k]) => k !== 'ok');
  lines.push('');
  lines.push(
    `Runs: ${counts['ok'] ?? 0} ok${bad.length ? ', ' + bad.map(([k, v]) => `${v} ${k}`).join(', ') : ''} of ${doc.runsExpected}` +
      (bad.length ? ' — diverged and failed runs count as their arm\'s worst outcome; cancelled ones are left out (comparison.rungs[].arms[].excludedReasons in the JSON)' : ''),
  );
  for (const r of doc.runs.filter((x) => x.status !== 'ok')) {
    const where = r.status === 'diverged' ? ` at step ${r.divergedAt} (last finite loss ${num(r.lastFiniteLoss ?? NaN)})` : '';
    lines.push(`  ${r.arm} seed ${r.seed}: ${r.status}${where}${r.reason ? ` — ${r.reason}` : ''}`);
  }
  lines.push(`Spec ${doc.specHash} · fingerprint ${doc.fingerprint} · engine ${doc.engine.version} on ${doc.engine.backend} (${doc.engine.threads} thread${doc.engine.threads === 1 ? '' : 's'} per worker)`);
  return lines.join('\n');
}

function percent(x: number): string {
  if (Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return '∞';
  return `${num(100 * x, 2)}%`;
}

function armCell(a: RungComparison['arms'][number]): string {
  if (!a.summary.n && !a.nonFinite) return 'no runs';
  const notes: string[] = [];
  if (a.nonFinite) notes.push(`${a.nonFinite} blew up`);
  if (a.excluded) notes.push(`${a.excluded} excl.`);
  const value = a.summary.n ? `${num(a.summary.mean)} [${num(a.summary.meanLow)}, ${num(a.summary.meanHigh)}]` : '∞';
  return `${value}${a.beatsConstant === false ? '!' : ''}${notes.length ? ` (${notes.join(', ')})` : ''}`;
}

/** The fit gate per arm, and what a missed gate means for the verdicts. */
function renderFit(comparison: ResultsDocument['comparison']): string[] {
  const fit = comparison.fit ?? [];
  if (!fit.length) return [];
  const gate = fit[0]!.gate;
  const parts = fit.map((f) =>
    f.fitted === null
      ? `${f.arm} not run yet`
      : `${f.arm} ${percent(f.median)} ${f.fitted ? 'fitted' : 'NOT FITTED'} (${f.passing} of ${f.values.length} seeds within${gateStepText(f.gateStep)})`,
  );
  const lines = [`Fit gate: in-distribution relative error on fresh graphs, median over seeds, at most ${percent(gate)}: ${parts.join('; ')}.`];
  for (const f of fit) if (f.fitted === false) lines.push(`  ${f.message} No verdict calls a winner for it.`);
  return lines;
}

function gateStepText(step: number | null | undefined): string {
  if (step === null || step === undefined || Number.isNaN(step)) return '';
  return Number.isFinite(step) ? `; validation reached it by step ${Math.round(step)}, median` : '; validation never reached it on half the seeds';
}
