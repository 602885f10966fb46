/**
 * Forward-only message passing in edge chunks, for scoring a trained network on
 * one large graph (up to 100,000 nodes and 1,000,000 edges) without holding a
 * per-edge tensor for every edge at once. Training never comes here.
 *
 * Layout. Message edges are sorted by destination (stably, so each node's
 * incoming edges keep their order) and the nodes cut into contiguous ranges
 * whose incoming edges fit one chunk. A range's messages are computed on a
 * local copy of only the node states its edges touch, aggregated onto the
 * range, and the range's states updated; the new state is the concatenation of
 * the ranges. Every op involved is row-wise (matmuls, gathers, the update) or
 * runs over each node's incoming edges in edge order (the segment kernels), so
 * a node whose incoming edges share one chunk gets exactly the bits the
 * unchunked `MessagePassingNetwork.forward` gives.
 *
 * A node with more incoming edges than a chunk holds is split over several
 * chunks and its partial aggregates combined: sum adds, mean adds partial sums
 * and divides by the total count once, max/min take the larger/smaller, the
 * smooth aggregators combine with their own pairwise ⊕ (a log-sum-exp). A part
 * with no message for a node is never combined with the 0 an empty segment
 * yields. Max and min stay exact; sum, mean and the smooth ones then differ
 * from the unchunked sum by float32 rounding (another order of additions).
 *
 * Memory. Each step's temporaries are released range by range inside tf.tidy
 * and the previous state as soon as the next exists, so what stays is the
 * encoded input, two node states, the per-chunk index tensors and one chunk's
 * temporaries: O(nodes · hidden + edges · (edge features + 5)) numbers.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { MessagePassingNetwork, NetworkInputs } from './network.ts';
import { getAggregator, type Aggregator } from './aggregators.ts';
import { gatherRows, segmentSum } from './ops.ts';

/** Plain inputs of one (large) graph, already transformed: `GraphBatch` from train/batch.ts fits. */
export interface ChunkedGraph {
  nodes: number;
  nodeX: Float32Array;
  nodeFeatures: number;
  edgeX: Float32Array;
  edgeFeatures: number;
  src: Int32Array;
  dst: Int32Array;
}

export interface ChunkedOptions {
  steps: number;
  /** For until-stable: stop when max |Δh| < tolerance · (1 + max |h|), as `forward` does. */
  stopTolerance?: number;
  /** Message edges per chunk (default 65,536). */
  edgesPerChunk?: number;
}

/** One chunk's edges: local node copies, local endpoints, and the aggregation targets within its range. */
interface Part {
  localIds: tf.Tensor1D;
  localSrc: tf.Tensor1D;
  localDst: tf.Tensor1D;
  aggDst: tf.Tensor1D;
  edgeX: tf.Tensor2D;
  localNodes: number;
  /** [range nodes, 1]: 1 where this part carries a message for the node. */
  has: tf.Tensor2D;
}

interface Range {
  lo: number;
  hi: number;
  parts: Part[];
  /** [hi − lo, 1]: 1 where the node has any incoming message. */
  hasIncoming: tf.Tensor2D;
  /** [hi − lo, 1] incoming-message counts (for a mean split over parts). */
  counts: tf.Tensor2D;
}

export const DEFAULT_EDGES_PER_CHUNK = 65_536;

/** Destination-sorted edge order (a stable counting sort) and each node's first edge in it. */
function byDestination(graph: ChunkedGraph): { order: Int32Array; start: Int32Array } {
  const n = graph.nodes;
  const start = new Int32Array(n + 1);
  for (let e = 0; e < graph.dst.length; e++) start[graph.dst[e]! + 1]!++;
  for (let i = 0; i < n; i++) start[i + 1]! += start[i]!;
  const next = start.slice(0, n);
  const order = new Int32Array(graph.dst.length);
  for (let e = 0; e < graph.dst.length; e++) order[next[graph.dst[e]!]!++] = e;
  return { order, start };
}

/**
 * Local node numbering for one part, without a Map per part: `slot[node]` holds
 * the node's local number while `owner[node]` is this part's stamp. Large graphs
 * are scored next to a large JavaScript heap (the task instance), where
 * allocating one big Map per chunk made garbage collection dominate.
 */
interface Numbering {
  owner: Int32Array;
  slot: Int32Array;
  stamp: number;
}

