/**
 * Learning-rate schedules. A warm-up keeps Adam's first, poorly estimated
 * moments from throwing a deep unroll off course; the cosine decay then lets
 * the weights settle instead of rattling around a minimum at the full rate,
 * which is what gets the in-distribution error under the fit gate in fewer steps.
 */
import type { Schedule } from './options.ts';

/** The learning rate for 1-based training step `step` of `totalSteps`. */
export function learningRateAt(base: number, schedule: Schedule | null, step: number, totalSteps: number): number {
  if (!schedule || schedule.kind === 'constant') return base;
  const warmup = Math.min(schedule.warmup, totalSteps);
  if (step <= warmup) return (base * step) / warmup;
  const span = totalSteps - warmup;
  if (span <= 0) return base;
  const progress = Math.min(1, (step - warmup) / span);
  const floor = base * schedule.floor;
  return floor + (base - floor) * 0.5 * (1 + Math.cos(Math.PI * progress));
}
