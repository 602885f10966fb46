/**
 * Scoring. Only nodes with mask 1 count (the task's maskPolicy says which are
 * excluded, e.g. unreachable nodes).
 *   mae   mean |prediction − target|
 *   mre   mean |prediction − target| / |target| over counted nodes with |target| ≥ 1e-6
 *         (nodes whose exact value is 0, like a source's own distance, are left out of mre only)
 *   miss  share of counted nodes outside the tolerance |prediction − target| ≤ max(5% · |target|, 0.05)
 */
export const RELATIVE_TOLERANCE = 0.05;
export const ABSOLUTE_TOLERANCE = 0.05;

export interface Metrics {
  mae: number;
  mre: number;
  miss: number;
  /** Counted nodes. */
  nodes: number;
}

export class MetricAccumulator {
  private abs = 0;
  private rel = 0;
  private relCount = 0;
  private misses = 0;
  private count = 0;

  add(prediction: number, target: number): void {
    const err = Math.abs(prediction - target);
    // A NaN prediction counts as an infinitely wrong one, never as a silent skip.
    const e = Number.isFinite(err) ? err : Infinity;
    this.abs += e;
    if (Math.abs(target) >= 1e-6) {
      this.rel += e / Math.abs(target);
      this.relCount++;
    }
    if (!(e <= Math.max(RELATIVE_TOLERANCE * Math.abs(target), ABSOLUTE_TOLERANCE))) this.misses++;
    this.count++;
  }

  result(): Metrics {
    return {
      mae: this.count ? this.abs / this.count : NaN,
      mre: this.relCount ? this.rel / this.relCount : NaN,
      miss: this.count ? this.misses / this.count : NaN,
      nodes: this.count,
    };
  }
}
