/**
 * Batching by disjoint union: many small graphs become one big graph with
 * renumbered nodes, so a training step runs a handful of large ops instead of
 * many tiny ones (tiny models are dominated by per-op overhead).
 */
import type { TaskInstance } from '../tasks/types.ts';
import type { TransformName } from '../model/catalogue.ts';
import { applyTransform, type FeatureStats } from '../model/transforms.ts';

export interface GraphBatch {
  nodes: number;
  edges: number;
  graphs: number;
  /** Row-major [nodes, nodeFeatures], transformed. */
  nodeX: Float32Array;
  nodeFeatures: number;
  /** Row-major [edges, edgeFeatures], transformed. */
  edgeX: Float32Array;
  edgeFeatures: number;
  src: Int32Array;
  dst: Int32Array;
  target: Float32Array;
  mask: Float32Array;
  /** Which graph each node belongs to. */
  graphOf: Int32Array;
  /** Largest node count among the batch's graphs (drives the step rule). */
  maxNodes: number;
  /** Step-wise supervision only (`stepTargetsFor`): targets for the decoded state after each step. */
  stepTargets?: StepTargets;
}

/**
 * Per-step targets for steps 1..`steps`, row-major [nodes, steps] (column k − 1
 * is step k, matching the columns of the concatenated forward trace).
 */
export interface StepTargets {
  steps: number;
  target: Float32Array;
  /** 1 where step k is supervised: the node counts (mask 1) and the exact state after k rounds is finite. */
  mask: Float32Array;
}

export interface FeatureTransforms {
  node: TransformName[];
  edge: TransformName[];
  nodeStats: FeatureStats[];
  edgeStats: FeatureStats[];
}

/** Scale every feature by lambda before transforms (used by homogeneity audits and scale probes). */
export interface BatchOptions {
  inputScale?: number;
}

export function makeBatch(instances: readonly TaskInstance[], transforms: FeatureTransforms, options: BatchOptions = {}): GraphBatch {
  const inputScale = options.inputScale ?? 1;
  let nodes = 0;
  let edges = 0;
  let maxNodes = 0;
  for (const inst of instances) {
    nodes += inst.nodes;
    edges += inst.messageSrc.length;
    maxNodes = Math.max(maxNodes, inst.nodes);
  }
  const nf = transforms.node.length;
  const ef = transforms.edge.length;
  const nodeX = new Float32Array(nodes * nf);
  const edgeX = new Float32Array(edges * ef);
  const src = new Int32Array(edges);
  const dst = new Int32Array(edges);
  const target = new Float32Array(nodes);
  const mask = new Float32Array(nodes);
  const graphOf = new Int32Array(nodes);
  let nodeBase = 0;
  let edgeBase = 0;
  instances.forEach((inst, g) => {
    for (let i = 0; i < inst.nodes; i++) {
      const row = inst.nodeInputs[i] ?? [];
      for (let j = 0; j < nf; j++) {
        nodeX[(nodeBase + i) * nf + j] = applyTransform(transforms.node[j]!, (row[j] ?? 0) * inputScale, transforms.nodeStats[j]);
      }
      target[nodeBase + i] = inst.target[i] ?? 0;
      mask[nodeBase + i] = inst.mask[i] ?? 0;
      graphOf[nodeBase + i] = g;
    }
    const m = inst.messageSrc.length;
    for (let e = 0; e < m; e++) {
      src[edgeBase + e] = inst.messageSrc[e]! + nodeBase;
      dst[edgeBase + e] = inst.messageDst[e]! + nodeBase;
      const row = inst.edgeInputs[e] ?? [];
      for (let j = 0; j < ef; j++) {
        edgeX[(edgeBase + e) * ef + j] = applyTransform(transforms.edge[j]!, (row[j] ?? 0) * inputScale, transforms.edgeStats[j]);
      }
    }
    nodeBase += inst.nodes;
    edgeBase += m;
  });
  return { nodes, edges, graphs: instances.length, nodeX, nodeFeatures: nf, edgeX, edgeFeatures: ef, src, dst, target, mask, graphOf, maxNodes };
}

/**
 * Step-wise supervision targets for a batch of `instances` (same order as
 * `makeBatch`), steps 1..`steps`: step k ≤ depth holds the exact algorithm's
 * state after k rounds (`roundStates`), with mask 0 where that state is not
 * finite yet or the node's own mask is 0; a step past the instance's depth
 * holds the final target and mask (the algorithm has reached its fixed point).
 */
export function stepTargetsFor(instances: readonly TaskInstance[], steps: number): StepTargets {
  if (!Number.isInteger(steps) || steps < 0) throw new Error(`train/batch: steps must be an integer >= 0, got ${String(steps)}`);
  let nodes = 0;
  for (const inst of instances) nodes += inst.nodes;
  const target = new Float32Array(nodes * steps);
  const mask = new Float32Array(nodes * steps);
  let nodeBase = 0;
  instances.forEach((inst, g) => {
    const states = inst.roundStates ?? [];
    if (inst.roundStates === undefined && inst.depth > 0) {
      throw new Error(`train/batch: step-wise supervision needs the intermediate states of every training graph; graph ${g} has none (build it with roundStates)`);
    }
    for (let k = 1; k <= steps; k++) {
      const state = k <= states.length ? states[k - 1]! : null;
      for (let i = 0; i < inst.nodes; i++) {
        const at = (nodeBase + i) * steps + (k - 1);
        const counted = inst.mask[i] ?? 0;
        if (state === null) {
          target[at] = inst.target[i] ?? 0;
          mask[at] = counted;
        } else {
          const v = state[i] ?? NaN;
          const reached = Number.isFinite(v) && counted !== 0;
          target[at] = reached ? v : 0;
          mask[at] = reached ? counted : 0;
        }
      }
    }
    nodeBase += inst.nodes;
  });
  return { steps, target, mask };
}
