/**
 * `descendant-count`: number of nodes reachable from each node, counting the
 * node itself (so a leaf has 1).
 *
 * - On `dag`: reachability along the directed edges. On `tree` (undirected):
 *   rooted at node 0, edges oriented away from the root, so the count is the
 *   subtree size.
 * - Messages flow child -> parent (every oriented edge reversed), so a node
 *   aggregates over its children. Inputs: node [1]; edge [1].
 * - Alignment caveat: on a tree, count(v) = 1 + sum over children of count(c)
 *   exactly, so sum is aligned. On a DAG two children can share descendants and
 *   that sum counts them twice (it counts paths, not nodes); the target stays
 *   the true number of reachable nodes, so sum is only approximately aligned
 *   there.
 * - Scale shift: no value-carrying input; targets are scale-invariant
 *   (`scaleShift: 'task'`: nothing to apply).
 * - Mask: every node counts.
 * - depth: synchronous rounds of reach-set propagation until nothing changes =
 *   the largest hop distance from a node to one of its descendants (the height
 *   on a tree).
 * Exact solver: `descendantCounts` (a depth-first search from every node).
 */
import type Graph from 'graphology';
import type { Task, TaskInstance, TaskOptions } from './types.ts';
import { checkNodeKeys, checkRounds } from './common.ts';

const WHERE = 'tasks/descendant-count';

/** Number of nodes reachable from each node along `children`, counting itself (iterative DFS). */
export function descendantCounts(children: readonly (readonly number[])[]): number[] {
  const n = children.length;
  const counts = new Array<number>(n).fill(0);
  const seen = new Int32Array(n).fill(-1);
  for (let s = 0; s < n; s++) {
    const stack = [s];
    seen[s] = s;
    let count = 0;
    while (stack.length > 0) {
      const u = stack.pop()!;
      count++;
      for (const v of children[u]!) {
        if (v < 0 || v >= n) throw new Error(`${WHERE}: child ${v} of node ${u} is out of range 0..${n - 1}`);
        if (seen[v] !== s) {
          seen[v] = s;
          stack.push(v);
        }
      }
    }
    counts[s] = count;
  }
  return counts;
}

/**
 * Children lists of the graph as a rooted structure: out-neighbours on a
 * directed graph (must be acyclic); on an undirected graph it must be a tree,
 * oriented away from `root` by breadth-first search.
 */
export function childrenOf(graph: Graph, root = 0): number[][] {
  const n = checkNodeKeys(graph, WHERE);
  const children: number[][] = Array.from({ length: n }, () => []);
  if (graph.type === 'directed') {
    graph.forEachEdge((_e, _a, s, t) => children[Number(s)]!.push(Number(t)));
    const indegree = new Array<number>(n).fill(0);
    for (const list of children) for (const v of list) indegree[v]!++;
    const queue: number[] = [];
    for (let v = 0; v < n; v++) if (indegree[v] === 0) queue.push(v);
    for (let k = 0; k < queue.length; k++) for (const v of children[queue[k]!]!) if (--indegree[v]! === 0) queue.push(v);
    if (queue.length !== n) throw new Error(`${WHERE}: the directed graph has a cycle`);
    return children;
  }
  if (graph.type !== 'undirected') throw new Error(`${WHERE}: mixed graphs are not supported`);
  if (graph.size !== n - 1) throw new Error(`${WHERE}: an undirected graph must be a tree (n - 1 edges); got ${graph.size} edges on ${n} nodes`);
  if (root < 0 || root >= n) throw new Error(`${WHERE}: root node ${root} is out of range 0..${n - 1}`);
  const visited = new Array<boolean>(n).fill(false);
  visited[root] = true;
  const queue = [root];
  for (let k = 0; k < queue.length; k++) {
    const u = queue[k]!;
    graph.forEachNeighbor(String(u), (key) => {
      const v = Number(key);
      if (!visited[v]) {
        visited[v] = true;
        children[u]!.push(v);
        queue.push(v);
      }
    });
  }
  if (queue.length !== n) throw new Error(`${WHERE}: the undirected graph is not connected, so it is not a tree`);
  return children;
}

/** Reach sets after k rounds: R_0(v) = {v}, R_k(v) = {v} ∪ R_{k-1}(u) over messages u -> v. */
function reachSizes(n: number, src: number[], dst: number[], rounds: number): { sizes: number[]; stableAfter: number } {
  let sets: Array<Set<number>> = Array.from({ length: n }, (_, v) => new Set([v]));
  let stableAfter = 0;
  for (let r = 1; r <= rounds; r++) {
    const next = sets.map((s) => new Set(s));
    for (let e = 0; e < src.length; e++) for (const x of sets[src[e]!]!) next[dst[e]!]!.add(x);
    const changed = next.some((s, v) => s.size !== sets[v]!.size);
    sets = next;
    if (!changed) break;
    stableAfter = r;
  }
  return { sizes: sets.map((s) => s.size), stableAfter };
}

function instance(graph: Graph, _options: TaskOptions): TaskInstance {
  const children = childrenOf(graph, 0);
  const n = children.length;
  const messageSrc: number[] = [];
  const messageDst: number[] = [];
  children.forEach((list, parent) => {
    for (const child of list) {
      messageSrc.push(child);
      messageDst.push(parent);
    }
  });
  const target = descendantCounts(children);
  const { stableAfter } = reachSizes(n, messageSrc, messageDst, n);
  return {
    nodes: n,
    nodeInputs: Array.from({ length: n }, () => [1]),
    messageSrc,
    messageDst,
    edgeInputs: messageSrc.map(() => [1]),
    target,
    mask: new Array<number>(n).fill(1),
    depth: stableAfter,
    extras: graph.type === 'directed' ? {} : { root: 0 },
  };
}

function iterate(_graph: Graph, inst: TaskInstance, rounds: number): number[] {
  checkRounds(rounds, WHERE);
  return reachSizes(inst.nodes, inst.messageSrc, inst.messageDst, rounds).sizes;
}

export const descendantCount: Task = {
  id: 'descendant-count',
  title: 'Descendant count (nodes reachable, itself included)',
  describe: 'Number of nodes reachable from the node along the edges (tree: subtree size from root 0), itself included.',
  alignedAggregator: 'sum',
  alignedStructure:
    'count(v) = 1 + sum over children of count(child); exact on trees, over-counts shared descendants on DAGs',
  nodeFeatureNames: ['one'],
  edgeFeatureNames: ['one'],
  families: ['dag', 'tree'],
  maskPolicy: 'Every node counts.',
  scaleShift: 'task',
  instance,
  iterate,
};
