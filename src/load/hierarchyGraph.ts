/**
 * HierarchyGraph: a hierarchy as integers, for the walks of the diff and of the re-scoring.
 *
 * Every concept id the hierarchy names (as a child or as a parent) is a node, numbered in id
 * order (UTF-16 code units, the canonical order of load/canonicalOrder.ts); the parents of each
 * node are a run of `parentNodes` (compressed sparse rows), ascending, so also in id order and
 * without duplicates. A walk then follows integers instead of looking strings up in a Map of a
 * million children, and the node of a release's concept, or of the same id in another
 * hierarchy, comes from one merge of two sorted id lists (`conceptNodes`, `nodesIn`), cached.
 *
 * The loader (loadHierarchy.ts) builds the graph from the file's bytes; a hierarchy made as a
 * plain `parents` Map (tests, importers) gets its graph from `graphOf`, built once and cached.
 */
import type { Hierarchy, Release } from './types.js';
import { alignIds, indexInSorted } from './releaseBytes.js';

const cmpStrings = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

export class HierarchyGraph {
  /** Node n is the concept id ids[n]; strictly increasing. */
  readonly ids: readonly string[];
  /** parentNodes[parentStart[n] .. parentStart[n + 1]) are the parents of node n, ascending. */
  readonly parentStart: Int32Array;
  readonly parentNodes: Int32Array;
  private readonly conceptNodeCache = new WeakMap<Release, Int32Array>();
  private readonly nodesInCache = new WeakMap<HierarchyGraph, Int32Array>();

  constructor(ids: readonly string[], parentStart: Int32Array, parentNodes: Int32Array) {
    if (parentStart.length !== ids.length + 1) throw new RangeError(`HierarchyGraph: ${ids.length} ids need ${ids.length + 1} parent offsets, got ${parentStart.length}`);
    this.ids = ids;
    this.parentStart = parentStart;
    this.parentNodes = parentNodes;
  }

  get nodeCount(): number {
    return this.ids.length;
  }

  /** The node of `id`, or -1 (binary search). */
  nodeOf(id: string): number {
    return indexInSorted(this.ids, id);
  }

  /** Parent ids of node n, in id order. */
  parentIds(n: number): string[] {
    const out: string[] = [];
    for (let k = this.parentStart[n]; k < this.parentStart[n + 1]; k++) out.push(this.ids[this.parentNodes[k]]);
    return out;
  }

  /** Parent ids of `id` in id order, or undefined when it has none (as `Map.get` of `toMap()`). */
  parentsOf(id: string): string[] | undefined {
    const n = this.nodeOf(id);
    if (n < 0 || this.parentStart[n + 1] === this.parentStart[n]) return undefined;
    return this.parentIds(n);
  }

  /**
   * For each concept of `r`, its node here, or -1. One merge when the release's ids are in order
   * (a canonical release), else a binary search per concept. Cached per release.
   */
  conceptNodes(r: Release): Int32Array {
    return cached(this.conceptNodeCache, r, () => alignIds(r.conceptIds, this.ids));
  }

  /** For each node here, the node of the same id in `other`, or -1 (one merge). Cached. */
  nodesIn(other: HierarchyGraph): Int32Array {
    return cached(this.nodesInCache, other, () => alignIds(this.ids, other.ids));
  }

  /** child id → parent ids (both in id order), for the children only: the Map form of a hierarchy. */
  toMap(): Map<string, string[]> {
    const m = new Map<string, string[]>();
    for (let n = 0; n < this.ids.length; n++) if (this.parentStart[n + 1] > this.parentStart[n]) m.set(this.ids[n], this.parentIds(n));
    return m;
  }

  /** The graph of a child → parents Map (parents deduplicated; any order). */
  static fromParents(parents: ReadonlyMap<string, readonly string[]>): HierarchyGraph {
    const all = new Set<string>();
    for (const [child, list] of parents) {
      if (list.length === 0) continue;
      all.add(child);
      for (const p of list) all.add(p);
    }
    const ids = [...all].sort(cmpStrings);
    const node = new Map<string, number>();
    ids.forEach((id, n) => node.set(id, n));
    const lists: number[][] = ids.map(() => []);
    for (const [child, list] of parents) {
      const own = lists[node.get(child)!];
      for (const p of list) {
        const q = node.get(p)!;
        if (!own.includes(q)) own.push(q);
      }
    }
    return fromLists(ids, lists);
  }
}

function cached<K extends object>(cache: WeakMap<K, Int32Array>, key: K, make: () => Int32Array): Int32Array {
  let out = cache.get(key);
  if (!out) cache.set(key, (out = make()));
  return out;
}

/** The graph of sorted ids and, per node, its parent nodes (any order, no duplicates). */
function fromLists(ids: string[], lists: number[][]): HierarchyGraph {
  const parentStart = new Int32Array(ids.length + 1);
  for (let n = 0; n < ids.length; n++) parentStart[n + 1] = parentStart[n] + lists[n].length;
  const parentNodes = new Int32Array(parentStart[ids.length]);
  for (let n = 0; n < ids.length; n++) {
    const sorted = lists[n].slice().sort((a, b) => a - b);
    parentNodes.set(sorted, parentStart[n]);
  }
  return new HierarchyGraph(ids, parentStart, parentNodes);
}

const built = new WeakMap<Hierarchy, HierarchyGraph>();

/** The graph of `h`: the loader's, else built from `h.parents` once and cached. */
export function graphOf(h: Hierarchy): HierarchyGraph {
  if (h.graph) return h.graph;
  let g = built.get(h);
  if (!g) {
    g = HierarchyGraph.fromParents(h.parents);
    built.set(h, g);
  }
  return g;
}

/**
 * Does node na of `a` have the same parent ids as node nb of `b` (-1: not in that graph, no
 * parents)? `aInB` is a.nodesIn(b); both lists are in id order, so they are compared in step.
 */
export function sameParentNodes(a: HierarchyGraph, na: number, b: HierarchyGraph, nb: number, aInB: Int32Array): boolean {
  const sa = na < 0 ? 0 : a.parentStart[na];
  const la = na < 0 ? 0 : a.parentStart[na + 1] - sa;
  const sb = nb < 0 ? 0 : b.parentStart[nb];
  const lb = nb < 0 ? 0 : b.parentStart[nb + 1] - sb;
  if (la !== lb) return false;
  if (a === b) {
    if (sa === sb) return true;
    for (let j = 0; j < la; j++) if (a.parentNodes[sa + j] !== b.parentNodes[sb + j]) return false;
    return true;
  }
  for (let j = 0; j < la; j++) if (aInB[a.parentNodes[sa + j]] !== b.parentNodes[sb + j]) return false;
  return true;
}
