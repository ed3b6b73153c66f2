/**
 * The diff context: the term flow over the changed frontier, the fate of each old concept,
 * and the structural groups. Built once by `buildContext`; every detector reads it.
 *
 * - fate of an old concept: `continues` (same id, active, shares terms or is lexically close),
 *   `retired` (same id now inactive), `absent` (gone from the file), `reused` (same id, active,
 *   but lexically unrelated terms).
 * - a new concept *carries* an old one that ends (retired, absent, reused) when it receives at
 *   least `carryShare` of the old concept's active terms or its preferred term; a continuing
 *   concept *splits off* a new concept when it gives it such a share.
 * - structural groups are the connected components (graphology-components) of the carry and
 *   split-off edges, plus history edges for ending concepts whose terms went nowhere; each
 *   group is one retirement, replacement, merge, split or reorganization.
 */
import { UndirectedGraph } from 'graphology';
import { connectedComponents } from 'graphology-components';
import type { Hierarchy, HistoryRow, HistoryTable, Release } from '../load/types.js';
import { ACTIVE, PREFERRED } from '../load/types.js';
import { conceptIndexOf, termTextAt } from '../load/releaseBytes.js';
import { alignTerms, activeTerms } from '../align/alignTerms.js';
import type { Alignment } from '../align/types.js';
import { foldTerm, lexicalKey } from '../text/normalize.js';
import { levenshteinSimilarity, tokenJaccard } from '../text/similarity.js';
import type { ConceptIndex, IndexHit, TermWordLists } from '../rescore/conceptIndex.js';
import { startConceptIndex, takeConceptIndex, type SearchQuery } from '../rescore/indexThread.js';
import { DEFAULT_THRESHOLDS, type Thresholds } from './thresholds.js';
import type { FlowCell, HistoryEvidence } from './types.js';

export interface DiffInput {
  old: Release;
  new: Release;
  oldHierarchy?: Hierarchy;
  newHierarchy?: Hierarchy;
  history?: HistoryTable;
  thresholds?: Partial<Thresholds>;
}

export type Fate = 'continues' | 'retired' | 'absent' | 'reused';

export interface OldNode {
  c: number;
  id: string;
  terms: number[];
  preferred: number;
  fate: Fate;
  /** new concept → old terms that went there */
  flows: Map<number, number[]>;
  /** new concepts that carry this one (ending) or split off from it (continuing) */
  carriers: number[];
  removed: number[];
  group: number;
}

export interface NewNode {
  n: number;
  id: string;
  terms: number[];
  preferred: number;
  /** No active concept of that id in the old release. */
  created: boolean;
  active: boolean;
  /** old concept → new terms that came from it */
  inflows: Map<number, number[]>;
  added: number[];
  group: number;
}

export type GroupKind = 'retirement' | 'replacement' | 'merge' | 'split' | 'reorganization';

export interface StructuralGroup {
  kind: GroupKind;
  olds: number[];
  news: number[];
  basis: 'terms' | 'history';
  /** history edges used (old concept → new concept) */
  historyEdges: { o: number; n: number; row: HistoryRow }[];
}

export interface DiffContext {
  input: DiffInput;
  old: Release;
  new: Release;
  align: Alignment;
  thresholds: Thresholds;
  olds: Map<number, OldNode>;
  news: Map<number, NewNode>;
  groups: StructuralGroup[];
  /** Lazily built index of the new release's active concepts. */
  newIndex(): ConceptIndex;
  /** Searches of that index started now, answered later (on the index's worker thread when it has one). */
  searchAhead(queries: SearchQuery[]): () => IndexHit[][];
  /** That index's vocabulary and forward lists, in shared memory, when at hand without waiting (IndexHandle.ready). */
  newIndexWords(): TermWordLists | undefined;
}

export const isActive = (r: Release, c: number) => r.conceptStatus[c] === ACTIVE;

function preferredOf(r: Release, terms: number[]): number {
  for (const t of terms) if (r.termType[t] === PREFERRED) return t;
  return terms.length ? terms[0] : -1;
}

export function categoryName(r: Release, c: number): string | null {
  const i = r.conceptCategory[c];
  return i < 0 ? null : r.categories[i];
}

/** Below this normalized edit similarity two folded terms are not respellings of each other. */
const RESPELLING_MIN = 0.75;

/**
 * Similarity of one pair of terms, 0..1: the token-Jaccard of their lexical keys; for a
 * respelling (normalized Levenshtein similarity of the folded forms of at least 0.75, e.g.
 * "Bunaba" / "Bunuba") that similarity; for one term whose words are all in the other
 * ("Kuman" / "Kuman (Papua New Guinea)") at least 0.5.
 */
export function termPairSimilarity(a: string, b: string): number {
  const ka = lexicalKey(a).split(' ');
  const kb = lexicalKey(b).split(' ');
  let sim = tokenJaccard(ka, kb);
  if (sim < 1) {
    const contained = ka.every((t) => kb.includes(t)) || kb.every((t) => ka.includes(t));
    if (contained) sim = Math.max(sim, 0.5);
    const fa = foldTerm(a);
    const fb = foldTerm(b);
    if (Math.abs(fa.length - fb.length) <= Math.max(fa.length, fb.length) * (1 - RESPELLING_MIN)) {
      const lev = levenshteinSimilarity(fa, fb);
      if (lev >= RESPELLING_MIN) sim = Math.max(sim, lev);
    }
  }
  return sim;
}

