/**
 * The evidence figures, drawn with Observable Plot from an EvidenceView.
 * Pure functions of their input: the same view gives the same SVG. Colours
 * and fonts are written into the SVG (not CSS variables), so an exported file
 * looks the same outside the page.
 */
import * as Plot from '@observablehq/plot';
import type { BaselinePoint, BlownUpPoint, CurvePoint, DiffPoint, EvidenceView, LadderRow, SeedPoint } from './evidence.ts';
import { CARD, DANGER, INK, MUTED, RULE, TRAIN_BAND } from './palette.ts';
import { num } from './format.ts';

export const FIGURE_FONT = "system-ui, -apple-system, 'Segoe UI', 'Liberation Sans', 'DejaVu Sans', sans-serif";

export interface FigureOptions {
  width: number;
  /** Log scale for errors (only honoured when every value is positive). */
  logY?: boolean;
  /** Fixed height (figures shown side by side share one). */
  height?: number;
  /** The document to draw into: the page's by default; a light DOM in Node (the standalone report). */
  document?: Document;
}

const style = (fontSize: number) => ({ fontFamily: FIGURE_FONT, fontSize: `${fontSize}px`, background: 'transparent', color: INK, overflow: 'visible' });

function fontSizeFor(width: number): number {
  return width >= 900 ? 15 : 13;
}

function colorScale(view: EvidenceView) {
  return { domain: view.arms.map((a) => a.name), range: view.arms.map((a) => a.color) };
}

function ladderAt(view: EvidenceView, size: number, scale = 1): LadderRow | undefined {
  return view.ladder.find((r) => r.size === size && r.scale === scale) ?? view.ladder.find((r) => r.size === size);
}

/** "64" over "depth 7.1": what actually shifted, under every node count. */
function sizeTick(view: EvidenceView) {
  return (size: number) => {
    const row = ladderAt(view, size);
    return row && Number.isFinite(row.depthMean) ? `${size}\ndepth ${num(row.depthMean, 2)}` : String(size);
  };
}

function positive(values: number[]): boolean {
  return values.length > 0 && values.every((v) => v > 0 && Number.isFinite(v));
}

function sizeDomain(view: EvidenceView): [number, number] {
  const sizes = [...view.ladder.map((r) => r.size), view.trainSizes[0], view.trainSizes[1]];
  const lo = Math.min(...sizes);
  const hi = Math.max(...sizes);
  return [lo / 1.15, hi * 1.15];
}

/** One constant baseline as drawable points: its value per rung, and the rungs where it sits above a clipped y-axis. */
interface Reference {
  kind: 'best' | 'train';
  label: string;
  dash: string;
  points: Array<{ size: number; scale: number; value: number }>;
}

function references(view: EvidenceView): Reference[] {
  const of = (pick: (b: BaselinePoint) => number) =>
    view.baselines.map((b) => ({ size: b.size, scale: b.scale, value: pick(b) })).filter((p) => Number.isFinite(p.value));
  return [
    { kind: 'best', label: 'best constant', dash: '7,4', points: of((b) => b.best) },
    { kind: 'train', label: 'training constant', dash: '2,3', points: of((b) => b.train) },
  ];
}

/**
 * Metric against test size, one line per arm with its 95% band; the training
 * range shaded; the two constant baselines as grey dashed reference lines. On a
 * linear axis a baseline far above every arm would flatten the arms' curves, so
 * the axis then stops above the arms and such baseline points are marked ▲ at
 * the top (the log scale shows them).
 */
