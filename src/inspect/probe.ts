/**
 * The shape every probe returns: the learned function against exact truth, as
 * a curve a plot can draw, with the range seen in training so the plot can
 * shade it. Plain JSON (non-finite numbers become null in JSON). Also the two
 * things done with finished probes: the worst deviation inside and outside
 * the trained range (`probeSummary`), and the pointwise mean over seeds
 * (`meanProbe`).
 *
 * The probes themselves, one file each: scale-sweep.ts, length-sweep.ts,
 * message-probe.ts. Host-agnostic: no node: imports.
 */
import { mean } from '../experiment/statistics.ts';

export type ProbeKind = 'scale' | 'length' | 'message';

export interface ProbePoint {
  x: number;
  predicted: number;
  truth: number;
  /** Mean absolute error over the counted nodes behind this point (scale probe), else |predicted − truth|. */
  mae: number;
}

export interface Probe {
  kind: ProbeKind;
  title: string;
  xLabel: string;
  yLabel: string;
  /** How to draw x. */
  xScale: 'log' | 'linear';
  /** The x interval seen in training (shade it); a zero-width interval is a single trained value. */
  trainingRange: [number, number];
  points: ProbePoint[];
  /** Exactly what is plotted, and against which relation. */
  note: string;
  /** Set (with no points) when the probe does not apply to this task. */
  unavailable?: string;
  /** Extra numbers behind the curve (e.g. the typical sender value of the message probe). */
  details?: Record<string, number | string>;
}

export interface ProbeSummary {
  kind: ProbeKind;
  /**
   * Largest relative deviation mae / |truth| among points inside / outside the
   * training range (null: no such point). A truth of 0 is floored at
   * `floor` × the largest |truth| on the curve.
   */
  worstInside: { x: number; relative: number } | null;
  worstOutside: { x: number; relative: number } | null;
}

/** Worst relative deviation mae / |truth| inside and outside the trained range. */
export function probeSummary(probe: Probe, floor = 1e-6): ProbeSummary {
  let inside: ProbeSummary['worstInside'] = null;
  let outside: ProbeSummary['worstOutside'] = null;
  const largest = Math.max(0, ...probe.points.map((p) => (Number.isFinite(p.truth) ? Math.abs(p.truth) : 0)));
  const least = Math.max(floor * largest, 1e-12);
  for (const p of probe.points) {
    const rel = Number.isFinite(p.mae) ? p.mae / Math.max(Math.abs(p.truth), least) : Infinity;
    const inRange = p.x >= probe.trainingRange[0] && p.x <= probe.trainingRange[1];
    const slot = inRange ? inside : outside;
    if (!slot || rel > slot.relative || Number.isNaN(slot.relative)) {
      if (inRange) inside = { x: p.x, relative: rel };
      else outside = { x: p.x, relative: rel };
    }
  }
  return { kind: probe.kind, worstInside: inside, worstOutside: outside };
}

/** Pointwise mean of the same probe over seeds (x from the first; predicted, truth and mae averaged). */
export function meanProbe(probes: readonly Probe[]): Probe | null {
  const first = probes[0];
  if (!first) return null;
  if (first.unavailable) return first;
  const points = first.points.map((p, i) => {
    const at = probes.map((q) => q.points[i]).filter((q): q is ProbePoint => q !== undefined);
    return { x: p.x, predicted: mean(at.map((q) => q.predicted)), truth: mean(at.map((q) => q.truth)), mae: mean(at.map((q) => q.mae)) };
  });
  const { details: _details, ...rest } = first;
  return { ...rest, points, note: `${first.note} Mean over ${probes.length} seed(s).` };
}
