/**
 * Exports: figures as SVG and PNG, results as the CLI's JSON document (which
 * holds the fit gate, the constant baselines and the adjusted p-values under
 * `comparison`) and a flat CSV (one row per run and rung). Downloads are made
 * from Blobs in the page; nothing is sent anywhere.
 */
import type { ResultsDocument } from '../experiment/results.ts';
import type { RunResult } from '../experiment/run.ts';
import { rungKey } from '../experiment/compare.ts';
import { PAPER } from './palette.ts';

/** The standalone text of an SVG element (namespaces set, a paper background behind it). */
export function svgText(svg: SVGSVGElement): string {
  const copy = svg.cloneNode(true) as SVGSVGElement;
  copy.setAttribute('xmlns', 'http://www.w3.org/2000/svg');
  copy.setAttribute('xmlns:xlink', 'http://www.w3.org/1999/xlink');
  const { width, height } = svgSize(svg);
  copy.setAttribute('width', String(width));
  copy.setAttribute('height', String(height));
  const background = document.createElementNS('http://www.w3.org/2000/svg', 'rect');
  background.setAttribute('width', '100%');
  background.setAttribute('height', '100%');
  background.setAttribute('fill', PAPER);
  copy.insertBefore(background, copy.firstChild);
  return new XMLSerializer().serializeToString(copy);
}

function svgSize(svg: SVGSVGElement): { width: number; height: number } {
  const viewBox = svg.viewBox?.baseVal;
  const width = Number(svg.getAttribute('width')) || viewBox?.width || svg.clientWidth || 640;
  const height = Number(svg.getAttribute('height')) || viewBox?.height || svg.clientHeight || 400;
  return { width, height };
}

/** Rasterise an SVG at `scale` × its size. */
export async function svgToPng(svg: SVGSVGElement, scale = 2): Promise<Blob> {
  const { width, height } = svgSize(svg);
  const url = URL.createObjectURL(new Blob([svgText(svg)], { type: 'image/svg+xml' }));
  try {
    const image = new Image();
    image.decoding = 'async';
    await new Promise<void>((resolve, reject) => {
      image.onload = () => resolve();
      image.onerror = () => reject(new Error('the figure could not be rasterised'));
      image.src = url;
    });
    const canvas = document.createElement('canvas');
    canvas.width = Math.round(width * scale);
    canvas.height = Math.round(height * scale);
    const context = canvas.getContext('2d');
    if (!context) throw new Error('no 2-D canvas in this browser');
    context.fillStyle = PAPER;
    context.fillRect(0, 0, canvas.width, canvas.height);
    context.drawImage(image, 0, 0, canvas.width, canvas.height);
    return await new Promise<Blob>((resolve, reject) => canvas.toBlob((blob) => (blob ? resolve(blob) : reject(new Error('PNG encoding failed'))), 'image/png'));
  } finally {
    URL.revokeObjectURL(url);
  }
}