export function extrapolationFigure(view: EvidenceView, options: FigureOptions): SVGSVGElement | HTMLElement {
  const fontSize = fontSizeFor(options.width);
  const scales = view.scales.length > 1;
  const logY = Boolean(options.logY) && positive(view.curves.flatMap((c) => [c.low, c.mean, c.high]));
  const [trainLo, trainHi] = view.trainSizes;
  const mid = Math.sqrt(trainLo * trainHi);
  const inDist: CurvePoint[] = view.inDistribution.map((p, i) => ({
    ...p,
    // Spread the arms a little around the middle of the training range.
    size: mid * Math.pow(1.06, i - (view.inDistribution.length - 1) / 2),
  }));
  const facet = scales ? { fx: (d: { scale: number }) => `weights ×${d.scale}` } : {};
  const armValues = [...view.curves.flatMap((c) => [c.mean, c.high]), ...inDist.map((p) => p.high)].filter((x) => Number.isFinite(x));
  const armTop = armValues.length ? Math.max(...armValues) : NaN;
  const refs = references(view).map((r) => ({ ...r, points: logY ? r.points.filter((p) => p.value > 0) : r.points }));
  const refTop = Math.max(0, ...refs.flatMap((r) => r.points.map((p) => p.value)));
  // Clip a linear axis when a baseline is more than 4× the arms' highest value.
  const clipAt = !logY && Number.isFinite(armTop) && armTop > 0 && refTop > 4 * armTop ? armTop * 1.25 : null;
  const refMarks = refs.flatMap((r) => {
    if (r.points.length === 0) return [];
    const shown = clipAt === null ? r.points : r.points.filter((p) => p.value <= clipAt);
    const above = clipAt === null ? [] : r.points.filter((p) => p.value > clipAt);
    // The label sits at the last drawn point of each facet: the training constant (never below the best one) above its line, the best one below.
    const lastPerScale = [...new Map(shown.map((p) => [p.scale, p])).values()];
    const title = (p: { size: number; value: number }) => `${r.label} at n = ${p.size}\n${view.metric} ${num(p.value)} (mean over seeds)`;
    return [
      Plot.line(r.points, { x: 'size', y: 'value', z: 'scale', stroke: MUTED, strokeWidth: 1.6, strokeDasharray: r.dash, clip: true, ...facet }),
      Plot.dot(shown, { x: 'size', y: 'value', r: 3, fill: r.kind === 'best' ? MUTED : CARD, stroke: MUTED, strokeWidth: 1.4, symbol: r.kind === 'best' ? 'square' : 'circle', title, ...facet }),
      Plot.text(lastPerScale, { x: 'size', y: 'value', text: () => r.label, textAnchor: 'end', dx: -6, dy: r.kind === 'train' ? -9 : 11, fill: MUTED, fontSize: fontSize - 2, ...facet }),
      Plot.dot(above, { x: 'size', frameAnchor: 'top', dy: r.kind === 'best' ? 10 : 22, symbol: 'triangle', r: 4, fill: r.kind === 'best' ? MUTED : CARD, stroke: MUTED, title: (p: { size: number; value: number }) => `${title(p)} — above the axis; the log scale shows it`, ...facet }),
    ];
  });
  const clipNote = clipAt === null ? [] : [Plot.text([0], { frameAnchor: 'top-right', dx: -8, dy: 38, text: () => '▲ best / △ training constant above the axis (log scale shows them)', fill: MUTED, fontSize: fontSize - 3, textAnchor: 'end' })];
  return Plot.plot({
    document: options.document,
    width: options.width,
    height: Math.round(Math.min(520, Math.max(300, options.width * 0.4))),
    marginLeft: 64,
    marginBottom: 56,
    marginTop: scales ? 36 : 30,
    marginRight: 24,
    style: style(fontSize),
    ariaLabel: `Extrapolation curves: ${view.metricLabel} against test graph size for ${view.arms.map((a) => a.name).join(', ')}, with the best constant and the training constant as reference lines`,
    x: {
      type: 'log',
      domain: sizeDomain(view),
      ticks: view.ladder.map((r) => r.size),
      tickFormat: sizeTick(view),
      label: `nodes per test graph (${view.testFamily}); trained on ${trainLo}–${trainHi}`,
      labelAnchor: 'center',
      labelOffset: 50,
    },
    y: {
      type: logY ? 'log' : 'linear',
      grid: true,
      nice: true,
      zero: !logY,
      ...(clipAt === null ? {} : { domain: [0, clipAt] }),
      label: `↓ ${view.metricLabel} (lower is better)`,
    },
    fx: scales ? { label: null } : undefined,
    color: colorScale(view),
    marks: [
      Plot.rect([{ x1: trainLo, x2: trainHi }], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.7 }),
      Plot.text([{ x: mid }], { x: 'x', frameAnchor: 'top', dy: 6, text: () => 'training range', fill: MUTED, fontSize: fontSize - 2 }),
      ...refMarks,
      ...clipNote,
      Plot.areaY(view.curves, { x: 'size', y1: 'low', y2: 'high', z: 'arm', fill: 'arm', fillOpacity: 0.16, ...facet }),
      Plot.lineY(view.curves, { x: 'size', y: 'mean', z: 'arm', stroke: 'arm', strokeWidth: 2.5, ...facet }),
      Plot.dot(view.curves, { x: 'size', y: 'mean', fill: 'arm', r: 4.5, stroke: '#fff', strokeWidth: 1, ...facet }),
      Plot.ruleX(inDist, { x: 'size', y1: 'low', y2: 'high', stroke: 'arm', strokeWidth: 2 }),
      Plot.dot(inDist, { x: 'size', y: 'mean', stroke: 'arm', fill: '#fbf8f0', strokeWidth: 2, r: 4.5, symbol: 'diamond' }),
      Plot.frame({ stroke: RULE }),
      Plot.tip(
        view.curves,
        Plot.pointerX({
          x: 'size',
          y: 'mean',
          stroke: 'arm',
          ...facet,
          title: (d: CurvePoint) =>
            `${d.arm} at n = ${d.size}\nmean ${num(d.mean)} [${num(d.low)}, ${num(d.high)}]\n${d.n} seed${d.n === 1 ? '' : 's'}${d.blownUp ? `; ${d.blownUp} more blew up (ranked worst, not in this mean)` : ''}`,
        }),
      ),
    ],
  });
}

