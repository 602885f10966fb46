/**
 * The evidence figures, drawn with Observable Plot from an EvidenceView.
 * Pure functions of their input: the same view gives the same SVG. Colours
 * and fonts are written into the SVG (not CSS variables), so an exported file
 * looks the same outside the page.
 */
import * as Plot from '@observablehq/plot';
import type { CurvePoint, DiffPoint, EvidenceView, LadderRow, SeedPoint } from './evidence.ts';
import { INK, MUTED, RULE, TRAIN_BAND } from './palette.ts';
import { num } from './format.ts';

export const FIGURE_FONT = "system-ui, -apple-system, 'Segoe UI', 'Liberation Sans', 'DejaVu Sans', sans-serif";

export interface FigureOptions {
  width: number;
  /** Log scale for errors (only honoured when every value is positive). */
  logY?: boolean;
  /** Fixed height (figures shown side by side share one). */
  height?: number;
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

/** Metric against test size, one line per arm with its 95% band; the training range shaded. */
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
  const facet = scales ? { fx: (d: CurvePoint) => `weights ×${d.scale}` } : {};
  return Plot.plot({
    width: options.width,
    height: Math.round(Math.min(520, Math.max(300, options.width * 0.4))),
    marginLeft: 64,
    marginBottom: 56,
    marginTop: scales ? 36 : 30,
    marginRight: 24,
    style: style(fontSize),
    ariaLabel: `Extrapolation curves: ${view.metricLabel} against test graph size for ${view.arms.map((a) => a.name).join(', ')}`,
    x: {
      type: 'log',
      domain: sizeDomain(view),
      ticks: view.ladder.map((r) => r.size),
      tickFormat: sizeTick(view),
      label: `nodes per test graph (${view.testFamily}); trained on ${trainLo}–${trainHi}`,
      labelAnchor: 'center',
      labelOffset: 50,
    },
    y: { type: logY ? 'log' : 'linear', grid: true, nice: true, zero: !logY, label: `↓ ${view.metricLabel} (lower is better)` },
    fx: scales ? { label: null } : undefined,
    color: colorScale(view),
    marks: [
      Plot.rect([{ x1: trainLo, x2: trainHi }], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.7 }),
      Plot.text([{ x: mid }], { x: 'x', frameAnchor: 'top', dy: 6, text: () => 'training range', fill: MUTED, fontSize: fontSize - 2 }),
      Plot.areaY(view.curves, { x: 'size', y1: 'low', y2: 'high', z: 'arm', fill: 'arm', fillOpacity: 0.16, ...facet }),
      Plot.lineY(view.curves, { x: 'size', y: 'mean', z: 'arm', stroke: 'arm', strokeWidth: 2.5, ...facet }),
      Plot.dot(view.curves, { x: 'size', y: 'mean', fill: 'arm', r: 4.5, stroke: '#fff', strokeWidth: 1, ...facet }),
      Plot.ruleX(inDist, { x: 'size', y1: 'low', y2: 'high', stroke: 'arm', strokeWidth: 2 }),
      Plot.dot(inDist, { x: 'size', y: 'mean', stroke: 'arm', fill: '#fbf8f0', strokeWidth: 2, r: 4.5, symbol: 'diamond' }),
      Plot.frame({ stroke: RULE }),
      Plot.tip(view.curves, Plot.pointerX({ x: 'size', y: 'mean', stroke: 'arm', ...facet, title: (d: CurvePoint) => `${d.arm} at n = ${d.size}\nmean ${num(d.mean)} [${num(d.low)}, ${num(d.high)}]\n${d.n} seed${d.n === 1 ? '' : 's'}` })),
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
  return Plot.plot({
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
    y: { grid: true, nice: true, label: pairs.length === 1 ? `${pairs[0]}: difference in ${view.metric} (below 0: ${rows[0]?.a ?? 'A'} better)` : `difference in ${view.metric} (A − B; below 0: A better)` },
    fy: facetRows ? { label: null } : undefined,
    fx: scales ? { label: null } : undefined,
    marks: [
      Plot.rect([{ x1: view.trainSizes[0], x2: view.trainSizes[1] }], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.7 }),
      Plot.ruleY([0], { stroke: INK, strokeOpacity: 0.6 }),
      Plot.ruleX(rows, { x: 'size', y1: 'low', y2: 'high', stroke: tone, strokeWidth: 3, ...facet }),
      Plot.dot(rows, { x: 'size', y: 'estimate', fill: tone, r: 5, stroke: '#fff', ...facet }),
      Plot.frame({ stroke: RULE }),
      Plot.tip(rows, Plot.pointerX({ x: 'size', y: 'estimate', ...facet, title: (d: DiffPoint) => `${d.pair} at n = ${d.size}\n${num(d.estimate)} [${num(d.low)}, ${num(d.high)}]\n${d.n} pair${d.n === 1 ? '' : 's'}` })),
    ],
  });
}

/** Every seed's error, arms side by side at each size, paired seeds joined by a line. */
export function seedFigure(view: EvidenceView, options: FigureOptions): SVGSVGElement | HTMLElement {
  const fontSize = fontSizeFor(options.width);
  const logY = Boolean(options.logY) && positive(view.seeds.map((s) => s.value));
  const sizes = [...new Set(view.seeds.map((s) => s.size))].sort((a, b) => a - b);
  const label = (s: SeedPoint) => (view.scales.length > 1 ? `n = ${s.size}, ×${s.scale}` : `n = ${s.size}`);
  const order = [...new Set(view.seeds.slice().sort((a, b) => a.size - b.size || a.scale - b.scale).map(label))];
  return Plot.plot({
    width: options.width,
    height: options.height ?? Math.round(Math.min(380, Math.max(260, options.width * 0.42))),
    marginLeft: 64,
    marginBottom: 44,
    marginTop: 34,
    style: style(fontSize),
    ariaLabel: `Per-seed ${view.metricLabel} for each arm at each test size`,
    fx: { domain: order, label: null },
    x: { domain: view.arms.map((a) => a.name), label: null, padding: 0.4 },
    y: { type: logY ? 'log' : 'linear', grid: true, nice: true, zero: !logY, label: `↓ ${view.metric} per seed` },
    color: colorScale(view),
    marks: [
      Plot.frame({ stroke: RULE }),
      Plot.line(view.seeds, { fx: label, x: 'arm', y: 'value', z: (d: SeedPoint) => `${d.seed}|${label(d)}`, stroke: MUTED, strokeOpacity: 0.45, strokeWidth: 1 }),
      Plot.dot(view.seeds, { fx: label, x: 'arm', y: 'value', fill: 'arm', r: 4.5, stroke: '#fff', strokeWidth: 0.8 }),
      Plot.tip(view.seeds, Plot.pointer({ fx: label, x: 'arm', y: 'value', title: (d: SeedPoint) => `${d.arm}, seed ${d.seed}\n${view.metric} ${num(d.value)}` })),
    ],
    caption: sizes.length === 0 ? 'no finished runs yet' : undefined,
  });
}
