/**
 * Features of a (label, concept) pair against a release, for the mapping scorer.
 *
 * Lexical features compare the label with each active term of the concept and keep, per
 * feature, the best value over the terms:
 * - `exact`: the label is one of the terms (up to Unicode NFC);
 * - `folded`: equal after {@link foldTerm} (case, accents, punctuation);
 * - `lexical`: equal {@link lexicalKey} (word order, inflection, stop words);
 * - `tfidf`: cosine of TF-IDF vectors of the lexical-key stems, with document frequencies from
 *   the release's active terms (../text/tfidf.js), so a shared rare word weighs more;
 * - `trigram`: Sørensen–Dice of padded character 3-grams of the folded forms;
 * - `jaro_winkler` and `levenshtein`: edit similarities of the folded forms.
 *
 * Context features relate the candidate concept to the mapping's old target (its category
 * and place in the hierarchy in the old release). Each relation is two indicators that are
 * both 0 when the relation is unknown (no categories, no hierarchy, a concept without
 * parents), so a missing context neither helps nor hurts:
 * - `category_same` / `category_differs`;
 * - `hierarchy_shared`: weighted Jaccard of the ancestors within {@link ANCESTOR_DEPTH} levels
 *   (weight 1/depth; the concepts themselves are left out, so two siblings under the same
 *   parents score 1 like a concept against itself), and `hierarchy_unrelated`: both have
 *   ancestors and share none within those levels.
 *
 * Per-term forms (NFC, folded, lexical key, stems) are computed once per concept on first use
 * and cached, since a mapping set names the same concepts again and again.
 */
