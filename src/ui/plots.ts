/**
 * The evidence figures, drawn with Observable Plot from an EvidenceView.
 * Pure functions of their input: the same view gives the same SVG. Colours
 * and fonts are written into the SVG (not CSS variables), so an exported file
 * looks the same outside the page.
 */
import * as Plot from '@observablehq/plot';
import type { BaselinePoint, BlownUpPoint, CurvePoint, DiffPoint, EvidenceView, LadderRow, SeedPoint } from './evidence.ts';
import { CARD, DANGER, INK, MUTED, PAPER, RULE, TRAIN_BAND, armDash, armLetter, armSymbol } from './palette.ts';
import { num, plainNumber } from './format.ts';
import { drawKey, keyEntries, keyHeight } from './figure-key.ts';

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

/** Each arm's marker shape (palette.ts), so no reader depends on colour alone. */
function symbolScale(view: EvidenceView) {
  return { domain: view.arms.map((a) => a.name), range: view.arms.map((a) => armSymbol(a.index)) };
}

function letterOf(view: EvidenceView, name: string): string {
  const arm = view.arms.find((a) => a.name === name);
  return arm ? armLetter(arm.index) : name;
}

/** The key every figure carries inside its SVG, and the room it takes at the top. */
function figureKey(view: EvidenceView, options: FigureOptions, fontSize: number) {
  const entries = keyEntries(view.arms);
  const height = keyHeight(entries, options.width, fontSize);
  return {
    height,
    draw: <T extends Element>(figure: T): T => {
      drawKey(figure, entries, { width: options.width, fontSize });
      return figure;
    },
  };
}

/**
 * Vertical nudges (px) for labels at line ends, so the letters of arms that
 * end close together stack instead of overprinting: values within 6% of the
 * axis span form a cluster, spread one text line apart around its middle.
 */
export function endLabelNudges(values: readonly number[], span: number, lineHeight: number): number[] {
  const order = values.map((v, i) => ({ v, i })).sort((a, b) => b.v - a.v);
  const nudges = new Array<number>(values.length).fill(0);
  let start = 0;
  for (let k = 1; k <= order.length; k++) {
    if (k === order.length || !(Math.abs(order[k - 1]!.v - order[k]!.v) < 0.06 * span)) {
      const size = k - start;
      for (let j = start; j < k; j++) nudges[order[j]!.i] = (j - start - (size - 1) / 2) * lineHeight;
      start = k;
    }
  }
  return nudges;
}

/** Plain decimals on an error axis (a log axis would otherwise print "10m"). */
const errorTicks = { tickFormat: plainNumber };

function ladderAt(view: Pick<EvidenceView, 'ladder'>, size: number, scale = 1): LadderRow | undefined {
  return view.ladder.find((r) => r.size === size && r.scale === scale) ?? view.ladder.find((r) => r.size === size);
}

