/**
 * The model's options as the model layer sees them: plain types, no schema.
 * The experiment spec (src/experiment/spec.ts) validates untrusted input into
 * exactly these shapes (a type-level check there keeps the two in step), so
 * the model, training and task layers never import from the experiment layer.
 */
import type { ActivationName, AggregatorName, MessageName, StepRuleName, TransformName, UpdateName } from './catalogue.ts';

export type { ActivationName, AggregatorName, MessageName, StepRuleName, TransformName, UpdateName } from './catalogue.ts';

/** How many message-passing steps a graph gets (see steps.ts). */
export interface StepRule {
  rule: StepRuleName;
  /** `fixed`: the step count. */
  count: number;
  /** `proportional`: steps = ceil(factor x nodes). */
  factor: number;
  /** `until-stable`: stop when the largest state change is below tolerance x (1 + largest state). */
  tolerance: number;
  /** Upper bound for every rule. */
  cap: number;
  /** Training only: a uniform random 0..trainJitter extra steps per batch. */
  trainJitter: number;
}

/** One transform for all inputs of a kind, or one per input feature. */
export type TransformChoice = TransformName | TransformName[];

export interface ModelOptions {
  hidden: number;
  aggregator: AggregatorName;
  aggregatorTemperature: number;
  /** false: every layer bias-free. */
  bias: boolean;
  activation: ActivationName;
  message: MessageName;
  messageTemperature: number;
  update: UpdateName;
  nodeTransform: TransformChoice;
  edgeTransform: TransformChoice;
  steps: StepRule;
}
