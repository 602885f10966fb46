/**
 * Figures of the probe document: one plot per probe kind with every arm's
 * prediction against the exact truth (shared by the arms: same graphs), the
 * training range shaded; and the alignment trace's small graph at step k.
 * Pure functions of their input; colours and fonts are written into the SVG,
 * so an exported file looks the same outside the page.
 */
import * as Plot from '@observablehq/plot';
import type { Probe, ProbePoint } from '../inspect/probe.ts';
import type { AlignmentTrace } from '../inspect/trace.ts';
import { CARD, INK, MUTED, PAPER, RULE, TRAIN_BAND, armDash, armLetter, armSymbol } from './palette.ts';
import { FIGURE_FONT, endLabelNudges } from './plots.ts';
import { num, plainNumber } from './format.ts';
import { drawKey, keyEntries, keyHeight } from './figure-key.ts';

export interface ArmProbe {
  arm: string;
  /** The arm's position in the spec: its letter, colour, marker and dash. */
  index: number;
  color: string;
  probe: Probe;
}

interface Row extends ProbePoint {
  series: string;
}

const TRUTH = 'exact truth';

/** A long axis label loses its parenthetical on a narrow figure (the full text stays in the aria label and the caption). */
function axisLabel(label: string, width: number): string {
  return label.length * 6.5 > width - 70 ? label.replace(/\s*\(.*\)\s*$/, '') : label;
}

function finite(v: number): boolean {
  return typeof v === 'number' && Number.isFinite(v);
}

