/**
 * Batching by disjoint union: many small graphs become one big graph with
 * renumbered nodes, so a training step runs a handful of large ops instead of
 * many tiny ones (tiny models are dominated by per-op overhead).
 */
import type { TaskInstance } from '../tasks/types.ts';
import type { TransformName } from '../experiment/spec.ts';
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
