/**
 * The arm key drawn inside every figure's SVG (so an exported figure still
 * says which line is which): per arm a short line in its dash pattern, its
 * marker shape and colour, and "A max". The figure functions reserve
 * `keyHeight` at the top and call `drawKey` on Plot's output. Shapes follow
 * the d3 symbols Observable Plot draws for the same names, at equal area.
 */
import type { ArmSymbol } from './palette.ts';
import { armMark } from './palette.ts';
import { INK } from './palette.ts';

export interface KeyEntry {
  letter: string;
  name: string;
  color: string;
  symbol: ArmSymbol;
  dash: string;
}

export function keyEntries(arms: ReadonlyArray<{ name: string; index: number }>): KeyEntry[] {
  return arms.map((a) => {
    const m = armMark(a.index);
    return { letter: m.letter, name: a.name, color: m.color, symbol: m.symbol, dash: m.dash };
  });
}

const SWATCH = 30;
const GAP = 18;

interface Placed {
  entry: KeyEntry;
  x: number;
  row: number;
}

function layout(entries: readonly KeyEntry[], width: number, fontSize: number): { placed: Placed[]; rows: number } {
  const placed: Placed[] = [];
  let x = 0;
  let row = 0;
  for (const entry of entries) {
    const w = SWATCH + 6 + (entry.letter.length + 1 + entry.name.length) * fontSize * 0.56;
    if (x > 0 && x + w > width - 16) {
      row++;
      x = 0;
    }
    placed.push({ entry, x, row });
    x += w + GAP;
  }
  return { placed, rows: entries.length ? row + 1 : 0 };
}

function rowHeight(fontSize: number): number {
  return Math.round(fontSize * 1.5);
}

function keyTop(fontSize: number): number {
  return fontSize + 8;
}

/** Room the key needs above the plot (add it to marginTop). */
export function keyHeight(entries: readonly KeyEntry[], width: number, fontSize: number): number {
  const { rows } = layout(entries, width, fontSize);
  return rows ? rows * rowHeight(fontSize) + 8 : 0;
}

const NS = 'http://www.w3.org/2000/svg';

function node(doc: Document, name: string, attrs: Record<string, string | number>, parent: Element): Element {
  const el = doc.createElementNS(NS, name);
  for (const [k, v] of Object.entries(attrs)) el.setAttribute(k, String(v));
  parent.appendChild(el);
  return el;
}

/** A marker of the given shape centred on (cx, cy) with the area of a circle of radius r. */
export function symbolPath(symbol: ArmSymbol, cx: number, cy: number, r: number): string {
  const area = Math.PI * r * r;
  const pts = (list: Array<[number, number]>) => `M${list.map(([x, y]) => `${(cx + x).toFixed(2)},${(cy + y).toFixed(2)}`).join('L')}Z`;
  switch (symbol) {
    case 'circle':
      return `M${cx + r},${cy}A${r},${r} 0 1 1 ${cx - r},${cy}A${r},${r} 0 1 1 ${cx + r},${cy}Z`;
    case 'square': {
      const h = Math.sqrt(area) / 2;
      return pts([[-h, -h], [h, -h], [h, h], [-h, h]]);
    }
    case 'triangle': {
      const y = -Math.sqrt(area / (3 * Math.sqrt(3)));
      return pts([[0, 2 * y], [-Math.sqrt(3) * y, -y], [Math.sqrt(3) * y, -y]]);
    }
    case 'star': {
      const outer = Math.sqrt(area * 0.8908130915292852) * 0.9;
      const inner = outer * 0.382;
      const list: Array<[number, number]> = [];
      for (let i = 0; i < 10; i++) {
        const a = (Math.PI / 5) * i - Math.PI / 2;
        const rr = i % 2 ? inner : outer;
        list.push([rr * Math.cos(a), rr * Math.sin(a)]);
      }
      return pts(list);
    }
    case 'cross': {
      const s = Math.sqrt(area / 5) / 2;
      return pts([[-3 * s, -s], [-s, -s], [-s, -3 * s], [s, -3 * s], [s, -s], [3 * s, -s], [3 * s, s], [s, s], [s, 3 * s], [-s, 3 * s], [-s, s], [-3 * s, s]]);
    }
    case 'wye': {
      const k = Math.sqrt(area / 7.5);
      const list: Array<[number, number]> = [];
      // Three arms 120° apart, each a k-wide bar from the centre.
      for (let i = 0; i < 3; i++) {
        const a = (2 * Math.PI * i) / 3 - Math.PI / 2;
        const [ux, uy] = [Math.cos(a), Math.sin(a)];
        const [px, py] = [-uy, ux];
        list.push([(px * k) / 2 + ux * 0.3 * k, (py * k) / 2 + uy * 0.3 * k]);
        list.push([(px * k) / 2 + ux * 1.8 * k, (py * k) / 2 + uy * 1.8 * k]);
        list.push([(-px * k) / 2 + ux * 1.8 * k, (-py * k) / 2 + uy * 1.8 * k]);
        list.push([(-px * k) / 2 + ux * 0.3 * k, (-py * k) / 2 + uy * 0.3 * k]);
      }
      return pts(list);
    }
  }
}

/**
 * Draw the key into the figure's SVG at the top left, below the line where
 * Plot writes the y-axis label (the figure reserved keyHeight for it).
 */
export function drawKey(figure: Element, entries: readonly KeyEntry[], options: { width: number; fontSize: number }): void {
  const svg = figure.tagName.toLowerCase() === 'svg' ? figure : figure.querySelector('svg');
  if (!svg || entries.length === 0) return;
  const doc = svg.ownerDocument;
  const { placed } = layout(entries, options.width, options.fontSize);
  const g = node(doc, 'g', { 'data-key': 'arms', 'font-size': options.fontSize - 1, 'text-anchor': 'start', transform: `translate(8, ${keyTop(options.fontSize)})` }, svg);
  const lineH = rowHeight(options.fontSize);
  for (const { entry, x, row } of placed) {
    const y = row * lineH + lineH / 2;
    node(doc, 'line', { x1: x, x2: x + SWATCH, y1: y, y2: y, stroke: entry.color, 'stroke-width': 2.5, 'stroke-dasharray': entry.dash }, g);
    node(doc, 'path', { d: symbolPath(entry.symbol, x + SWATCH / 2, y, 4.5), fill: entry.color, stroke: '#fff', 'stroke-width': 0.8 }, g);
    const text = node(doc, 'text', { x: x + SWATCH + 6, y, 'dominant-baseline': 'central', fill: INK }, g);
    const letter = node(doc, 'tspan', { 'font-weight': 700 }, text);
    letter.textContent = `${entry.letter} `;
    const name = node(doc, 'tspan', {}, text);
    name.textContent = entry.name;
  }
}