function makePart(graph: ChunkedGraph, edges: Int32Array, lo: number, rangeNodes: number, numbering: Numbering): Part {
  const stamp = ++numbering.stamp;
  const { owner, slot } = numbering;
  const ids = new Int32Array(2 * edges.length);
  let count = 0;
  const localOf = (node: number): number => {
    if (owner[node] !== stamp) {
      owner[node] = stamp;
      slot[node] = count;
      ids[count++] = node;
    }
    return slot[node]!;
  };
  const E = edges.length;
  const ef = graph.edgeFeatures;
  const src = new Int32Array(E);
  const dst = new Int32Array(E);
  const agg = new Int32Array(E);
  const edgeX = new Float32Array(E * ef);
  const has = new Float32Array(rangeNodes);
  for (let k = 0; k < E; k++) {
    const e = edges[k]!;
    src[k] = localOf(graph.src[e]!);
    dst[k] = localOf(graph.dst[e]!);
    agg[k] = graph.dst[e]! - lo;
    has[agg[k]!] = 1;
    edgeX.set(graph.edgeX.subarray(e * ef, (e + 1) * ef), k * ef);
  }
  return {
    localIds: tf.tensor1d(ids.slice(0, count), 'int32'),
    localSrc: tf.tensor1d(src, 'int32'),
    localDst: tf.tensor1d(dst, 'int32'),
    aggDst: tf.tensor1d(agg, 'int32'),
    edgeX: tf.tensor2d(edgeX, [E, ef], 'float32'),
    localNodes: count,
    has: tf.tensor2d(has, [rangeNodes, 1], 'float32'),
  };
}

/** Cut the nodes into ranges whose incoming edges fit a chunk; a node above the budget gets a range of its own, split into parts. */
function planRanges(graph: ChunkedGraph, budget: number): Range[] {
  const { order, start } = byDestination(graph);
  const ranges: Range[] = [];
  const numbering: Numbering = { owner: new Int32Array(graph.nodes), slot: new Int32Array(graph.nodes), stamp: 0 };
  const close = (lo: number, hi: number) => {
    const first = start[lo]!;
    const last = start[hi]!;
    const parts: Part[] = [];
    if (last > first) {
      for (let p = first; p < last; p += budget) parts.push(makePart(graph, order.subarray(p, Math.min(p + budget, last)), lo, hi - lo, numbering));
    }
    const counts = new Float32Array(hi - lo);
    for (let i = lo; i < hi; i++) counts[i - lo] = start[i + 1]! - start[i]!;
    ranges.push({
      lo,
      hi,
      parts,
      hasIncoming: tf.tensor2d(counts.map((c) => Math.min(c, 1)), [hi - lo, 1], 'float32'),
      counts: tf.tensor2d(counts, [hi - lo, 1], 'float32'),
    });
  };
  let lo = 0;
  for (let i = 0; i < graph.nodes; i++) {
    const inRange = start[i]! - start[lo]!;
    const degree = start[i + 1]! - start[i]!;
    // Also bound the nodes per range, so a long run of message-less nodes does not make one huge slice.
    if (i > lo && (inRange + degree > budget || i - lo >= budget)) {
      close(lo, i);
      lo = i;
    }
  }
  if (graph.nodes > lo) close(lo, graph.nodes);
  return ranges;
}

function disposeRanges(ranges: readonly Range[]): void {
  for (const r of ranges) {
    r.hasIncoming.dispose();
    r.counts.dispose();
    for (const p of r.parts) for (const t of [p.localIds, p.localSrc, p.localDst, p.aggDst, p.edgeX, p.has]) t.dispose();
  }
}

/**
 * ⊕ of two partial aggregates where each side may lack messages for a node:
 * such a side's empty-segment 0 must not enter (max(−3, 0) would be 0).
 */
export function combinePartials(
  aggregator: Aggregator,
  acc: tf.Tensor2D,
  accHas: tf.Tensor2D,
  part: tf.Tensor2D,
  partHas: tf.Tensor2D,
  temperature: number,
): tf.Tensor2D {
  return tf.tidy(() => {
    const both = tf.mul(accHas, partHas);
    const combined = aggregator.combine(acc, part, temperature);
    const onlyPart = tf.mul(tf.sub(1, accHas), partHas);
    const onlyAcc = tf.mul(accHas, tf.sub(1, partHas));
    // Select, not blend: a selected operand passes through bit for bit.
    return tf.where(tf.cast(both, 'bool'), combined, tf.where(tf.cast(onlyPart, 'bool'), part, tf.where(tf.cast(onlyAcc, 'bool'), acc, tf.zerosLike(acc)))) as tf.Tensor2D;
  });
}

