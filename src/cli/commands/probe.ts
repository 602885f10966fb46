/**
 * `farfield probe <preset> [--json] [--seeds N] [--arms a,b]`: train each arm
 * in-process on the first seed (or the first N), then print the algebraic
 * audit, the probe curves at a handful of points with the worst deviation
 * outside the training range, and the alignment trace's per-step error.
 * --json prints the whole probe document (src/inspect/probe-document.ts).
 */
import { parse, UsageError, intFlag } from '../args.ts';
import { loadSpec } from '../load.ts';
import { LIMITS } from '../../experiment/limits.ts';
import { initBackend } from '../../engine/backend.ts';
import { probeDocument, type ArmProbes, type ProbeDocument } from '../../inspect/probe-document.ts';
import { probeSummary, type Probe } from '../../inspect/probe.ts';
import type { AuditRow } from '../../inspect/audit.ts';
import type { AlignmentTrace } from '../../inspect/trace.ts';
import { num, renderTable } from '../format.ts';
import { taskLabel } from '../../tasks/registry.ts';

const USAGE = 'usage: farfield probe <preset.json | link> [--json] [--seeds N] [--arms a,b]';

function passWord(pass: boolean | null): string {
  return pass === null ? '—' : pass ? 'yes' : 'NO';
}

export function renderAudit(rows: readonly AuditRow[]): string {
  const table: string[][] = [['check', 'component', 'subject', 'measure', 'mean', 'worst', 'expected', 'pass']];
  for (const r of rows) table.push([r.check, r.component, r.subject, r.measure, num(r.mean), num(r.worst), r.expected, passWord(r.pass)]);
  return renderTable(table);
}

/** About `count` points: both ends, the trained range's edges, and evenly spaced others. */
function pickPoints(probe: Probe, count = 6): number[] {
  const n = probe.points.length;
  if (n <= count) return probe.points.map((_, i) => i);
  const picked = new Set<number>([0, n - 1]);
  const [lo, hi] = probe.trainingRange;
  let nearest = 0;
  probe.points.forEach((p, i) => {
    if (Math.abs(p.x - (lo + hi) / 2) < Math.abs(probe.points[nearest]!.x - (lo + hi) / 2)) nearest = i;
  });
  picked.add(nearest);
  for (let k = 1; picked.size < count && k < count; k++) picked.add(Math.round((k * (n - 1)) / (count - 1)));
  return [...picked].sort((a, b) => a - b);
}

export function renderProbe(probe: Probe): string {
  const [lo, hi] = probe.trainingRange;
  const lines = [`${probe.title} — x: ${probe.xLabel}; trained ${lo === hi ? `at ${num(lo)}` : `on ${num(lo)}..${num(hi)}`}`];
  if (probe.unavailable) return `${lines[0]}\n  not available: ${probe.unavailable}`;
  const table: string[][] = [['x', 'predicted', 'truth', 'mae', '']];
  for (const i of pickPoints(probe)) {
    const p = probe.points[i]!;
    const inside = p.x >= probe.trainingRange[0] && p.x <= probe.trainingRange[1];
    table.push([num(p.x), num(p.predicted), num(p.truth), num(p.mae), inside ? 'trained' : '']);
  }
  lines.push(
    renderTable(table)
      .split('\n')
      .map((l) => '  ' + l)
      .join('\n'),
  );
  const s = probeSummary(probe);
  const fmt = (w: { x: number; relative: number } | null) => (w ? `${num(w.relative)} at x = ${num(w.x)}` : 'no points');
  lines.push(`  worst relative deviation: outside the training range ${fmt(s.worstOutside)}; inside ${fmt(s.worstInside)}`);
  return lines.join('\n');
}

export function renderTrace(trace: AlignmentTrace): string {
  const errors = trace.steps.map((s) => `${s.k}:${s.mae === null ? '—' : num(s.mae, 2)}`);
  return (
    `Alignment trace — ${trace.family} graph of ${trace.nodes} nodes${trace.source !== null ? `, source ${trace.source}` : ''}, exact algorithm needs ${trace.depth} rounds; ` +
    `MAE of decoded states vs the algorithm after k iterations (k:mae):\n  ${errors.join('  ')}`
  );
}