/** "64" over "depth 7.1": what actually shifted, under every node count; a graph file's rung also names the file. */
export function sizeTick(view: Pick<EvidenceView, 'ladder'>) {
  return (size: number) => {
    const row = ladderAt(view, size);
    const head = row?.file ? `${row.file}\n${size}` : String(size);
    return row && Number.isFinite(row.depthMean) ? `${head}\ndepth ${num(row.depthMean, 2)}` : head;
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
  const key = figureKey(view, options, fontSize);
  // Each arm's line in its own dash pattern, and its letter at the line's end (largest size, per facet).
  const armLines = view.arms.map((a) =>
    Plot.lineY(
      view.curves.filter((c) => c.arm === a.name),
      { x: 'size', y: 'mean', z: 'scale', stroke: a.color, strokeWidth: 2.5, strokeDasharray: armDash(a.index), ...facet },
    ),
  );
  const ends = [
    ...view.curves
      .filter((c) => Number.isFinite(c.mean))
      .reduce((m, c) => {
        const k = `${c.arm}|${c.scale}`;
        if (!m.has(k) || m.get(k)!.size < c.size) m.set(k, c);
        return m;
      }, new Map<string, CurvePoint>())
      .values(),
  ];
  const onAxis = (v: number) => (logY ? Math.log10(Math.max(v, 1e-12)) : v);
  const shown = view.curves.flatMap((c) => [c.low, c.high]).filter((v) => Number.isFinite(v) && (!logY || v > 0)).map(onAxis);
  const span = clipAt !== null ? clipAt : shown.length ? Math.max(...shown) - Math.min(logY ? Infinity : 0, ...shown) || 1 : 1;
  const endLabels = view.scales.flatMap((scale) => {
    const here = ends.filter((e) => e.scale === scale);
    const nudges = endLabelNudges(here.map((e) => onAxis(e.mean)), span, fontSize + 1);
    return here.map((e, i) =>
      Plot.text([e], { x: 'size', y: 'mean', text: (d: CurvePoint) => letterOf(view, d.arm), dx: 9, dy: nudges[i]!, textAnchor: 'start', fontWeight: 700, fill: INK, stroke: PAPER, strokeWidth: 3, paintOrder: 'stroke', ...facet }),
    );
  });
  return key.draw(Plot.plot({
    document: options.document,
    width: options.width,
    height: Math.round(Math.min(520, Math.max(300, options.width * 0.4))),
    marginLeft: 64,
    marginBottom: 56,
    marginTop: (scales ? 36 : 30) + key.height,
    marginRight: 40,
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
      ...errorTicks,
      label: `↓ ${view.metricLabel} (lower is better)`,
    },
    fx: scales ? { label: null } : undefined,
    color: colorScale(view),
    symbol: symbolScale(view),
    marks: [
      Plot.rect([{ x1: trainLo, x2: trainHi }], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.7 }),
      Plot.text([{ x: mid }], { x: 'x', frameAnchor: 'top', dy: 6, text: () => 'training range', fill: MUTED, fontSize: fontSize - 2 }),
      ...refMarks,
      ...clipNote,
      Plot.areaY(view.curves, { x: 'size', y1: 'low', y2: 'high', z: 'arm', fill: 'arm', fillOpacity: 0.16, ...facet }),
      ...armLines,
      Plot.dot(view.curves, { x: 'size', y: 'mean', fill: 'arm', symbol: 'arm', r: 4.5, stroke: '#fff', strokeWidth: 1, ...facet }),
      ...endLabels,
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
            `${letterOf(view, d.arm)} (${d.arm}) at n = ${d.size}\nmean ${num(d.mean)} [${num(d.low)}, ${num(d.high)}]\n${d.n} seed${d.n === 1 ? '' : 's'}${d.blownUp ? `; ${d.blownUp} more blew up (ranked worst, not in this mean)` : ''}`,
        }),
      ),
    ],
  }));
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
  // Pairs by letter code ("A − B"): long arm names would overprint the facet labels.
  const pairLabel = (d: DiffPoint) => `${letterOf(view, d.a)} − ${letterOf(view, d.b)}`;
  const facet = {
    ...(facetRows ? { fy: pairLabel } : {}),
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
  const key = figureKey(view, options, fontSize);
  return key.draw(Plot.plot({
    document: options.document,
    width: options.width,
    height: (options.height ?? Math.max(240, facetRows ? pairs.length * 150 + 60 : 320)) + key.height,
    marginLeft: 64,
    marginBottom: 56,
    marginRight: facetRows ? 64 : 24,
    marginTop: (scales ? 36 : 30) + key.height,
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
    y: {
      grid: true,
      nice: true,
      ...(finite.length ? {} : { domain: [-1, 1] }),
      label:
        pairs.length === 1 && rows[0]
          ? `${pairLabel(rows[0])}: difference in ${view.metric} (below 0: ${letterOf(view, rows[0].a)} better)`
          : `difference in ${view.metric} (1st − 2nd; below 0: the 1st better)`,
    },
    fy: facetRows ? { label: null } : undefined,
    fx: scales ? { label: null } : undefined,
    marks: [
      Plot.rect([{ x1: view.trainSizes[0], x2: view.trainSizes[1] }], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.7 }),
      Plot.ruleY([0], { stroke: INK, strokeOpacity: 0.6 }),
      Plot.ruleX(finite, { x: 'size', y1: 'low', y2: 'high', stroke: tone, strokeWidth: 3, ...facet }),
      Plot.dot(finite, { x: 'size', y: 'estimate', fill: tone, r: 5, stroke: '#fff', ...facet }),
      ...blownMarks,
      Plot.frame({ stroke: RULE }),
      Plot.tip(finite, Plot.pointerX({ x: 'size', y: 'estimate', ...facet, title: (d: DiffPoint) => `${pairLabel(d)} (${d.pair}) at n = ${d.size}\n${num(d.estimate)} [${num(d.low)}, ${num(d.high)}]\n${d.n} pair${d.n === 1 ? '' : 's'}` })),
    ],
  }));
}