export function download(name: string, data: Blob | string, type = 'application/octet-stream'): void {
  const blob = typeof data === 'string' ? new Blob([data], { type }) : data;
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  link.rel = 'noopener';
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function resultsJson(doc: ResultsDocument): string {
  return JSON.stringify(doc, null, 1) + '\n';
}

function csvCell(value: unknown): string {
  if (value === null || value === undefined) return '';
  const text = typeof value === 'number' ? (Number.isFinite(value) ? String(value) : String(value)) : String(value);
  // Quote anything that could split a cell or be read as a spreadsheet formula.
  if (/[",\n\r]/.test(text) || /^[=+\-@\t]/.test(text) && typeof value !== 'number') return `"${text.replace(/"/g, '""')}"`;
  return text;
}

export const CSV_COLUMNS = [
  'spec_hash',
  'run',
  'arm',
  'seed',
  'status',
  'reason',
  'set',
  'family',
  'nodes',
  'weight_scale',
  'mae',
  'mre',
  'miss',
  'depth_mean',
  'depth_max',
  'mean_degree',
  'steps_done',
  'kept_step',
  'seconds',
  // What the statistics made of the row (test rows; the fit gate on every row of the arm).
  'metric',
  'blew_up',
  'best_constant_mae',
  'best_constant_mre',
  'best_constant_miss',
  'train_constant_mae',
  'train_constant_mre',
  'train_constant_miss',
  'beats_best_constant',
  'rung_tested',
  'arm_relative_error',
  'arm_beats_constant',
  'no_arm_beats_constant',
  'fit_gate',
  'arm_fit_median_mre',
  'arm_fitted',
] as const;

/** A number, or blank when it is not known (NaN); ±Infinity stays, it means a blow-up. */
function known(x: number | undefined): number | string {
  return x === undefined || Number.isNaN(x) ? '' : x;
}

function blewUp(run: RunResult): boolean {
  return run.status === 'diverged' || run.status === 'failed';
}

/**
 * One row per run and rung (set 'test'), plus per finished run one
 * 'in-distribution' row (fresh graphs of the training sizes: the fit gate reads
 * its mre) and one 'validation' row (the graphs that chose the kept weights).
 * A run that blew up (diverged or failed) gets a 'test' row per rung with no
 * metrics and blew_up = true: it counts as the worst outcome, so it is listed,
 * not dropped; a cancelled run gets one row with no set.
 *
 * Per test row: the seed's own constant baselines (best: the optimal constant
 * for the rung's targets; train: the constant fitted on the training graphs),
 * whether the run beats the best constant in the preset's `metric`, whether
 * the rung is tested, and the arm's mean relative error and whether its mean
 * beats the best constant at that rung. On every row: the arm's fit gate.
 */
export function resultsCsv(doc: ResultsDocument): string {
  const { spec, comparison } = doc;
  const metric = spec.metric;
  const rows: unknown[][] = [[...CSV_COLUMNS]];
  const trainSizes = `${spec.train.sizes[0]}-${spec.train.sizes[1]}`;
  const family = spec.test.family ?? spec.train.family;
  const rungs = new Map(comparison.rungs.map((r) => [rungKey(r.family, r.size, r.scale), r]));
  const blank = (count: number) => Array.from({ length: count }, () => '');
  for (const run of doc.runs) {
    const head = [doc.specHash, run.index, run.arm, run.seed, run.status, run.reason ?? ''];
    const tail = [run.stepsDone, run.keptStep, run.seconds];
    const fit = comparison.fit?.find((f) => f.armIndex === run.armIndex);
    const gate = [known(fit?.gate), known(fit?.median), fit?.fitted ?? ''];
    const setRow = (set: string, m: { mae: number; mre: number; miss: number }) =>
      rows.push([...head, set, spec.train.family, trainSizes, 1, m.mae, m.mre, m.miss, '', '', '', ...tail, metric, false, ...blank(11), ...gate]);
    if (run.inDistribution) setRow('in-distribution', run.inDistribution);
    if (run.validation) setRow('validation', run.validation);
    const rungStats = (key: string) => {
      const rung = rungs.get(key);
      const arm = rung?.arms.find((a) => a.armIndex === run.armIndex);
      return [rung ? rung.tested !== false : '', known(arm?.relative), arm?.beatsConstant ?? '', rung?.noArmBeatsConstant ?? ''];
    };
    if (blewUp(run) && run.ladder.length === 0) {
      for (const size of spec.test.sizes) {
        for (const scale of spec.test.weightScales) {
          rows.push([...head, 'test', family, size, scale, ...blank(6), ...tail, metric, true, ...blank(7), ...rungStats(rungKey(family, size, scale)), ...gate]);
        }
      }
      continue;
    }
    if (run.ladder.length === 0) rows.push([...head, ...blank(10), ...tail, metric, blewUp(run), ...blank(11), ...gate]);
    for (const rung of run.ladder) {
      const value = rung.metrics[metric];
      const finite = typeof value === 'number' && Number.isFinite(value);
      const b = rung.baseline;
      const best = b?.best[metric];
      rows.push([
        ...head,
        'test',
        rung.family,
        rung.size,
        rung.scale,
        rung.metrics.mae,
        rung.metrics.mre,
        rung.metrics.miss,
        rung.depthMean,
        rung.depthMax,
        rung.meanDegree,
        ...tail,
        metric,
        blewUp(run) || !finite,
        known(b?.best.mae),
        known(b?.best.mre),
        known(b?.best.miss),
        known(b?.train.mae),
        known(b?.train.mre),
        known(b?.train.miss),
        best === undefined || !Number.isFinite(best) ? '' : finite && value < best,
        ...rungStats(rungKey(rung.family, rung.size, rung.scale)),
        ...gate,
      ]);
    }
  }
  return rows.map((row) => row.map(csvCell).join(',')).join('\n') + '\n';
}