/** The aggregate of one range: one part directly; several combined (mean as sums over the total count). */
function aggregateRange(network: MessagePassingNetwork, aggregator: Aggregator, range: Range, h: tf.Tensor2D): tf.Tensor2D {
  const size = range.hi - range.lo;
  const tau = network.options.aggregatorTemperature;
  const messagesOf = (p: Part): tf.Tensor2D => {
    const hl = gatherRows(h, p.localIds);
    const inputs: NetworkInputs = { nodeX: hl, edgeX: p.edgeX, src: p.localSrc, dst: p.localDst, nodes: p.localNodes };
    return network.message(hl, network.edgeTerm(p.edgeX), inputs);
  };
  if (range.parts.length === 0) return tf.zeros([size, network.options.hidden]) as tf.Tensor2D;
  if (range.parts.length === 1) {
    const p = range.parts[0]!;
    return aggregator.aggregate({ messages: messagesOf(p), dst: p.aggDst, nodes: size, hasIncoming: range.hasIncoming, temperature: tau });
  }
  const mean = aggregator.name === 'mean';
  const sum = getAggregator('sum');
  let acc: tf.Tensor2D | null = null;
  let accHas: tf.Tensor2D | null = null;
  for (const p of range.parts) {
    const partial = mean
      ? segmentSum(messagesOf(p), p.aggDst, size)
      : aggregator.aggregate({ messages: messagesOf(p), dst: p.aggDst, nodes: size, hasIncoming: p.has, temperature: tau });
    if (acc === null || accHas === null) {
      acc = partial;
      accHas = p.has;
    } else {
      acc = combinePartials(mean ? sum : aggregator, acc, accHas, partial, p.has, tau);
      accHas = tf.maximum(accHas, p.has) as tf.Tensor2D;
    }
  }
  // Mean: the segment kernel divides only where the count exceeds 1; dividing by max(count, 1) gives the same.
  return mean ? (tf.div(acc!, tf.maximum(range.counts, 1)) as tf.Tensor2D) : acc!;
}

/**
 * The network's prediction for one graph, computed chunk by chunk. Same
 * numbers as `predict` with `forward` (see the file comment for when they are
 * bit-identical); returns one value per node.
 */
export function chunkedPredict(network: MessagePassingNetwork, graph: ChunkedGraph, options: ChunkedOptions): Float32Array {
  const budget = options.edgesPerChunk ?? DEFAULT_EDGES_PER_CHUNK;
  if (!Number.isInteger(budget) || budget < 1) throw new Error(`model/chunked-forward: edgesPerChunk must be a whole number >= 1, got ${String(budget)}`);
  const aggregator = getAggregator(network.options.aggregator);
  const H = network.options.hidden;
  const ranges = planRanges(graph, budget);
  const nodeX = tf.tensor2d(graph.nodeX, [graph.nodes, graph.nodeFeatures], 'float32');
  let encoded: tf.Tensor2D | null = null;
  let inputTerm: tf.Tensor2D | null = null;
  let h: tf.Tensor2D | null = null;
  try {
    encoded = tf.tidy(() => network.encode(nodeX));
    // Row-wise products: a chunk's rows of x̂·W_x are the rows of the whole product, bit for bit.
    if (network.options.update === 'mlp') inputTerm = tf.tidy(() => network.stepConstants(encoded!).inputTerm!);
    h = encoded;
    for (let t = 0; t < options.steps; t++) {
      const previous: tf.Tensor2D = h;
      const slices: tf.Tensor2D[] = [];
      try {
        for (const range of ranges) {
          const size = range.hi - range.lo;
          slices.push(
            tf.tidy(() => {
              const a = aggregateRange(network, aggregator, range, previous);
              const hs = tf.slice(previous, [range.lo, 0], [size, H]) as tf.Tensor2D;
              const rows = (x: tf.Tensor2D) => tf.slice(x, [range.lo, 0], [size, H]) as tf.Tensor2D;
              return network.update(hs, a, { encoded: rows(encoded!), inputTerm: inputTerm && rows(inputTerm) }, range.hasIncoming);
            }),
          );
        }
        h = slices.length === 1 ? slices[0]! : (tf.concat(slices, 0) as tf.Tensor2D);
      } finally {
        if (slices.length > 1) for (const s of slices) s.dispose();
      }
      let stable = false;
      if (options.stopTolerance !== undefined) {
        const next = h;
        const [change, size] = tf.tidy(() => [tf.max(tf.abs(tf.sub(next, previous))).dataSync()[0]!, tf.max(tf.abs(next)).dataSync()[0]!]);
        stable = change! < options.stopTolerance * (1 + size!);
      }
      if (previous !== encoded) previous.dispose();
      if (stable) break;
    }
    const last = h;
    const prediction = tf.tidy(() => network.decode(last));
    const values = prediction.dataSync() as Float32Array;
    prediction.dispose();
    return values.slice();
  } finally {
    if (h && h !== encoded) h.dispose();
    encoded?.dispose();
    inputTerm?.dispose();
    nodeX.dispose();
    disposeRanges(ranges);
  }
}