/** The paired difference (A − B) per size with its interval; below zero A has the lower error. */
export function differenceFigure(view: EvidenceView, options: FigureOptions): SVGSVGElement | HTMLElement {
  const fontSize = fontSizeFor(options.width);
  const pairs = [...new Set(view.diffs.map((d) => d.pair))].slice(0, 6);
  const rows = view.diffs.filter((d) => pairs.includes(d.pair));
  const facetRows = pairs.length > 1;
  const scales = view.scales.length > 1;
  const tone = (d: DiffPoint) => {
    if (d.kind === 'a-better') return view.arms.find((a) => a.name === d.a)?.color ?? INK;
    if (d.kind === 'b-better') return view.arms.find((a) => a.name === d.b)?.color ?? INK;
    return MUTED;
  };
  const facet = {
    ...(facetRows ? { fy: 'pair' } : {}),
    ...(scales ? { fx: (d: DiffPoint) => `weights ×${d.scale}` } : {}),
  };
  // With a run that blew up the mean difference is infinite (or undefined): a × and words at the edge
  // of the side it favours, never a point on the axis.
  const finite = rows.filter((d) => Number.isFinite(d.estimate));
  const blownMarks = (
    [
      ['bottom', (d: DiffPoint) => d.estimate === -Infinity, -1],
      ['top', (d: DiffPoint) => d.estimate === Infinity, 1],
      ['middle', (d: DiffPoint) => Number.isNaN(d.estimate), 0],
    ] as const
  ).flatMap(([frameAnchor, pick, side]) => {
    const data = rows.filter(pick);
    if (data.length === 0) return [];
    return [
      Plot.dot(data, { x: 'size', frameAnchor, dy: side === 1 ? 10 : side === -1 ? -10 : 0, symbol: 'times', r: 5, stroke: DANGER, strokeWidth: 2.2, ...facet }),
      Plot.text(data, { x: 'size', frameAnchor, dy: side === 1 ? 24 : side === -1 ? -24 : 14, text: 'blownUp', fill: DANGER, fontSize: fontSize - 3, lineWidth: 9, ...facet }),
    ];
  });
  return Plot.plot({
    document: options.document,
    width: options.width,
    height: options.height ?? Math.max(240, facetRows ? pairs.length * 150 + 60 : 320),
    marginLeft: 64,
    marginBottom: 56,
    marginRight: facetRows ? 110 : 24,
    marginTop: scales ? 36 : 30,
    style: style(fontSize),
    ariaLabel: `Paired difference of ${view.metricLabel} between arms, per test size, with 95% intervals`,
    x: {
      type: 'log',
      domain: sizeDomain(view),
      ticks: view.ladder.map((r) => r.size),
      tickFormat: sizeTick(view),
      label: 'nodes per test graph',
      labelAnchor: 'center',
      labelOffset: 50,
    },
    y: { grid: true, nice: true, ...(finite.length ? {} : { domain: [-1, 1] }), label: pairs.length === 1 ? `${pairs[0]}: difference in ${view.metric} (below 0: ${rows[0]?.a ?? 'A'} better)` : `difference in ${view.metric} (A − B; below 0: A better)` },
    fy: facetRows ? { label: null } : undefined,
    fx: scales ? { label: null } : undefined,
    marks: [
      Plot.rect([{ x1: view.trainSizes[0], x2: view.trainSizes[1] }], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.7 }),
      Plot.ruleY([0], { stroke: INK, strokeOpacity: 0.6 }),
      Plot.ruleX(finite, { x: 'size', y1: 'low', y2: 'high', stroke: tone, strokeWidth: 3, ...facet }),
      Plot.dot(finite, { x: 'size', y: 'estimate', fill: tone, r: 5, stroke: '#fff', ...facet }),
      ...blownMarks,
      Plot.frame({ stroke: RULE }),
      Plot.tip(finite, Plot.pointerX({ x: 'size', y: 'estimate', ...facet, title: (d: DiffPoint) => `${d.pair} at n = ${d.size}\n${num(d.estimate)} [${num(d.low)}, ${num(d.high)}]\n${d.n} pair${d.n === 1 ? '' : 's'}` })),
    ],
  });
}