/** Predicted (one line per arm) and truth (dashed ink) against x; the training range shaded. */
export function probeFigure(probes: readonly ArmProbe[], options: { width: number; height?: number }): SVGSVGElement | HTMLElement {
  const usable = probes.filter((p) => !p.probe.unavailable && p.probe.points.length);
  const first = usable[0]!.probe;
  const fontSize = options.width >= 700 ? 14 : 12.5;
  const logX = first.xScale === 'log';
  const predicted: Row[] = usable.flatMap((p) => p.probe.points.filter((q) => finite(q.x) && finite(q.predicted)).map((q) => ({ ...q, series: p.arm })));
  const truth: Row[] = first.points.filter((q) => finite(q.x) && finite(q.truth)).map((q) => ({ ...q, series: TRUTH }));
  const ys = [...predicted.map((r) => r.predicted), ...truth.map((r) => r.truth)];
  // Values spanning decades (the scale sweep) read better on a log y when all are positive.
  const logY = logX && ys.length > 0 && ys.every((y) => y > 0) && Math.max(...ys) / Math.min(...ys) > 50;
  const xs = first.points.map((p) => p.x).filter(finite);
  const [lo, hi] = first.trainingRange;
  const xMin = Math.min(...xs, lo);
  const xMax = Math.max(...xs, hi);
  const domain: [number, number] = logX ? [xMin / 1.25, xMax * 1.25] : [Math.min(0, xMin), xMax + (xMax - xMin) * 0.04];
  // A single trained value (λ = 1) still gets a visible band.
  const band = lo === hi ? (logX ? { x1: lo / 1.12, x2: hi * 1.12 } : { x1: lo - (domain[1] - domain[0]) * 0.008, x2: hi + (domain[1] - domain[0]) * 0.008 }) : { x1: lo, x2: hi };
  const bandLabel = lo === hi ? `trained at ${num(lo, 3)}` : 'training range';
  const colors = { domain: [...usable.map((p) => p.arm), TRUTH], range: [...usable.map((p) => p.color), INK] };
  const symbols = { domain: usable.map((p) => p.arm), range: usable.map((p) => armSymbol(p.index)) };
  const entries = keyEntries(usable.map((p) => ({ name: p.arm, index: p.index })));
  const keyRoom = keyHeight(entries, options.width, fontSize);
  // Each arm's letter at the end of its line (largest x).
  const ends = usable.flatMap((p) => {
    const rows = predicted.filter((r) => r.series === p.arm);
    const last = rows.reduce<Row | null>((m, r) => (m === null || r.x > m.x ? r : m), null);
    return last ? [{ ...last, letter: armLetter(p.index) }] : [];
  });
  const onAxis = (v: number) => (logY ? Math.log10(Math.max(v, 1e-12)) : v);
  const axisValues = ys.map(onAxis);
  const nudges = endLabelNudges(
    ends.map((e) => onAxis(e.predicted)),
    axisValues.length ? Math.max(...axisValues) - Math.min(...axisValues) || 1 : 1,
    fontSize + 1,
  );
  const figure = Plot.plot({
    width: options.width,
    height: (options.height ?? Math.round(Math.min(340, Math.max(250, options.width * 0.62)))) + keyRoom,
    marginLeft: 58,
    marginRight: 30,
    marginTop: 30 + keyRoom,
    marginBottom: 46,
    style: { fontFamily: FIGURE_FONT, fontSize: `${fontSize}px`, background: 'transparent', color: INK, overflow: 'visible' },
    ariaLabel: `${first.title}: predicted by ${usable.map((p) => p.arm).join(', ')} against exact truth; ${first.xLabel}`,
    // Plain decimals on both axes: a log axis would otherwise print "10m / 100m", which reads as metres.
    x: { type: logX ? 'log' : 'linear', domain, label: `${axisLabel(first.xLabel, options.width)} →`, labelAnchor: 'center', labelOffset: 38, tickFormat: plainNumber, ...(logX ? { ticks: 5 } : {}) },
    y: { type: logY ? 'log' : 'linear', grid: true, nice: true, label: `↑ ${first.yLabel}`, tickFormat: plainNumber },
    color: colors,
    symbol: symbols,
    marks: [
      Plot.rect([band], { x1: 'x1', x2: 'x2', fill: TRAIN_BAND, fillOpacity: 0.85 }),
      Plot.text([{ x: lo === hi ? band.x2 : logX ? Math.sqrt(band.x1 * band.x2) : (band.x1 + band.x2) / 2 }], {
        x: 'x',
        frameAnchor: 'top',
        dy: 6,
        dx: lo === hi ? 4 : 0,
        textAnchor: lo === hi ? 'start' : 'middle',
        text: () => bandLabel,
        fill: MUTED,
        fontSize: fontSize - 2,
      }),
      Plot.lineY(truth, { x: 'x', y: 'truth', stroke: INK, strokeWidth: 1.6, strokeDasharray: '5 4' }),
      Plot.dot(truth, { x: 'x', y: 'truth', fill: INK, r: 2.2 }),
      ...usable.map((p) => Plot.lineY(predicted.filter((r) => r.series === p.arm), { x: 'x', y: 'predicted', stroke: p.color, strokeWidth: 2.4, strokeDasharray: armDash(p.index) })),
      Plot.dot(predicted, { x: 'x', y: 'predicted', fill: 'series', symbol: 'series', r: 3.6, stroke: CARD, strokeWidth: 1 }),
      ...ends.map((e, i) => Plot.text([e], { x: 'x', y: 'predicted', text: 'letter', dx: 8, dy: nudges[i]!, textAnchor: 'start', fontWeight: 700, fill: INK, stroke: PAPER, strokeWidth: 3, paintOrder: 'stroke' })),
      Plot.frame({ stroke: RULE }),
      Plot.tip(
        predicted,
        Plot.pointer({
          x: 'x',
          y: 'predicted',
          stroke: 'series',
          title: (d: Row) => `${d.series} at x = ${num(d.x, 3)}\npredicted ${num(d.predicted)}\ntruth ${num(d.truth)}\nmae ${num(d.mae)}`,
        }),
      ),
    ],
  });
  drawKey(figure, entries, { width: options.width, fontSize });
  return figure;
}

const SVG_NS = 'http://www.w3.org/2000/svg';