function renderArm(entry: ArmProbes): string {
  const lines: string[] = [];
  const model = entry.model;
  lines.push(
    `== Arm "${entry.arm}": aggregator ${model.aggregator}, message ${model.message}, update ${model.update}, ${model.bias ? 'with' : 'no'} bias, hidden ${model.hidden}`,
  );
  for (const run of entry.runs) {
    lines.push(
      `seed ${run.seed}: ${run.status}${run.reason ? ` — ${run.reason}` : ''}${run.inDistribution ? `; in-distribution MAE ${num(run.inDistribution.mae)}` : ''}`,
    );
  }
  if (!entry.mean) {
    lines.push('no trained network to probe');
    return lines.join('\n');
  }
  const several = entry.mean.seeds > 1;
  lines.push('');
  lines.push(`Algebraic audit${several ? ` (mean over ${entry.mean.seeds} seeds; worst of the worsts)` : ''}:`);
  lines.push(renderAudit(entry.mean.audit));
  for (const probe of entry.mean.probes) {
    lines.push('');
    lines.push(renderProbe(probe));
  }
  const trace = entry.runs.find((r) => r.trace)?.trace;
  if (trace) {
    lines.push('');
    lines.push(renderTrace(trace) + (several ? ` (seed ${entry.runs.find((r) => r.trace)!.seed})` : ''));
  }
  return lines.join('\n');
}

export function renderProbeDocument(doc: ProbeDocument): string {
  const out = [
    `Question: ${doc.spec.question}`,
    `Task ${taskLabel(doc.spec.task)} · trained on ${doc.spec.train.family} graphs of ${doc.spec.train.sizes[0]}–${doc.spec.train.sizes[1]} nodes, weights ${doc.spec.train.weightRange[0]}–${doc.spec.train.weightRange[1]} · seed(s) ${doc.seeds.join(', ')}`,
    '',
  ];
  for (const entry of doc.arms) out.push(renderArm(entry), '');
  out.push(`Spec ${doc.specHash}. Relative deviation = mae / |truth|. pass "—": the architecture promises nothing for that row (reported only).`);
  return out.join('\n');
}

export async function commandProbe(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, {
    json: { type: 'boolean' },
    seeds: { type: 'string' },
    arms: { type: 'string' },
    quiet: { type: 'boolean' },
  });
  if (positionals.length !== 1) throw new UsageError(USAGE);
  const { spec } = await loadSpec(positionals[0]);
  const seeds = intFlag('seeds', values.seeds, LIMITS.seeds.min, LIMITS.seeds.max) ?? 1;
  const arms = values.arms === undefined ? undefined : values.arms.split(',').map((a) => a.trim()).filter(Boolean);
  if (arms) {
    const names = spec.arms.map((a) => a.name);
    const unknown = arms.filter((a) => !names.includes(a));
    if (unknown.length || arms.length === 0) throw new UsageError(`--arms: got "${values.arms}", allowed a comma-separated list of ${names.map((n) => `"${n}"`).join(', ')}`);
  }
  await initBackend('wasm');
  const quiet = Boolean(values.quiet);
  const started = Date.now();
  let lastPrint = 0;
  const doc = probeDocument(spec, {
    seeds,
    arms,
    onRunStart: ({ arm, seed }) => {
      if (!quiet) process.stderr.write(`training arm "${arm}" on seed ${seed} (${spec.budget.steps} steps), then probing…\n`);
    },
    onProgress: ({ arm, step, totalSteps, loss }) => {
      const now = Date.now();
      if (quiet || !process.stderr.isTTY || (now - lastPrint < 500 && step !== totalSteps)) return;
      lastPrint = now;
      process.stderr.write(`\r  ${arm}: step ${step}/${totalSteps}, loss ${num(loss)}   `);
      if (step === totalSteps) process.stderr.write('\n');
    },
  });
  if (!quiet) process.stderr.write(`done in ${num((Date.now() - started) / 1000)} s\n`);
  if (values.json) process.stdout.write(JSON.stringify(doc) + '\n');
  else process.stdout.write(renderProbeDocument(doc) + '\n');
  return 0;
}