/** Every seed's error, arms side by side at each size, paired seeds joined by a line. */
export function seedFigure(view: EvidenceView, options: FigureOptions): SVGSVGElement | HTMLElement {
  const fontSize = fontSizeFor(options.width);
  const logY = Boolean(options.logY) && positive(view.seeds.map((s) => s.value));
  const sizes = [...new Set(view.seeds.map((s) => s.size))].sort((a, b) => a - b);
  const label = (s: { size: number; scale: number }) => (view.scales.length > 1 ? `n = ${s.size}, ×${s.scale}` : `n = ${s.size}`);
  const cells: Array<{ size: number; scale: number }> = [...view.seeds, ...view.blownUp];
  const order = [...new Set(cells.slice().sort((a, b) => a.size - b.size || a.scale - b.scale).map(label))];
  const key = figureKey(view, options, fontSize);
  // Arms by letter code along each size's axis: names would overprint with many arms; the key names them.
  const armX = (d: { arm: string }) => letterOf(view, d.arm);
  return key.draw(Plot.plot({
    document: options.document,
    width: options.width,
    height: (options.height ?? Math.round(Math.min(380, Math.max(260, options.width * 0.42)))) + key.height,
    marginLeft: 64,
    marginBottom: 44,
    marginTop: 34 + key.height,
    style: style(fontSize),
    ariaLabel: `Per-seed ${view.metricLabel} for each arm at each test size`,
    fx: { domain: order, label: null },
    x: { domain: view.arms.map((a) => armLetter(a.index)), label: null, padding: 0.4 },
    // Room at the top for the × and words of runs that blew up.
    y: { type: logY ? 'log' : 'linear', grid: true, nice: true, zero: !logY, insetTop: view.blownUp.length ? 50 : 0, label: `↓ ${view.metric} per seed`, ...errorTicks },
    color: colorScale(view),
    symbol: symbolScale(view),
    marks: [
      Plot.frame({ stroke: RULE }),
      Plot.line(view.seeds, { fx: label, x: armX, y: 'value', z: (d: SeedPoint) => `${d.seed}|${label(d)}`, stroke: MUTED, strokeOpacity: 0.45, strokeWidth: 1 }),
      Plot.dot(view.seeds, { fx: label, x: armX, y: 'value', fill: 'arm', symbol: 'arm', r: 4.5, stroke: '#fff', strokeWidth: 0.8 }),
      // Runs that blew up have no value: a × at the top of their column, with words, so they never vanish.
      Plot.dot(view.blownUp, { fx: label, x: armX, frameAnchor: 'top', dy: 10, symbol: 'times', r: 5, stroke: DANGER, strokeWidth: 2.2 }),
      Plot.text(view.blownUp, {
        fx: label,
        x: armX,
        frameAnchor: 'top',
        dy: 22,
        lineAnchor: 'top',
        text: (d: BlownUpPoint) => d.label.replace(' (', '\n('),
        fill: DANGER,
        fontSize: fontSize - 3,
        title: (d: BlownUpPoint) => `${d.arm}: seed${d.seeds.length === 1 ? '' : 's'} ${d.seeds.join(', ')} blew up (diverged, failed or a non-finite error); ranked as the worst outcome in the paired tests`,
      }),
      Plot.tip(view.seeds, Plot.pointer({ fx: label, x: armX, y: 'value', title: (d: SeedPoint) => `${armX(d)} (${d.arm}), seed ${d.seed}\n${view.metric} ${num(d.value)}` })),
    ],
    caption: sizes.length === 0 && view.blownUp.length === 0 ? 'no finished runs yet' : undefined,
  }));
}
