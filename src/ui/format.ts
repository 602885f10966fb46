/** Number and time formatting for the sheet. */

export function num(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return x.toExponential(2).replace('-', '−');
  return Number(x.toPrecision(digits)).toString().replace('-', '−');
}

export function pValue(p: number): string {
  if (!Number.isFinite(p)) return '—';
  if (p < 0.001) return '< 0.001';
  return Number(p.toPrecision(2)).toString();
}

/** A proportion as a percentage with 2 significant digits: 0.006 → "0.6%", 0.081 → "8.1%"; ∞ for a blow-up. */
export function percent(x: number | null | undefined): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  return `${Number((100 * x).toPrecision(2))}%`.replace('-', '−');
}

export function duration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '—';
  if (seconds < 1) return '< 1 s';
  if (seconds < 90) return `${Math.round(seconds)} s`;
  const minutes = seconds / 60;
  if (minutes < 90) return `${Math.round(minutes)} min`;
  return `${(minutes / 60).toFixed(1)} h`;
}

/**
 * An axis tick in plain decimals: 0.01, 0.1, 1, 10, 1000 (never "10m" or
 * "1e-5": an SI suffix reads as a unit, metres or minutes, on an error axis).
 */
export function plainNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  let text: string;
  if (a >= 1e4) text = Math.round(x).toLocaleString('en-US');
  else if (a >= 1) text = String(Number(x.toPrecision(6)));
  else {
    // Four significant digits, written out: 0.0001235 rather than 1.235e-4.
    const digits = Math.min(20, Math.ceil(-Math.log10(a)) + 3);
    text = Number(x.toPrecision(4)).toFixed(digits).replace(/\.?0+$/, '');
  }
  return text.replace('-', '−');
}