import type { Hierarchy, Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { STOP_WORDS, foldTerm, lexicalKey, lexicalKeyOfFolded, stemToken } from '../text/normalize.js';
import { AsciiTokens } from '../text/asciiTokens.js';
import { termTextAt, termTextBytes } from '../load/releaseBytes.js';
import { jaroWinkler, levenshteinSimilarity, trigramDice } from '../text/similarity.js';
import { DocumentFrequencies, tfidfCosine } from '../text/tfidf.js';
import { HierarchyGraph, graphOf, sameParentNodes } from '../load/hierarchyGraph.js';
import { termStems, type TermWordLists } from './conceptIndex.js';

export const LEXICAL_FEATURES = ['exact', 'folded', 'lexical', 'tfidf', 'trigram', 'jaro_winkler', 'levenshtein'] as const;
export const CONTEXT_FEATURES = ['category_same', 'category_differs', 'hierarchy_shared', 'hierarchy_unrelated'] as const;
export const FEATURES = [...LEXICAL_FEATURES, ...CONTEXT_FEATURES] as const;
export type FeatureName = (typeof FEATURES)[number];
export const FEATURE_COUNT: number = FEATURES.length;
export const LEXICAL_COUNT: number = LEXICAL_FEATURES.length;

/** Ancestors are followed this many levels up. */
export const ANCESTOR_DEPTH = 3;

/** The comparison forms of one text (a label or a term). */
export interface TextForms {
  text: string;
  nfc: string;
  folded: string;
  lexical: string;
  /** Stems of the lexical key, for TF-IDF. */
  stems: string[];
}

export function textForms(text: string): TextForms {
  const folded = foldTerm(text);
  // foldTerm is a fixed point, so the key of the folded form is the key of the text.
  const lexical = lexicalKeyOfFolded(folded);
  return { text, nfc: text.normalize('NFC'), folded, lexical, stems: lexical === '' ? [] : lexical.split(' ') };
}

/** Active terms of concept c (term_status active), in release order. */
export function activeTermsOf(r: Release, c: number): number[] {
  const out: number[] = [];
  for (let k = r.conceptTermStart[c]; k < r.conceptTermStart[c + 1]; k++) {
    const t = r.conceptTerms[k];
    if (r.termStatus[t] === ACTIVE) out.push(t);
  }
  return out;
}

/**
 * Document frequencies of lexical-key stems over the active terms of active concepts.
 * At most `maxTerms` terms are read, evenly spaced through the release, so a release of
 * millions of terms is estimated from a sample (IDF depends on the ratio df/N, which a
 * systematic sample keeps); rare tokens missing from the sample get the largest IDF.
 */
export function releaseDocumentFrequencies(r: Release, maxTerms = 100_000): DocumentFrequencies {
  const df = new DocumentFrequencies();
  const isCounted = (t: number) => r.termStatus[t] === ACTIVE && r.conceptStatus[r.termConcept[t]] === ACTIVE;
  let activeCount = 0;
  for (let t = 0; t < r.termCount; t++) if (isCounted(t)) activeCount++;
  const step = Math.max(1, activeCount / maxTerms);
  // Plain ASCII terms are tokenised from the release's bytes (text/asciiTokens.ts); the stems of
  // their non-stop tokens are the lexical key's (df counts each stem once per term, so the key's
  // sorting does not matter). A term of stop words only, and any other term, goes through lexicalKey.
  const raw = termTextBytes(r);
  /** Stem of each distinct token ('' for a stop word), by the token's value in `ascii`. */
  const stemIds: string[] = [];
  const ascii = new AsciiTokens((token) => {
    stemIds.push(STOP_WORDS.has(token) ? '' : stemToken(token));
    return stemIds.length - 1;
  });
  const stems: string[] = [];
  // The active terms at positions 0, step, 2 step … (floored) among the active terms, found in
  // a second pass instead of a list of all of them (4 M numbers at 4 M rows).
  let t = -1;
  let seen = -1;
  for (let i = 0; i < activeCount; i += step) {
    const want = Math.floor(i);
    while (seen < want) if (isCounted(++t)) seen++;
    if (raw) {
      const n = ascii.tokens(raw.blocks[raw.termBlock[t]], raw.textStart[t], raw.textEnd[t]);
      if (n === 0) {
        df.add([]);
        continue;
      }
      if (n > 0) {
        stems.length = 0;
        for (let k = 0; k < n; k++) {
          const stem = stemIds[ascii.out[k]];
          if (stem !== '') stems.push(stem);
        }
        if (stems.length > 0) {
          df.add(stems);
          continue;
        }
      }
    }
    const key = lexicalKey(termTextAt(r, t));
    df.add(key === '' ? [] : key.split(' '));
  }
  return df;
}

/** One term of a concept with its forms; the lexical key and stems are filled on first use. */
export interface TermEntry {
  term: number;
  nfc: string;
  folded: string;
  lexical?: string;
  stems?: string[];
}

/** The entry of term `term` with text `text`; `stems`, when given, are those of its lexical key (termStems of an index), which is then not computed again. */
export function termEntry(term: number, text: string, stems?: string[]): TermEntry {
  const e: TermEntry = { term, nfc: text.normalize('NFC'), folded: foldTerm(text) };
  if (stems) {
    e.lexical = stems.join(' ');
    e.stems = stems;
  }
  return e;
}

/** Result of the lexical comparison of a label with a concept. */
export interface LexicalMatch {
  /** Term of the concept that matched best (by trigram, then TF-IDF), -1 when it has none. */
  bestTerm: number;
}

/**
 * Lexical features of labels against the concepts of one release, with per-concept caches.
 * `df` is shared by every release the scorer is applied to, so that scores in two releases
 * differ only because the terms differ.
 */
export class ReleaseFeatures {
  readonly release: Release;
  readonly df: DocumentFrequencies;
  private readonly cache = new Map<number, TermEntry[]>();
  /** The word lists of the release's index, when at hand: the stems of its indexed terms are read there (termStems). */
  private readonly lists: TermWordLists | undefined;

  constructor(release: Release, df: DocumentFrequencies, lists?: TermWordLists) {
    this.release = release;
    this.df = df;
    this.lists = lists;
  }

  /** Active terms of concept c with their NFC and folded forms (cached). */
  private terms(c: number): TermEntry[] {
    let entry = this.cache.get(c);
    if (!entry) {
      const r = this.release;
      // The index holds the active terms of active concepts.
      const lists = r.conceptStatus[c] === ACTIVE ? this.lists : undefined;
      entry = activeTermsOf(r, c).map((t) => termEntry(t, termTextAt(r, t), lists && termStems(lists, t)));
      this.cache.set(c, entry);
    }
    return entry;
  }

  /**
   * Write the lexical features of `label` against concept c into out[offset .. offset+7),
   * skipping term `skipTerm` (training leaves the label's own term out). A concept with no
   * active term gets all zeros.
   *
   * Fast path: when the label's folded form equals a term's, every feature but `exact` is at
   * its maximum of 1 (equal folded forms have equal lexical keys), so only `exact` is checked
   * against the other terms; most labels of a mapping set are copies of a term.
   */
  lexical(label: TextForms, c: number, out: Float64Array, offset = 0, skipTerm = -1): LexicalMatch {
    return lexicalOfTerms(label, this.terms(c), this.df, out, offset, skipTerm);
  }
}

function fillLexical(e: TermEntry): void {
  if (e.lexical === undefined) {
    e.lexical = lexicalKeyOfFolded(e.folded);
    e.stems = e.lexical === '' ? [] : e.lexical.split(' ');
  }
}

/**
 * The lexical features of `label` against the terms `terms` of one concept, as
 * ReleaseFeatures.lexical describes (which calls this with the concept's cached entries; the
 * re-scoring worker, lexicalWorker.ts, with entries of the texts it was sent).
 */
export function lexicalOfTerms(label: TextForms, terms: readonly TermEntry[], df: DocumentFrequencies, out: Float64Array, offset = 0, skipTerm = -1): LexicalMatch {
  for (let j = 0; j < LEXICAL_COUNT; j++) out[offset + j] = 0;
  let foldedHit = -1;
  let exact = 0;
  for (const e of terms) {
    if (e.term === skipTerm) continue;
    if (e.nfc === label.nfc) exact = 1;
    if (foldedHit < 0 && e.folded === label.folded) foldedHit = e.term;
  }
  if (foldedHit >= 0) {
    out[offset] = exact;
    for (let j = 1; j < LEXICAL_COUNT; j++) out[offset + j] = 1;
    return { bestTerm: foldedHit };
  }
  let bestTerm = -1;
  let bestKey = -1;
  for (const e of terms) {
    if (e.term === skipTerm) continue;
    fillLexical(e);
    const lexical = e.lexical !== '' && e.lexical === label.lexical ? 1 : 0;
    const tfidf = tfidfCosine(label.stems, e.stems!, df);
    const trigram = trigramDice(label.folded, e.folded);
    const jw = jaroWinkler(label.folded, e.folded);
    const lev = levenshteinSimilarity(label.folded, e.folded);
    if (lexical > out[offset + 2]) out[offset + 2] = lexical;
    if (tfidf > out[offset + 3]) out[offset + 3] = tfidf;
    if (trigram > out[offset + 4]) out[offset + 4] = trigram;
    if (jw > out[offset + 5]) out[offset + 5] = jw;
    if (lev > out[offset + 6]) out[offset + 6] = lev;
    const key = trigram * 2 + tfidf;
    if (key > bestKey) {
      bestKey = key;
      bestTerm = e.term;
    }
  }
  return { bestTerm };
}

// ---------------------------------------------------------------------------
// Context: category and hierarchy

/**
 * Ancestors of one concept within {@link ANCESTOR_DEPTH} levels, in the order of the walk:
 * `nodes` of the index's graph, their `depths` (1 = parent), and the `keys` they are compared
 * by: nodes of the graph the index compares with (`keysIn`), or, for an ancestor that graph does
 * not have, a number below -1 that no other ancestor has.
 */
export interface AncestorSet {
  readonly nodes: Int32Array;
  readonly keys: Int32Array;
  readonly depths: Uint8Array;
}

const NO_ANCESTORS: AncestorSet = { nodes: new Int32Array(0), keys: new Int32Array(0), depths: new Uint8Array(0) };
/** Entries per pool chunk of the cached sets. */
const POOL = 1 << 16;

/**
 * Ancestors of concepts in one hierarchy, with their shortest distance, cached per node. The
 * walks follow the hierarchy's graph (load/hierarchyGraph.ts) as integers; concepts of a release
 * are found by `ofConcept` through the graph's merge of the two id lists, and the string methods
 * (`ancestors`, `hasAncestors`, `sameAncestors`, …) by a binary search of the id.
 */
export class AncestorIndex {
  readonly graph: HierarchyGraph;
  /** Node → key (a node of the `keysIn` graph), when the keys are not the nodes themselves. */
  private readonly keyOf: Int32Array | undefined;
  /** Node → 1 + its set's place in `sets` (0: not walked yet); a dense list, not a sparse array of a million slots. */
  private readonly setOf: Int32Array;
  private readonly sets: AncestorSet[] = [];
  private readonly stamp: Int32Array;
  private walk = 0;
  private scratch = new Int32Array(64);
  private scratchDepth = new Uint8Array(64);
  private poolNodes = new Int32Array(POOL);
  private poolKeys = new Int32Array(POOL);
  private poolDepths = new Uint8Array(POOL);
  private poolUsed = 0;

  /** `keysIn`: the graph whose nodes the ancestor sets are compared by (this one when not given). */
  constructor(hierarchy: Hierarchy, keysIn?: HierarchyGraph) {
    this.graph = graphOf(hierarchy);
    this.keyOf = keysIn && keysIn !== this.graph ? this.graph.nodesIn(keysIn) : undefined;
    this.stamp = new Int32Array(this.graph.nodeCount);
    this.setOf = new Int32Array(this.graph.nodeCount);
  }

  /** The node of concept c of release r, or -1. */
  nodeOfConcept(r: Release, c: number): number {
    return this.graph.conceptNodes(r)[c];
  }

  /**
   * Ancestors of node n (-1: none). Breadth-first, parents in id order, with a mark per node, so
   * cycles in the input end the walk instead of looping; n itself is never its own ancestor.
   */
  ofNode(n: number): AncestorSet {
    if (n < 0) return NO_ANCESTORS;
    const at = this.setOf[n];
    if (at !== 0) return this.sets[at - 1];
    const { parentStart, parentNodes } = this.graph;
    const stamp = this.stamp;
    const walk = ++this.walk;
    stamp[n] = walk;
    let count = 0;
    let from = 0;
    let to = 0;
    for (let depth = 1; depth <= ANCESTOR_DEPTH; depth++) {
      for (let i = from - (depth === 1 ? 1 : 0); i < to; i++) {
        const cur = i < from ? n : this.scratch[i];
        for (let k = parentStart[cur]; k < parentStart[cur + 1]; k++) {
          const p = parentNodes[k];
          if (stamp[p] === walk) continue;
          stamp[p] = walk;
          if (count === this.scratch.length) this.growScratch();
          this.scratch[count] = p;
          this.scratchDepth[count] = depth;
          count++;
        }
      }
      from = to;
      to = count;
      if (from === to) break;
    }
    const set = count === 0 ? NO_ANCESTORS : this.store(count);
    this.sets.push(set);
    this.setOf[n] = this.sets.length;
    return set;
  }

  private growScratch(): void {
    const nodes = new Int32Array(this.scratch.length * 2);
    nodes.set(this.scratch);
    this.scratch = nodes;
    const depths = new Uint8Array(nodes.length);
    depths.set(this.scratchDepth);
    this.scratchDepth = depths;
  }

  /** The first `count` scratch entries as a set, in the pool. */
  private store(count: number): AncestorSet {
    if (this.poolUsed + count > this.poolNodes.length) {
      const size = Math.max(POOL, count);
      this.poolNodes = new Int32Array(size);
      this.poolKeys = this.keyOf ? new Int32Array(size) : this.poolNodes;
      this.poolDepths = new Uint8Array(size);
      this.poolUsed = 0;
    }
    const at = this.poolUsed;
    this.poolUsed += count;
    const nodes = this.poolNodes.subarray(at, at + count);
    nodes.set(this.scratch.subarray(0, count));
    const depths = this.poolDepths.subarray(at, at + count);
    depths.set(this.scratchDepth.subarray(0, count));
    let keys = nodes;
    if (this.keyOf) {
      keys = this.poolKeys.subarray(at, at + count);
      for (let i = 0; i < count; i++) {
        const k = this.keyOf[nodes[i]];
        keys[i] = k >= 0 ? k : -2 - nodes[i];
      }
    }
    return { nodes, keys, depths };
  }

  /** Ancestors of concept c of release r. */
  ofConcept(r: Release, c: number): AncestorSet {
    return this.ofNode(this.nodeOfConcept(r, c));
  }

  /** Ancestors of `id` within `ANCESTOR_DEPTH` levels → depth (1 = parent), in the order of the walk. */
  ancestors(id: string): ReadonlyMap<string, number> {
    const set = this.ofNode(this.graph.nodeOf(id));
    const out = new Map<string, number>();
    for (let i = 0; i < set.nodes.length; i++) out.set(this.graph.ids[set.nodes[i]], set.depths[i]);
    return out;
  }

  /** Does node n have any ancestor (a parent other than itself)? */
  hasAncestorsNode(n: number): boolean {
    if (n < 0) return false;
    const at = this.setOf[n];
    if (at !== 0) return this.sets[at - 1].nodes.length > 0;
    const { parentStart, parentNodes } = this.graph;
    for (let k = parentStart[n]; k < parentStart[n + 1]; k++) if (parentNodes[k] !== n) return true;
    return false;
  }

  /** Does `id` have any ancestor (a parent other than itself)? */
  hasAncestors(id: string): boolean {
    return this.hasAncestorsNode(this.graph.nodeOf(id));
  }

  /**
   * Are the ancestors of a concept (to `ANCESTOR_DEPTH` levels, with their depths) the same in
   * `other`, where it is node `na` here and `nb` there (-1: not in that graph)? True when every
   * concept the walk of `ofNode` expands has the same parent list in both hierarchies, which
   * makes the two walks the same step by step; found without building either set. (False can
   * also mean equal sets reached another way: callers then compare them.)
   */
  sameAncestorsNodes(other: AncestorIndex, na: number, nb: number): boolean {
    if (other.graph === this.graph) return true;
    const inOther = this.graph.nodesIn(other.graph);
    if (!sameParentNodes(this.graph, na, other.graph, nb, inOther)) return false;
    // The parents' and grandparents' lists (ANCESTOR_DEPTH is at least 2).
    return na < 0 || this.sameAbove(other.graph, inOther, na, na, ANCESTOR_DEPTH - 1);
  }

  /** Do the parents of `cur` and the concepts within k - 1 steps above them (`root` not again) have the same parent lists in `b`? */
  private sameAbove(b: HierarchyGraph, inB: Int32Array, root: number, cur: number, k: number): boolean {
    const { parentStart, parentNodes } = this.graph;
    for (let j = parentStart[cur]; j < parentStart[cur + 1]; j++) {
      const p = parentNodes[j];
      if (p === root) continue;
      if (!sameParentNodes(this.graph, p, b, inB[p], inB)) return false;
      if (k > 1 && !this.sameAbove(b, inB, root, p, k - 1)) return false;
    }
    return true;
  }

  /** `sameAncestorsNodes` for an id. */
  sameAncestors(other: AncestorIndex, id: string): boolean {
    return this.sameAncestorsNodes(other, this.graph.nodeOf(id), other.graph.nodeOf(id));
  }

  /** Does `id` have the same parent list, as given, in `other`? (No parents and no entry are the same.) */
  sameParents(other: AncestorIndex, id: string): boolean {
    return sameParentNodes(this.graph, this.graph.nodeOf(id), other.graph, other.graph.nodeOf(id), this.graph.nodesIn(other.graph));
  }

  /** Parents of `id`, sorted, deduplicated. */
  parents(id: string): string[] {
    return this.graph.parentsOf(id) ?? [];
  }
}

/**
 * Weighted Jaccard of two ancestor sets, each ancestor weighing 1/depth:
 * Σ min(wa, wb) over shared ancestors / Σ max(wa, wb) over all of them. 0 when either is empty.
 */
export function ancestorSimilarity(a: ReadonlyMap<string, number>, b: ReadonlyMap<string, number>): number {
  if (a.size === 0 || b.size === 0) return 0;
  let shared = 0;
  let union = 0;
  for (const [id, da] of a) {
    const wa = 1 / da;
    const db = b.get(id);
    if (db === undefined) union += wa;
    else {
      const wb = 1 / db;
      shared += Math.min(wa, wb);
      union += Math.max(wa, wb);
    }
  }
  for (const [id, db] of b) if (!a.has(id)) union += 1 / db;
  return shared / union;
}

/** `ancestorSimilarity` of two sets compared by their keys (the same sums in the same order). */
export function ancestorSetSimilarity(a: AncestorSet, b: AncestorSet): number {
  const na = a.keys.length;
  const nb = b.keys.length;
  if (na === 0 || nb === 0) return 0;
  let shared = 0;
  let union = 0;
  for (let i = 0; i < na; i++) {
    const wa = 1 / a.depths[i];
    const j = indexOfKey(b.keys, a.keys[i]);
    if (j < 0) union += wa;
    else {
      const wb = 1 / b.depths[j];
      shared += Math.min(wa, wb);
      union += Math.max(wa, wb);
    }
  }
  for (let j = 0; j < nb; j++) if (indexOfKey(a.keys, b.keys[j]) < 0) union += 1 / b.depths[j];
  return shared / union;
}

function indexOfKey(keys: Int32Array, k: number): number {
  for (let i = 0; i < keys.length; i++) if (keys[i] === k) return i;
  return -1;
}

/** Where a concept sits: its category and ancestors (null when unknown). */
export interface ConceptContext {
  category: string | null;
  ancestors: AncestorSet | null;
}

/** The context of concept c of release r (category from the release, ancestors from `ancestors`). */
export function conceptContext(r: Release, c: number, ancestors?: AncestorIndex): ConceptContext {
  const i = r.conceptCategory[c];
  return { category: i < 0 ? null : r.categories[i], ancestors: ancestors ? ancestors.ofConcept(r, c) : null };
}

/** Write the context features of `candidate` relative to `oldTarget` into out[offset .. offset+4). */
export function contextFeatures(oldTarget: ConceptContext | null, candidate: ConceptContext, out: Float64Array, offset = LEXICAL_COUNT): void {
  out[offset] = out[offset + 1] = out[offset + 2] = out[offset + 3] = 0;
  if (!oldTarget) return;
  if (oldTarget.category !== null && candidate.category !== null) {
    if (oldTarget.category === candidate.category) out[offset] = 1;
    else out[offset + 1] = 1;
  }
  const a = oldTarget.ancestors;
  const b = candidate.ancestors;
  if (a && b && a.keys.length > 0 && b.keys.length > 0) {
    const s = ancestorSetSimilarity(a, b);
    out[offset + 2] = s;
    if (s === 0) out[offset + 3] = 1;
  }
}
