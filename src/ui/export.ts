/**
 * Exports: figures as SVG and PNG, results as the CLI's JSON document and a
 * flat CSV (one row per run and rung). Downloads are made from Blobs in the
 * page; nothing is sent anywhere.
 */
import type { ResultsDocument } from '../experiment/results.ts';
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
] as const;

/** One row per run and rung, plus one 'validation' row per run (in-distribution). */
export function resultsCsv(doc: ResultsDocument): string {
  const rows: unknown[][] = [[...CSV_COLUMNS]];
  const trainSizes = `${doc.spec.train.sizes[0]}-${doc.spec.train.sizes[1]}`;
  for (const run of doc.runs) {
    const head = [doc.specHash, run.index, run.arm, run.seed, run.status, run.reason ?? ''];
    const tail = [run.stepsDone, run.keptStep, run.seconds];
    if (run.inDistribution) {
      const m = run.inDistribution;
      rows.push([...head, 'validation', doc.spec.train.family, trainSizes, 1, m.mae, m.mre, m.miss, '', '', '', ...tail]);
    }
    if (run.ladder.length === 0) rows.push([...head, '', '', '', '', '', '', '', '', '', '', ...tail]);
    for (const rung of run.ladder) {
      rows.push([...head, 'test', rung.family, rung.size, rung.scale, rung.metrics.mae, rung.metrics.mre, rung.metrics.miss, rung.depthMean, rung.depthMax, rung.meanDegree, ...tail]);
    }
  }
  return rows.map((row) => row.map(csvCell).join(',')).join('\n') + '\n';
}
