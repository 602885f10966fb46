/**
 * Graph ops for message passing: gather rows by index, and per-segment
 * sum / mean / max / min (a segment is a node; ids say which node each edge
 * row belongs to). Work on the 'wasm' and 'cpu' backends; every op except
 * segmentCounts is differentiable (gradients are registered kernels, see
 * src/engine/kernels-graph.ts), and so are their gradients.
 *
 * Shapes: x is [rows, channels] float32 (gatherRows also copies int32);
 * indices / segmentIds are 1-D int32
 * with values in range (out-of-range values throw). Semantics:
 * - Empty segments give 0 for sum, mean, max and min.
 * - Max/min send the whole gradient of a (segment, channel) to its single
 *   arg-max/arg-min edge; ties go to the lowest edge index.
 * - Outputs are bit-identical for equal inputs on the same backend.
 */
import * as tf from '@tensorflow/tfjs-core';
import { K, registerGraphKernels } from '../engine/kernels-graph.ts';
import { PAIR_KERNELS, registerPairKernels } from '../engine/kernels-pair.ts';

// Registering is cheap and backend-independent; doing it here means the ops
// also work if a caller selected a backend with tf.setBackend directly.
registerGraphKernels('wasm');
registerGraphKernels('cpu');

function check2d(where: string, x: tf.Tensor): void {
  if (x.rank !== 2) throw new Error(`model/ops ${where}: x must be 2-D [rows, channels], got shape [${x.shape}]`);
}

function checkIds(where: string, ids: tf.Tensor, what: string): void {
  if (ids.rank !== 1 || ids.dtype !== 'int32') {
    throw new Error(`model/ops ${where}: ${what} must be a 1-D int32 tensor, got ${ids.dtype} [${ids.shape}]`);
  }
}

function checkSegments(where: string, x: tf.Tensor, ids: tf.Tensor, numSegments: number): void {
  check2d(where, x);
  if (x.dtype !== 'float32') throw new Error(`model/ops ${where}: x must be float32, got ${x.dtype}`);
  checkIds(where, ids, 'segmentIds');
  if (ids.shape[0] !== x.shape[0]) {
    throw new Error(`model/ops ${where}: ${ids.shape[0]} segment ids for ${x.shape[0]} rows`);
  }
  if (!Number.isInteger(numSegments) || numSegments < 0) {
    throw new Error(`model/ops ${where}: numSegments must be a non-negative integer, got ${numSegments}`);
  }
}

/** out[e, :] = x[indices[e], :]. Gradient wrt x: segmentSum(dy, indices, rows of x). */
export function gatherRows(x: tf.Tensor2D, indices: tf.Tensor1D): tf.Tensor2D {
  check2d('gatherRows', x);
  checkIds('gatherRows', indices, 'indices');
  return tf.engine().runKernel(K.gatherRows, { x, indices }, { numRows: x.shape[0] }) as tf.Tensor2D;
}

/** out[s, :] = sum of x[e, :] over e with segmentIds[e] = s; empty segment = 0. Gradient: gatherRows(dy, segmentIds). */
export function segmentSum(x: tf.Tensor2D, segmentIds: tf.Tensor1D, numSegments: number): tf.Tensor2D {
  checkSegments('segmentSum', x, segmentIds, numSegments);
  return tf.engine().runKernel(K.segmentSum, { x, segmentIds }, { numSegments }) as tf.Tensor2D;
}

function extreme(name: 'segmentMax' | 'segmentMin', x: tf.Tensor2D, ids: tf.Tensor1D, numSegments: number): tf.Tensor2D {
  checkSegments(name, x, ids, numSegments);
  const [values, arg] = tf.engine().runKernel(
    K[name],
    { x, segmentIds: ids },
    { numSegments, numRows: x.shape[0] },
  ) as tf.Tensor[];
  // The gradient keeps its own copy of `arg` when recording; ours is not needed.
  arg.dispose();
  return values as tf.Tensor2D;
}

/**
 * Per segment and channel maximum; EMPTY SEGMENT = 0. The gradient goes
 * entirely to the arg-max edge (ties: lowest edge index).
 */
export function segmentMax(x: tf.Tensor2D, segmentIds: tf.Tensor1D, numSegments: number): tf.Tensor2D {
  return extreme('segmentMax', x, segmentIds, numSegments);
}

/**
 * Per segment and channel minimum; EMPTY SEGMENT = 0. The gradient goes
 * entirely to the arg-min edge (ties: lowest edge index).
 */
export function segmentMin(x: tf.Tensor2D, segmentIds: tf.Tensor1D, numSegments: number): tf.Tensor2D {
  return extreme('segmentMin', x, segmentIds, numSegments);
}

/** Per segment mean = sum / max(count, 1); empty segment = 0. */
export function segmentMean(x: tf.Tensor2D, segmentIds: tf.Tensor1D, numSegments: number): tf.Tensor2D {
  checkSegments('segmentMean', x, segmentIds, numSegments);
  return tf.engine().runKernel(
    K.segmentMean,
    { x, segmentIds },
    { numSegments, numRows: x.shape[0] },
  ) as tf.Tensor2D;
}

/** Number of rows per segment as float32 [numSegments, 1]; not differentiable. */
export function segmentCounts(segmentIds: tf.Tensor1D, numSegments: number): tf.Tensor2D {
  checkIds('segmentCounts', segmentIds, 'segmentIds');
  if (!Number.isInteger(numSegments) || numSegments < 0) {
    throw new Error(`model/ops segmentCounts: numSegments must be a non-negative integer, got ${numSegments}`);
  }
  return tf.engine().runKernel(K.segmentCounts, { segmentIds }, { numSegments }) as tf.Tensor2D;
}

registerPairKernels('wasm');
registerPairKernels('cpu');

/**
 * out[e, :] = p[src[e], :H] + p[dst[e], H:] + b[e, :] for p = [nodes, 2H], b = [edges, H]:
 * the first message layer's per-edge sum in one launch. Gradient wrt p
 * scatters dy back to both halves; wrt b it is dy.
 */
export function gatherPairAdd(p: tf.Tensor2D, src: tf.Tensor1D, dst: tf.Tensor1D, b: tf.Tensor2D): tf.Tensor2D {
  check2d('gatherPairAdd', p);
  checkIds('gatherPairAdd', src, 'src');
  checkIds('gatherPairAdd', dst, 'dst');
  if (p.shape[1] % 2 !== 0 || b.shape[1] !== p.shape[1] / 2 || b.shape[0] !== src.shape[0] || dst.shape[0] !== src.shape[0]) {
    throw new Error(`model/ops gatherPairAdd: shapes p [${p.shape}], src [${src.shape}], dst [${dst.shape}], b [${b.shape}] do not fit`);
  }
  return tf.engine().runKernel(PAIR_KERNELS.gatherPairAdd, { p, src, dst, b }) as tf.Tensor2D;
}