/**
 * Similarity of two term sets: for each term its best pair similarity (termPairSimilarity)
 * against the other set, averaged over both sets. A mean, not a maximum, so that one shared
 * generic word ("level", "measurement") cannot make two unrelated concepts look alike.
 * 0 when a side is empty.
 */
export function termSetSimilarity(a: string[], b: string[]): number {
  if (a.length === 0 || b.length === 0) return 0;
  const best = a.map(() => 0);
  const bestB = b.map(() => 0);
  for (let i = 0; i < a.length; i++) {
    for (let j = 0; j < b.length; j++) {
      const s = termPairSimilarity(a[i], b[j]);
      if (s > best[i]) best[i] = s;
      if (s > bestB[j]) bestB[j] = s;
    }
  }
  const mean = (xs: number[]) => xs.reduce((x, y) => x + y, 0) / xs.length;
  return (mean(best) + mean(bestB)) / 2;
}

/** Resolve a history chain from `id` to active concepts of the new release (cycle-safe). */
export function resolveHistory(history: HistoryTable, newR: Release, id: string, strongOnly: boolean): { targets: string[]; rows: HistoryRow[]; cycle: boolean } {
  const targets = new Set<string>();
  const rows: HistoryRow[] = [];
  const seen = new Set<string>([id]);
  let cycle = false;
  let frontier = [id];
  while (frontier.length) {
    const next: string[] = [];
    for (const cur of frontier) {
      for (const row of history.byOld.get(cur) ?? []) {
        const strong = row.relation === 'replaced_by' || row.relation === 'same_as';
        if (strongOnly !== strong) continue;
        rows.push(row);
        const n = conceptIndexOf(newR, row.newId);
        if (n >= 0 && isActive(newR, n)) targets.add(row.newId);
        else if (seen.has(row.newId)) cycle = true;
        else {
          seen.add(row.newId);
          next.push(row.newId);
        }
      }
    }
    frontier = next;
  }
  return { targets: [...targets].sort(), rows, cycle };
}