/** Every seed's error, arms side by side at each size, paired seeds joined by a line. */
export function seedFigure(view: EvidenceView, options: FigureOptions): SVGSVGElement | HTMLElement {
  const fontSize = fontSizeFor(options.width);
  const logY = Boolean(options.logY) && positive(view.seeds.map((s) => s.value));
  const sizes = [...new Set(view.seeds.map((s) => s.size))].sort((a, b) => a - b);
  const label = (s: { size: number; scale: number }) => (view.scales.length > 1 ? `n = ${s.size}, ×${s.scale}` : `n = ${s.size}`);
  const cells: Array<{ size: number; scale: number }> = [...view.seeds, ...view.blownUp];
  const order = [...new Set(cells.slice().sort((a, b) => a.size - b.size || a.scale - b.scale).map(label))];
  return Plot.plot({
    document: options.document,
    width: options.width,
    height: options.height ?? Math.round(Math.min(380, Math.max(260, options.width * 0.42))),
    marginLeft: 64,
    marginBottom: 44,
    marginTop: 34,
    style: style(fontSize),
    ariaLabel: `Per-seed ${view.metricLabel} for each arm at each test size`,
    fx: { domain: order, label: null },
    x: { domain: view.arms.map((a) => a.name), label: null, padding: 0.4 },
    // Room at the top for the × and words of runs that blew up.
    y: { type: logY ? 'log' : 'linear', grid: true, nice: true, zero: !logY, insetTop: view.blownUp.length ? 50 : 0, label: `↓ ${view.metric} per seed` },
    color: colorScale(view),
    marks: [
      Plot.frame({ stroke: RULE }),
      Plot.line(view.seeds, { fx: label, x: 'arm', y: 'value', z: (d: SeedPoint) => `${d.seed}|${label(d)}`, stroke: MUTED, strokeOpacity: 0.45, strokeWidth: 1 }),
      Plot.dot(view.seeds, { fx: label, x: 'arm', y: 'value', fill: 'arm', r: 4.5, stroke: '#fff', strokeWidth: 0.8 }),
      // Runs that blew up have no value: a × at the top of their column, with words, so they never vanish.
      Plot.dot(view.blownUp, { fx: label, x: 'arm', frameAnchor: 'top', dy: 10, symbol: 'times', r: 5, stroke: DANGER, strokeWidth: 2.2 }),
      Plot.text(view.blownUp, {
        fx: label,
        x: 'arm',
        frameAnchor: 'top',
        dy: 22,
        lineAnchor: 'top',
        text: (d: BlownUpPoint) => d.label.replace(' (', '\n('),
        fill: DANGER,
        fontSize: fontSize - 3,
        title: (d: BlownUpPoint) => `${d.arm}: seed${d.seeds.length === 1 ? '' : 's'} ${d.seeds.join(', ')} blew up (diverged, failed or a non-finite error); ranked as the worst outcome in the paired tests`,
      }),
      Plot.tip(view.seeds, Plot.pointer({ fx: label, x: 'arm', y: 'value', title: (d: SeedPoint) => `${d.arm}, seed ${d.seed}\n${view.metric} ${num(d.value)}` })),
    ],
    caption: sizes.length === 0 && view.blownUp.length === 0 ? 'no finished runs yet' : undefined,
  });
}