function el<K extends keyof SVGElementTagNameMap>(name: K, attrs: Record<string, string | number>, parent?: Element): SVGElementTagNameMap[K] {
  const node = document.createElementNS(SVG_NS, name);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, String(v));
  parent?.appendChild(node);
  return node;
}

/** Light paper to a deep brick red: |predicted − exact| from 0 to the trace's largest error. */
const ERROR_LOW = [251, 248, 240];
const ERROR_HIGH = [162, 55, 42];

export function errorColor(t: number): string {
  const u = Math.max(0, Math.min(1, t));
  const c = ERROR_LOW.map((lo, i) => Math.round(lo + (ERROR_HIGH[i]! - lo) * Math.sqrt(u)));
  return `rgb(${c.join(',')})`;
}

/** Largest finite |predicted − exact| over every step and counted node (the colour scale's top). */
export function traceErrorMax(trace: AlignmentTrace): number {
  let max = 0;
  for (const s of trace.steps) {
    s.predicted.forEach((p, i) => {
      const e = s.exact[i];
      if (e != null && Number.isFinite(e) && Number.isFinite(p) && trace.mask[i]) max = Math.max(max, Math.abs(p - e));
    });
  }
  return max || 1;
}

/** The trace graph at step index `stepIndex`: nodes shaded by |predicted − exact|, the source ringed, an error key. */
export function traceFigure(trace: AlignmentTrace, stepIndex: number, options: { width: number; arm: string; color: string }): SVGSVGElement {
  const step = trace.steps[Math.max(0, Math.min(trace.steps.length - 1, stepIndex))]!;
  const width = options.width;
  const keyH = 46;
  const plotH = Math.round(Math.min(360, width * 0.66));
  const height = plotH + keyH;
  const pad = 30;
  const r = trace.nodes <= 12 ? 17 : trace.nodes <= 24 ? 12 : 7;
  const at = (i: number): [number, number] => {
    const [x, y] = trace.positions[i] ?? [0.5, 0.5];
    return [pad + r + x * (width - 2 * (pad + r)), pad + r + y * (plotH - 2 * (pad + r))];
  };
  const max = traceErrorMax(trace);
  const svg = el('svg', {
    xmlns: SVG_NS,
    width,
    height,
    viewBox: `0 0 ${width} ${height}`,
    role: 'img',
    'aria-label': `Alignment trace for ${options.arm} on a ${trace.nodes}-node ${trace.family} graph at step k = ${step.k}; mean |predicted − exact| ${step.mae == null ? 'not defined' : num(step.mae)}`,
    'font-family': FIGURE_FONT,
    'font-size': 12,
  });
  svg.style.overflow = 'visible';
  const defs = el('defs', {}, svg);
  const marker = el('marker', { id: 'ff-trace-arrow', viewBox: '0 0 10 10', refX: 10, refY: 5, markerWidth: 7, markerHeight: 7, orient: 'auto-start-reverse' }, defs);
  el('path', { d: 'M0,0 L10,5 L0,10 z', fill: MUTED }, marker);
  const hatch = el('pattern', { id: 'ff-trace-unreached', width: 6, height: 6, patternUnits: 'userSpaceOnUse', patternTransform: 'rotate(45)' }, defs);
  el('rect', { width: 6, height: 6, fill: '#ece6d8' }, hatch);
  el('line', { x1: 0, y1: 0, x2: 0, y2: 6, stroke: '#b9ad94', 'stroke-width': 2 }, hatch);

  const edges = el('g', { stroke: '#9d9583', 'stroke-width': 1.3, fill: 'none' }, svg);
  const labels = el('g', { fill: MUTED, 'font-size': 10.5, 'text-anchor': 'middle' }, svg);
  const showWeights = trace.edges.length <= 30;
  for (const [u, v, w] of trace.edges) {
    const [x1, y1] = at(u);
    const [x2, y2] = at(v);
    const len = Math.hypot(x2 - x1, y2 - y1) || 1;
    const ux = (x2 - x1) / len;
    const uy = (y2 - y1) / len;
    const line = el('line', { x1: x1 + ux * r, y1: y1 + uy * r, x2: x2 - ux * (r + 1.5), y2: y2 - uy * (r + 1.5) }, edges);
    if (trace.directed) line.setAttribute('marker-end', 'url(#ff-trace-arrow)');
    if (showWeights) {
      const t = el('text', { x: (x1 + x2) / 2 - uy * 8, y: (y1 + y2) / 2 + ux * 8 + 3.5, stroke: CARD, 'stroke-width': 3, 'paint-order': 'stroke' }, labels);
      t.textContent = num(w, 2);
    }
  }
  const nodes = el('g', {}, svg);
  for (let i = 0; i < trace.nodes; i++) {
    const [x, y] = at(i);
    const p = step.predicted[i]!;
    const e = step.exact[i];
    const reached = e != null && Number.isFinite(e);
    const err = reached && Number.isFinite(p) ? Math.abs(p - e) : null;
    const g = el('g', { 'data-node': i, 'data-error': err == null ? '' : num(err, 4) }, nodes);
    const title = el('title', {}, g);
    title.textContent = `node ${i}${i === trace.source ? ' (source)' : ''}: predicted ${num(p)}, exact ${reached ? num(e) : 'not reached yet'}${err == null ? '' : `, |error| ${num(err)}`}${trace.mask[i] ? '' : ' (not scored)'}`;
    if (i === trace.source) el('circle', { cx: x, cy: y, r: r + 4.5, fill: 'none', stroke: INK, 'stroke-width': 2.5 }, g);
    el('circle', {
      cx: x,
      cy: y,
      r,
      fill: err == null ? 'url(#ff-trace-unreached)' : errorColor(err / max),
      stroke: trace.mask[i] ? options.color : '#9d9583',
      'stroke-width': 2,
      ...(trace.mask[i] ? {} : { 'stroke-dasharray': '3 2' }),
    }, g);
    if (r >= 12) {
      const dark = err != null && err / max > 0.45;
      const t = el('text', { x, y: y + 4, 'text-anchor': 'middle', 'font-size': 10.5, 'font-weight': 600, fill: dark ? '#fff' : INK }, g);
      t.textContent = Number.isFinite(p) ? num(p, 2) : '∞';
    }
    if (i === trace.source) {
      const s = el('text', { x, y: y - r - 8, 'text-anchor': 'middle', 'font-size': 11, 'font-weight': 700, fill: INK }, g);
      s.textContent = 'source';
    }
  }
  // Key: the error scale, the unreached pattern, the source ring.
  const key = el('g', { transform: `translate(${pad}, ${plotH + 8})`, fill: INK, 'font-size': 11.5 }, svg);
  const kt = el('text', { x: 0, y: 10 }, key);
  kt.textContent = '|predicted − exact|';
  const gradId = 'ff-trace-grad';
  const grad = el('linearGradient', { id: gradId }, defs);
  for (let s = 0; s <= 10; s++) el('stop', { offset: `${s * 10}%`, 'stop-color': errorColor(s / 10) }, grad);
  el('rect', { x: 0, y: 16, width: 150, height: 10, fill: `url(#${gradId})`, stroke: RULE }, key);
  const k0 = el('text', { x: 0, y: 38, fill: MUTED }, key);
  k0.textContent = '0';
  const k1 = el('text', { x: 150, y: 38, 'text-anchor': 'end', fill: MUTED }, key);
  k1.textContent = num(max, 3);
  el('rect', { x: 180, y: 14, width: 14, height: 14, fill: 'url(#ff-trace-unreached)', stroke: '#9d9583' }, key);
  const ku = el('text', { x: 200, y: 25 }, key);
  ku.textContent = 'not reached yet at this k';
  el('circle', { cx: 370, cy: 21, r: 7, fill: 'none', stroke: INK, 'stroke-width': 2.5 }, key);
  const ks = el('text', { x: 382, y: 25 }, key);
  ks.textContent = 'source · numbers: predicted';
  return svg;
}