export function buildContext(input: DiffInput): DiffContext {
  const thresholds = { ...DEFAULT_THRESHOLDS, ...input.thresholds };
  const oldR = input.old;
  const newR = input.new;
  // Being built already by the worker that loaded the new release (pipeline.ts), or started
  // first, so that on a second core it is built while the terms are aligned (rescore/indexThread.ts).
  const index = takeConceptIndex(newR) ?? startConceptIndex(newR);
  const align = alignTerms(oldR, newR);
  const olds = new Map<number, OldNode>();
  const news = new Map<number, NewNode>();

  for (const n of align.newFrontier) {
    const terms = activeTerms(newR, n);
    const o = conceptIndexOf(oldR, newR.conceptIds[n]);
    news.set(n, {
      n, id: newR.conceptIds[n], terms, preferred: preferredOf(newR, terms),
      created: o < 0 || !isActive(oldR, o), active: isActive(newR, n),
      inflows: new Map(), added: [], group: -1,
    });
  }
  for (const c of align.oldFrontier) {
    if (!isActive(oldR, c)) continue;
    const terms = activeTerms(oldR, c);
    olds.set(c, { c, id: oldR.conceptIds[c], terms, preferred: preferredOf(oldR, terms), fate: 'continues', flows: new Map(), carriers: [], removed: [], group: -1 });
  }
  for (const l of align.links) {
    const o = olds.get(oldR.termConcept[l.oldTerm]);
    const nn = news.get(newR.termConcept[l.newTerm]);
    if (!o || !nn) continue;
    const f = o.flows.get(nn.n);
    if (f) f.push(l.oldTerm);
    else o.flows.set(nn.n, [l.oldTerm]);
    const g = nn.inflows.get(o.c);
    if (g) g.push(l.newTerm);
    else nn.inflows.set(o.c, [l.newTerm]);
  }
  for (const t of align.removedTerms) olds.get(oldR.termConcept[t])?.removed.push(t);
  for (const t of align.addedTerms) news.get(newR.termConcept[t])?.added.push(t);

  // Fate of each old frontier concept.
  for (const o of olds.values()) {
    const n = align.sameId[o.c];
    if (n === -1) o.fate = 'absent';
    else if (!isActive(newR, n)) o.fate = 'retired';
    else if ((o.flows.get(n)?.length ?? 0) > 0 || o.terms.length === 0) o.fate = 'continues';
    else {
      const sim = termSetSimilarity(o.terms.map((t) => termTextAt(oldR, t)), activeTerms(newR, n).map((t) => termTextAt(newR, t)));
      o.fate = sim < thresholds.reuseSimilarity ? 'reused' : 'continues';
    }
  }

  // Carry and split-off edges.
  const share = (o: OldNode, n: number) => (o.flows.get(n)?.length ?? 0) / Math.max(1, o.terms.length);
  const holdsPreferred = (o: OldNode, n: number) => o.preferred >= 0 && (o.flows.get(n) ?? []).includes(o.preferred);
  const graph = new UndirectedGraph();
  const historyEdges: { o: number; n: number; row: HistoryRow }[] = [];
  for (const o of olds.values()) {
    const self = align.sameId[o.c];
    for (const n of [...o.flows.keys()].sort((a, b) => a - b)) {
      if (n === self || !isActive(newR, n)) continue;
      // Shares decide, not single stray terms: one synonym alone never carries a concept.
      const count = o.flows.get(n)!.length;
      const strong = holdsPreferred(o, n) || (share(o, n) >= thresholds.carryShare && count >= 2);
      if (!strong) continue;
      if (o.fate === 'continues' && !news.get(n)!.created) continue; // a moved synonym, not a split
      o.carriers.push(n);
    }
    if (o.fate === 'continues') {
      if (o.carriers.length === 0) continue;
      graph.mergeNode(`o${o.c}`);
      graph.mergeEdge(`o${o.c}`, `n${self}`);
      for (const n of o.carriers) graph.mergeEdge(`o${o.c}`, `n${n}`);
      continue;
    }
    if (o.fate === 'reused') continue; // reported as id_reuse, whose `to` names where the old meaning went
    graph.mergeNode(`o${o.c}`);
    for (const n of o.carriers) graph.mergeEdge(`o${o.c}`, `n${n}`);
    if (o.carriers.length === 0 && input.history) {
      const res = resolveHistory(input.history, newR, o.id, true);
      for (const id of res.targets) {
        const n = conceptIndexOf(newR, id);
        const row = res.rows.find((r) => r.newId === id) ?? res.rows[0];
        historyEdges.push({ o: o.c, n, row });
        graph.mergeEdge(`o${o.c}`, `n${n}`);
        if (!news.has(n)) {
          const terms = activeTerms(newR, n);
          news.set(n, { n, id, terms, preferred: preferredOf(newR, terms), created: false, active: true, inflows: new Map(), added: [], group: -1 });
        }
      }
    }
  }

  const groups: StructuralGroup[] = [];
  const components = connectedComponents(graph).map((nodes) => nodes.sort());
  components.sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  for (const nodes of components) {
    const groupOlds = nodes.filter((k) => k[0] === 'o').map((k) => Number(k.slice(1))).sort((a, b) => a - b);
    const groupNews = nodes.filter((k) => k[0] === 'n').map((k) => Number(k.slice(1))).sort((a, b) => a - b);
    const hist = historyEdges.filter((e) => groupOlds.includes(e.o));
    const flowEdges = groupOlds.some((c) => olds.get(c)!.carriers.length > 0);
    let kind: GroupKind;
    if (groupNews.length === 0) kind = 'retirement';
    else if (groupOlds.length === 1 && groupNews.length === 1) kind = news.get(groupNews[0])!.created ? 'replacement' : 'merge';
    else if (groupOlds.length === 1) kind = 'split';
    else if (groupNews.length === 1) kind = 'merge';
    else kind = 'reorganization';
    const index = groups.length;
    groups.push({ kind, olds: groupOlds, news: groupNews, basis: flowEdges ? 'terms' : 'history', historyEdges: hist });
    for (const c of groupOlds) olds.get(c)!.group = index;
    for (const n of groupNews) {
      const node = news.get(n);
      if (node) node.group = index;
    }
  }

  return { input, old: oldR, new: newR, align, thresholds, olds, news, groups, newIndex: index.get, searchAhead: index.searchAhead, newIndexWords: index.ready };
}

/** Flow cells of a set of old concepts into a set of new concepts (active terms). */
export function flowCells(ctx: DiffContext, oldsIn: number[], newsIn: number[]): FlowCell[] {
  const cells: FlowCell[] = [];
  for (const c of oldsIn) {
    const o = ctx.olds.get(c);
    if (!o) continue;
    for (const n of newsIn) {
      const terms = o.flows.get(n) ?? [];
      if (terms.length === 0) continue;
      cells.push({ from: o.id, to: ctx.new.conceptIds[n], terms: terms.length, share: round(terms.length / Math.max(1, o.terms.length)), preferred: terms.includes(o.preferred) });
    }
  }
  return cells;
}

/** History rows about an old concept, each marked with whether the term flow agrees. */
export function historyEvidence(ctx: DiffContext, c: number): HistoryEvidence[] {
  const h = ctx.input.history;
  if (!h) return [];
  const o = ctx.olds.get(c);
  const id = ctx.old.conceptIds[c];
  const carriers = new Set((o?.carriers ?? []).map((n) => ctx.new.conceptIds[n]));
  return (h.byOld.get(id) ?? []).map((row) => ({
    old_id: row.oldId,
    new_id: row.newId,
    relation: row.relation,
    line: row.line,
    agrees_with_terms: carriers.size === 0 || row.relation === 'consider' ? null : carriers.has(row.newId),
  }));
}

export const round = (x: number) => Math.round(x * 1000) / 1000;
