/**
 * The results document: spec, its hash, every run, the statistics, and a
 * fingerprint of the rounded metrics that two people can compare at a glance.
 */
import type { ExperimentSpec } from './spec.ts';
import type { RunResult } from './run.ts';
import { compareRuns, type Comparison } from './compare.ts';
import { canonicalJson, sha256Hex } from '../util/hash.ts';
// A named JSON import works under tsx, esbuild (the worker bundle) and Vite; the bundlers inline just this string.
import { version as packageVersion } from '../../package.json';

/**
 * package.json's version, read at import (tsx) or build (esbuild, Vite) time. Bump it whenever
 * the same spec gives different numbers: 0.2.0 scores the fit gate on fresh graphs, keeps weights
 * by the preset's metric and gives weight-carrying tasks inputs in weight units; 0.3.0 computes
 * the mlp update's input term x̂·W_x (+ b) once per forward pass instead of inside every step's
 * product (same mathematics, other float32 rounding).
 */
export const ENGINE_VERSION: string = packageVersion;
export const RESULTS_KIND = 'farfield-results';

export interface EngineInfo {
  name: 'farfield';
  version: string;
  backend: string;
  threads: number;
  host: 'node' | 'browser';
}

export interface ResultsDocument {
  kind: typeof RESULTS_KIND;
  version: 1;
  engine: EngineInfo;
  spec: ExperimentSpec;
  specHash: string;
  fingerprint: string;
  /** Runs expected in total / present in this document (a shard holds a subset). */
  runsExpected: number;
  complete: boolean;
  shard?: { index: number; count: number };
  runs: RunResult[];
  comparison: Comparison;
}

export function specHash(spec: ExperimentSpec): string {
  return sha256Hex(canonicalJson(spec)).slice(0, 16);
}

/**
 * 6 significant digits: enough to catch a real change, tolerant of print
 * formatting. Every non-finite value counts as null: JSON (results files,
 * journals, shards) writes NaN and ±Infinity as null, so a fingerprint taken
 * after a resume or a merge must not tell them apart either.
 */
function round(x: number | null | undefined): number | null {
  if (x === null || x === undefined || !Number.isFinite(x)) return null;
  return Number(x.toPrecision(6));
}

/**
 * Short hash of what the runs measured (status and rounded metrics, sorted by
 * run index). Wall times, hosts and dates are left out, so the same spec gives
 * the same fingerprint on any machine, host or shard layout.
 */
export function fingerprint(runs: readonly RunResult[]): string {
  const rows = [...runs]
    .sort((a, b) => a.index - b.index)
    .map((r) => [
      r.index,
      r.arm,
      r.seed,
      r.status,
      r.status === 'ok' ? null : r.divergedAt ?? null,
      r.inDistribution ? [round(r.inDistribution.mae), round(r.inDistribution.mre), round(r.inDistribution.miss)] : null,
      r.ladder.map((l) => [l.family, l.size, l.scale, round(l.metrics.mae), round(l.metrics.mre), round(l.metrics.miss)]),
    ]);
  return sha256Hex(canonicalJson(rows)).slice(0, 12);
}

export function buildResults(spec: ExperimentSpec, runs: readonly RunResult[], engine: EngineInfo, shard?: { index: number; count: number }): ResultsDocument {
  const sorted = [...runs].sort((a, b) => a.index - b.index);
  const runsExpected = spec.arms.length * spec.seeds.count;
  return {
    kind: RESULTS_KIND,
    version: 1,
    engine,
    spec,
    specHash: specHash(spec),
    fingerprint: fingerprint(sorted),
    runsExpected,
    complete: !shard && sorted.length === runsExpected,
    ...(shard ? { shard } : {}),
    runs: sorted,
    comparison: compareRuns(spec, sorted),
  };
}
