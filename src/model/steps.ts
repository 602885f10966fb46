/**
 * Step rules: how many message-passing steps a graph gets. The same rule applies
 * at training and at test sizes, so a larger graph gets more steps.
 */
import type { StepRule } from './options.ts';
import type { Rng } from '../util/rng.ts';

/** Step count for a graph of `nodes` nodes; `until-stable` returns its cap (the loop may stop earlier). */
export function stepsFor(rule: StepRule, nodes: number): number {
  let steps: number;
  switch (rule.rule) {
    case 'fixed':
      steps = rule.count;
      break;
    case 'nodes':
      steps = nodes;
      break;
    case 'proportional':
      steps = Math.ceil(rule.factor * nodes);
      break;
    case 'until-stable':
      steps = rule.cap;
      break;
  }
  return Math.max(1, Math.min(steps, rule.cap));
}

/** Training step count: the rule at the batch's largest graph plus a seeded 0..trainJitter extra. */
export function trainingStepsFor(rule: StepRule, maxNodes: number, rng: Rng): number {
  const base = stepsFor(rule, maxNodes);
  const extra = rule.trainJitter > 0 && rule.rule !== 'until-stable' ? rng.int(0, rule.trainJitter) : 0;
  return Math.min(base + extra, rule.cap);
}
