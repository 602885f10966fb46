/**
 * Live progress as plain rows: per run its phase, steps, ETA and loss
 * samples; overall done / total and an ETA. Pure functions of a run snapshot
 * and the clock, so the progress component only draws.
 */
import type { RunPhase, RunSnapshot, RunTrack } from './run-controller.ts';
import { armColor, armLetter } from './palette.ts';
import { duration } from './format.ts';

export interface RunRow {
  index: number;
  arm: string;
  armIndex: number;
  /** The arm's letter code (A, B, …). */
  letter: string;
  seed: number;
  seedIndex: number;
  color: string;
  phase: RunPhase;
  kept: boolean;
  /** "120 / 300 steps", "done", "failed" … */
  status: string;
  /** "≈ 40 s left", "kept from an earlier visit", the failure reason … */
  detail: string;
  fraction: number;
  losses: number[];
}

export interface ProgressView {
  rows: RunRow[];
  arms: Array<{ name: string; color: string; letter: string }>;
  seeds: number[];
  done: number;
  total: number;
  failed: number;
  running: number;
  fraction: number;
  elapsed: string;
  eta: string;
  summary: string;
}

function runFraction(track: RunTrack): number {
  if (track.phase === 'ok' || track.phase === 'diverged' || track.phase === 'failed') return 1;
  if (track.phase === 'running' && track.totalSteps > 0) return Math.min(0.97, track.step / track.totalSteps);
  return 0;
}

function rowFor(track: RunTrack, state: RunSnapshot['state'], now: number): RunRow {
  const fraction = runFraction(track);
  let status: string;
  let detail = '';
  switch (track.phase) {
    case 'waiting':
      status = state === 'running' ? 'queued' : 'not run';
      break;
    case 'running': {
      const elapsed = track.startedAt ? (now - track.startedAt) / 1000 : 0;
      if (track.totalSteps > 0) {
        status = `${track.step} / ${track.totalSteps} steps`;
        const left = track.step > 0 ? (elapsed * (track.totalSteps - track.step)) / track.step : NaN;
        detail = track.step >= track.totalSteps ? 'scoring on the ladder' : Number.isFinite(left) ? `≈ ${duration(left)} left` : 'starting';
      } else {
        status = 'starting';
        detail = 'building graphs';
      }
      break;
    }
    case 'ok':
      status = 'done';
      detail = track.kept ? 'kept from an earlier visit' : track.reused ? 'reused: the edit left this run unchanged' : `${track.step} steps in ${duration(track.seconds ?? NaN)}`;
      break;
    case 'diverged':
      status = 'diverged';
      detail = track.reason ?? '';
      break;
    case 'failed':
      status = 'failed';
      detail = track.reason ?? 'no reason given';
      break;
    case 'cancelled':
      status = 'cancelled';
      detail = `stopped at step ${track.step}`;
      break;
  }
  return {
    index: track.plan.index,
    arm: track.plan.arm,
    armIndex: track.plan.armIndex,
    letter: armLetter(track.plan.armIndex),
    seed: track.plan.seed,
    seedIndex: track.plan.seedIndex,
    color: armColor(track.plan.armIndex),
    phase: track.phase,
    kept: track.kept,
    status,
    detail,
    fraction,
    losses: track.losses,
  };
}

export function progressView(snapshot: RunSnapshot, now: number): ProgressView {
  const rows = snapshot.tracks.map((t) => rowFor(t, snapshot.state, now));
  const total = rows.length;
  const done = rows.filter((r) => r.phase === 'ok' || r.phase === 'diverged').length;
  const failed = rows.filter((r) => r.phase === 'failed').length;
  const running = rows.filter((r) => r.phase === 'running').length;
  const fraction = total ? rows.reduce((s, r) => s + r.fraction, 0) / total : 0;
  const arms: ProgressView['arms'] = [];
  for (const r of rows) if (!arms.some((a) => a.name === r.arm)) arms.push({ name: r.arm, color: r.color, letter: r.letter });
  const seeds = [...new Set(rows.map((r) => r.seed))];

  // Overall ETA from the pace of this session: work done (in runs) per second so far.
  let elapsed = '';
  let eta = '';
  if (snapshot.startedAt !== null) {
    const end = snapshot.state === 'running' ? now : (snapshot.finishedAt ?? now);
    const seconds = (end - snapshot.startedAt) / 1000;
    elapsed = duration(seconds);
    const sessionWork = rows.reduce((s, r) => s + (r.kept || snapshot.tracks[r.index]?.reused ? 0 : r.fraction), 0);
    const remaining = rows.reduce((s, r) => s + (1 - r.fraction), 0);
    if (snapshot.state === 'running' && sessionWork > 0.05 && seconds > 2) {
      eta = `≈ ${duration((seconds / sessionWork) * remaining)} to go`;
    } else if (snapshot.state === 'running') {
      eta = 'estimating…';
    }
  }
  const parts = [`${done} of ${total} runs done`];
  if (failed) parts.push(`${failed} failed`);
  if (running) parts.push(`${running} running`);
  return { rows, arms, seeds, done, total, failed, running, fraction, elapsed, eta, summary: parts.join(' · ') };
}

/** An SVG path through the values (log scale when they span more than 20×), in a w × h box. */
export function sparklinePath(values: readonly number[], width: number, height: number): string {
  const finite = values.filter((v) => Number.isFinite(v));
  if (finite.length < 2) return '';
  const positive = finite.every((v) => v > 0);
  const lo0 = Math.min(...finite);
  const hi0 = Math.max(...finite);
  const useLog = positive && hi0 / lo0 > 20;
  const f = (v: number) => (useLog ? Math.log(v) : v);
  const lo = f(lo0);
  const hi = f(hi0);
  const span = hi - lo || 1;
  const pad = 2;
  return finite
    .map((v, i) => {
      const x = pad + (i / (finite.length - 1)) * (width - 2 * pad);
      const y = pad + (1 - (f(v) - lo) / span) * (height - 2 * pad);
      return `${i === 0 ? 'M' : 'L'}${x.toFixed(1)},${y.toFixed(1)}`;
    })
    .join('');
}
