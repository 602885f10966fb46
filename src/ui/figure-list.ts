/**
 * The evidence figures in the order they are shown: number, heading, caption
 * and how each is drawn. One home for what every figure is called and says,
 * read by the sheet (<ff-evidence>) and the standalone report (src/report/).
 * No DOM of its own: drawing goes through src/ui/plots.ts, which takes the
 * document to draw into.
 */
import type { EvidenceView } from './evidence.ts';
import { differenceFigure, extrapolationFigure, seedFigure, type FigureOptions } from './plots.ts';

export type FigureName = 'curves' | 'differences' | 'seeds';

export interface FigureEntry {
  name: FigureName;
  number: number;
  heading: string;
  caption: string;
  /** Whether the figure honours the log scale for errors. */
  logScale: boolean;
  draw: (options: FigureOptions) => SVGSVGElement | HTMLElement;
}

export function curvesCaption(view: EvidenceView): string {
  return `Per arm, the mean over seeds of the ${view.metricLabel}, with a 95% bootstrap interval; ◇ marks the error on fresh graphs of the training sizes (not the graphs that chose the kept weights). Grey reference lines: the error of predicting one number for every node — the best such number for each size (long dashes) and the number fitted on the training graphs (short dashes); an arm on or above the long-dashed line has learned nothing usable there. The shaded band is the range of sizes seen in training; under each size, the mean depth the exact algorithm needs — a bigger graph is not always a deeper one.`;
}

export const DIFFERENCES_CAPTION =
  'Per pair of arms (by letter code, e.g. A − B), the mean over seeds of (error of the first − error of the second), same graphs and initial weights per seed, with a 95% paired bootstrap interval. Below the zero line the first arm is better; a coloured point marks a verdict for that arm.';

export function seedsCaption(view: EvidenceView): string {
  return `Each dot is one trained network; lines join the arms of the same seed, so crossing lines mean the seeds disagree.${view.blownUp.length ? ' × at the top: runs that blew up (diverged, failed or a non-finite error); each counts as the worst outcome in the paired tests.' : ''}`;
}

export const FIGURE_HEADINGS: Record<FigureName, string> = {
  curves: 'Extrapolation: error against test size',
  differences: 'Paired difference per size',
  seeds: 'Every seed',
};

/** The figures this view has, numbered in order (no paired-difference figure without a complete pair). */
export function evidenceFigures(view: EvidenceView): FigureEntry[] {
  const entries: Array<Omit<FigureEntry, 'number'>> = [
    { name: 'curves', heading: FIGURE_HEADINGS.curves, caption: curvesCaption(view), logScale: true, draw: (o) => extrapolationFigure(view, o) },
  ];
  if (view.diffs.length) {
    entries.push({ name: 'differences', heading: FIGURE_HEADINGS.differences, caption: DIFFERENCES_CAPTION, logScale: false, draw: (o) => differenceFigure(view, o) });
  }
  entries.push({ name: 'seeds', heading: FIGURE_HEADINGS.seeds, caption: seedsCaption(view), logScale: true, draw: (o) => seedFigure(view, o) });
  return entries.map((e, i) => ({ ...e, number: i + 1 }));
}

/** Why the errors are on a log scale when nobody chose it: they span more than AUTO_LOG_DECADES. */
export function autoLogReason(view: EvidenceView): string {
  return `the errors span ${view.errorDecades.toFixed(1)} decades, and a linear axis would flatten every curve but the largest`;
}

/**
 * One image with one name for assistive technology: the chart's SVG gets
 * role="img" and the figure's title; Observable Plot's aria-labels on its
 * mark groups ("line", "rect"), which ARIA forbids on elements without a
 * role, are dropped (the caption and tables carry the numbers in words).
 * Works on any DOM (the page's, or the report's light one).
 */
export function describeFigure(svg: Element, number: number, heading: string): void {
  for (const el of svg.querySelectorAll('[aria-label]')) if (!el.hasAttribute('role')) el.removeAttribute('aria-label');
  for (const el of svg.querySelectorAll('[aria-description]')) el.removeAttribute('aria-description');
  svg.setAttribute('role', 'img');
  svg.setAttribute('aria-label', `Fig. ${number}: ${heading}`);
}
