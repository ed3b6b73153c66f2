/**
 * trainScorer: learn P(label names concept) from a release itself, with no labelled data.
 *
 * Pairs (see docs/SCORER.md for the reasoning):
 * - positives: a term of a concept plays the local label. In half of them (when the concept
 *   has another term) the term is left out of the concept, so the label must be recognised
 *   through a synonym; in the other half the term stays and the label is a local variant of it
 *   (unchanged, upper case, words rotated, a one-letter typo, a stop word or another word
 *   dropped, the last word abbreviated, a word of another term appended), the way local lists write labels copied from a terminology. The "old
 *   target" of a positive is the concept itself, so its context is the concept's own; for a
 *   quarter of them it is a neighbour of the concept instead (a sibling, else a concept of the
 *   same category), as for a successor after a merge, which sits near the old target; and for a
 *   small share (`categoryShiftShare`, estimated from the diff) the old target is taken to be of
 *   another category, since some true successors do change category.
 * - negatives: the same kind of label against another concept: half are hard negatives, the
 *   lexically nearest other concepts (ConceptIndex search); a quarter are neighbours (a
 *   sibling in the hierarchy, else a concept of the same category), so that a shared context
 *   alone is not taken for a match; the rest are random concepts. Their
 *   context is the true relation (category, hierarchy) of the two concepts, so the context
 *   weights are learned.
 * - a bounded number of pairs (default 20,000) drawn with a seeded generator, so training
 *   takes seconds at any release size and repeats exactly. For a large release the hard
 *   negatives are searched within a pool of sampled concepts, not the whole release.
 * - 25% of the pairs are held out for AUC and ECE. Classes are balanced (half positives); the
 *   probability therefore reads "given a candidate as close as the ones the scorer is shown".
 */
import { conceptIndexOf, termIdAt, termTextAt } from '../load/releaseBytes.js';
import type { Hierarchy, Release } from '../load/types.js';
import { graphOf } from '../load/hierarchyGraph.js';
import { ACTIVE } from '../load/types.js';
import type { DocumentFrequencies } from '../text/tfidf.js';
import { ConceptIndex, type TermWordLists } from './conceptIndex.js';
import {
  AncestorIndex, FEATURES, FEATURE_COUNT, LEXICAL_COUNT, ReleaseFeatures, activeTermsOf, conceptContext, contextFeatures,
  releaseDocumentFrequencies, textForms,
} from './features.js';
import { fitLogistic, predictProbability, type LogisticModel } from './logistic.js';
import { expectedCalibrationError, rocAuc } from './metrics.js';
import { SeededRandom } from './random.js';
import type { ScorerInfo } from './types.js';

export interface TrainOptions {
  /** Hierarchy of the release, for the hierarchy features. */
  hierarchy?: Hierarchy;
  /** Gives an index of the release (e.g. DiffContext.newIndex), called only when the whole release is the search pool. */
  index?: () => ConceptIndex;
  /** Pairs sampled in all (train + held out). Default 20,000. */
  pairs?: number;
  /** Share of the pairs held out for AUC/ECE. Default 0.25. */
  holdOut?: number;
  /** Seed of the sampling. Default 1. */
  seed?: number;
  /** L2 penalty of the logistic regression. Default 1. */
  l2?: number;
  /** Share of the negatives that are hard (nearest other concepts). Default 0.5. */
  hardShare?: number;
  /** Share of the negatives that are neighbours (a sibling in the hierarchy, else a concept of the same category). Default 0.25. */
  neighbourShare?: number;
  /** Share of the positives whose term is left out of the concept. Default 0.5. */
  leaveOutShare?: number;
  /**
   * Share of the positives whose "old target" is a neighbour of the concept (a sibling, else a
   * concept of the same category) instead of the concept itself, as for a merge or replacement,
   * where the successor is near the old target but not the same node. Default 0.25.
   */
  neighbourContextShare?: number;
  /**
   * Share of the positives whose old target is taken to be of another category than the
   * concept (category_differs = 1), so that the weight of a category change is learned from
   * how often true successors change category rather than set by never seeing one.
   * rescoreMappings estimates it from the diff. Default 0.02.
   */
  categoryShiftShare?: number;
  /** Hard negatives taken from one search. Default 5. */
  hitsPerQuery?: number;
  /** A release with more active concepts than this is searched within a pool of this many sampled concepts. Default 2,000. */
  poolConcepts?: number;
  /** Terms read for the document frequencies at most. Default 100,000. */
  dfTerms?: number;
  /** Document frequencies to use instead of counting them on the release (re-scoring counts them first, for its worker). */
  df?: DocumentFrequencies;
  /** The word lists of the release's index (DiffContext.newIndexWords), when at hand: terms' stems are read there. */
  lists?: TermWordLists;
}

const DEFAULTS = { pairs: 20_000, holdOut: 0.25, seed: 1, l2: 1, hardShare: 0.5, neighbourShare: 0.25, neighbourContextShare: 0.25, categoryShiftShare: 0.02, leaveOutShare: 0.5, hitsPerQuery: 5, poolConcepts: 2_000, dfTerms: 100_000 };

/** A trained scorer: the model, the document frequencies and per-release feature caches. */
export class Scorer {
  readonly model: LogisticModel;
  readonly df: DocumentFrequencies;
  readonly info: ScorerInfo;
  private readonly perRelease = new Map<Release, ReleaseFeatures>();

  constructor(model: LogisticModel, df: DocumentFrequencies, info: ScorerInfo) {
    this.model = model;
    this.df = df;
    this.info = info;
  }

  /** Lexical feature computer for a release (cached per release; `lists`: the word lists of r's index, on first call). */
  features(r: Release, lists?: TermWordLists): ReleaseFeatures {
    let f = this.perRelease.get(r);
    if (!f) {
      f = new ReleaseFeatures(r, this.df, lists);
      this.perRelease.set(r, f);
    }
    return f;
  }

  /** Calibrated probability for a full feature vector (FEATURES order). */
  probability(x: Float64Array): number {
    return predictProbability(this.model, x);
  }
}

const STOP = new Set(['of', 'the', 'and', 'in', 'on', 'for', 'to', 'by']);

/**
 * A local-list variant of a term: the ways labels copied from a terminology usually differ.
 * `qualifier` is a word the variant may append (local lists add "ward", "adult", a site…).
 */
export function localVariant(text: string, rng: SeededRandom, qualifier = ''): string {
  const words = text.split(' ').filter(Boolean);
  switch (rng.int(8)) {
    case 6:
      return qualifier ? `${text} ${qualifier}` : text;
    case 7: {
      if (words.length < 2) return text;
      const k = rng.int(words.length);
      return words.filter((_, j) => j !== k).join(' ');
    }
    case 0:
      return text;
    case 1:
      return text.toUpperCase();
    case 2:
      return words.length > 1 ? [words[words.length - 1], ...words.slice(0, -1)].join(' ') : text;
    case 3: {
      if (text.length < 4) return text;
      const i = 1 + rng.int(text.length - 2);
      return rng.int(2) ? text.slice(0, i) + text.slice(i + 1) : text.slice(0, i) + text[i + 1] + text[i] + text.slice(i + 2);
    }
    case 4: {
      const k = words.findIndex((w) => STOP.has(w.toLowerCase()));
      return k >= 0 && words.length > 2 ? words.filter((_, j) => j !== k).join(' ') : text;
    }
    default: {
      const last = words[words.length - 1] ?? '';
      return words.length > 1 && last.length > 6 ? [...words.slice(0, -1), `${last.slice(0, 4)}.`].join(' ') : text;
    }
  }
}

/** A release made of some concepts of `r` (for a search pool); `original[c]` is the concept in `r`. */
function subRelease(r: Release, concepts: number[]): { release: Release; original: Int32Array } {
  const original = Int32Array.from(concepts);
  const terms: number[] = [];
  const start = new Int32Array(concepts.length + 1);
  concepts.forEach((c, i) => {
    start[i] = terms.length;
    for (let k = r.conceptTermStart[c]; k < r.conceptTermStart[c + 1]; k++) terms.push(r.conceptTerms[k]);
  });
  start[concepts.length] = terms.length;
  const termConcept = new Int32Array(terms.length);
  for (let i = 0; i < concepts.length; i++) for (let k = start[i]; k < start[i + 1]; k++) termConcept[k] = i;
  const pick = <T>(arr: ArrayLike<T>) => terms.map((t) => arr[t]);
  const ids = concepts.map((c) => r.conceptIds[c]);
  // Not `...r`: spreading would build the source's lazy termText, termId and conceptIndex arrays.
  const lazy = new Set(['termText', 'termId', 'conceptIndex']);
  const base = Object.fromEntries(Object.keys(r).filter((k) => !lazy.has(k)).map((k) => [k, (r as unknown as Record<string, unknown>)[k]])) as unknown as Release;
  const release: Release = {
    ...base,
    label: `${r.label} (pool)`,
    conceptCount: concepts.length,
    conceptIds: ids,
    conceptIndex: new Map(ids.map((id, i) => [id, i])),
    conceptStatus: Uint8Array.from(concepts, (c) => r.conceptStatus[c]),
    conceptCategory: Int32Array.from(concepts, (c) => r.conceptCategory[c]),
    conceptLine: Int32Array.from(concepts, (c) => r.conceptLine[c]),
    termCount: terms.length,
    termConcept,
    termText: terms.map((t) => termTextAt(r, t)),
    termType: Uint8Array.from(pick(r.termType)),
    termId: terms.map((t) => termIdAt(r, t)),
    termLanguage: Int32Array.from(pick(r.termLanguage)),
    termStatus: Uint8Array.from(pick(r.termStatus)),
    termLine: Int32Array.from(pick(r.termLine)),
    conceptTermStart: start,
    conceptTerms: Int32Array.from(terms.keys()),
  };
  return { release, original };
}

/**
 * A function that picks a sibling of concept c (sharing a parent), else a concept of the same
 * category. Training asks it about the concepts it drew (`focus`), so the children lists are
 * gathered, in the hierarchy's order, for their parents only: one pass over the hierarchy with a
 * small set, where a reverse index of every parent (560,000 at 4 M rows) took 2 to 3.6 s. A
 * concept outside `focus` is answered too, from the full reverse index built then.
 */
export function neighbourFinder(r: Release, eligible: number[], hierarchy: Hierarchy | undefined, focus: readonly number[]): (c: number, rng: SeededRandom) => number | undefined {
  const isEligible = new Uint8Array(r.conceptCount);
  for (const c of eligible) isEligible[c] = 1;
  // The hierarchy as integers (load/hierarchyGraph.ts): node of each concept, concept of each node.
  const g = hierarchy ? graphOf(hierarchy) : undefined;
  const nodeOf = g ? g.conceptNodes(r) : new Int32Array(0);
  const conceptOf = new Int32Array(g ? g.nodeCount : 0).fill(-1);
  nodeOf.forEach((n, c) => {
    if (n >= 0) conceptOf[n] = c;
  });
  /** Eligible children of each wanted parent (by node); every parent once `complete`. */
  const children = new Map<number, number[]>();
  let complete = false;
  const gather = (wanted: Uint8Array | undefined) => {
    const { parentStart, parentNodes } = g!;
    for (let child = 0; child < g!.nodeCount; child++) {
      let c = -2;
      for (let k = parentStart[child]; k < parentStart[child + 1]; k++) {
        const p = parentNodes[k];
        if (wanted && !wanted[p]) continue;
        if (c === -2) c = conceptOf[child];
        if (c < 0 || !isEligible[c]) break;
        const list = children.get(p);
        if (list) list.push(c);
        else children.set(p, [c]);
      }
    }
  };
  const wanted = new Uint8Array(g ? g.nodeCount : 0);
  if (g) {
    for (const c of focus) {
      const n = nodeOf[c];
      if (n >= 0) for (let k = g.parentStart[n]; k < g.parentStart[n + 1]; k++) wanted[g.parentNodes[k]] = 1;
    }
    gather(wanted);
  }
  const childrenOf = (p: number): number[] => {
    if (!wanted[p] && !complete) {
      children.clear();
      gather(undefined);
      complete = true;
    }
    return children.get(p) ?? [];
  };
  const byCategory = new Map<number, number[]>();
  for (const c of eligible) {
    const k = r.conceptCategory[c];
    if (k < 0) continue;
    const list = byCategory.get(k);
    if (list) list.push(c);
    else byCategory.set(k, [c]);
  }
  return (c, rng) => {
    const n = g ? nodeOf[c] : -1;
    const count = n < 0 ? 0 : g!.parentStart[n + 1] - g!.parentStart[n];
    if (count) {
      const siblings = childrenOf(g!.parentNodes[g!.parentStart[n] + rng.int(count)]);
      if (siblings.length > 1) {
        const b = siblings[rng.int(siblings.length)];
        if (b !== c) return b;
      }
    }
    const same = byCategory.get(r.conceptCategory[c]) ?? [];
    if (same.length > 1) {
      const b = same[rng.int(same.length)];
      if (b !== c) return b;
    }
    return undefined;
  };
}

/** Draw `n` items from `items` without replacement while possible, then again from a fresh shuffle. */
function draw(items: number[], n: number, rng: SeededRandom): number[] {
  const out: number[] = [];
  while (out.length < n && items.length > 0) {
    const pool = rng.shuffle(items.slice());
    out.push(...pool.slice(0, n - out.length));
  }
  return out;
}

interface Sample {
  concept: number;
  label: string;
}

/** Train the scorer on `release` (usually the new release of the diff). */
export function trainScorer(release: Release, options: TrainOptions = {}): Scorer {
  const o = { ...DEFAULTS, ...options };
  if (!Number.isInteger(o.pairs) || o.pairs < 20) throw new RangeError(`trainScorer: pairs must be an integer >= 20, got ${o.pairs}`);
  if (!(o.holdOut > 0 && o.holdOut < 1)) throw new RangeError(`trainScorer: holdOut must be in (0, 1), got ${o.holdOut}`);
  const rng = new SeededRandom(o.seed);
  const eligible: number[] = [];
  for (let c = 0; c < release.conceptCount; c++) {
    if (release.conceptStatus[c] !== ACTIVE) continue;
    if (activeTermsOf(release, c).length > 0) eligible.push(c);
  }
  if (eligible.length < 2) throw new RangeError(`trainScorer: release ${release.label} has ${eligible.length} active concept(s) with terms; at least 2 are needed to learn anything`);

  const df = o.df ?? releaseDocumentFrequencies(release, o.dfTerms);
  const feats = new ReleaseFeatures(release, df, o.lists);
  const ancestors = o.hierarchy ? new AncestorIndex(o.hierarchy) : undefined;
  // A small release gives few distinct pairs: more draws would only repeat them.
  const pairs = Math.min(o.pairs, Math.max(20, 8 * eligible.length));
  const nPos = Math.round(pairs / 2);
  const nNeg = pairs - nPos;
  const nHard = Math.round(nNeg * o.hardShare);

  const x = new Float64Array(pairs * FEATURE_COUNT);
  const y = new Uint8Array(pairs);
  const owner = new Int32Array(pairs);
  let row = 0;
  /** `contextOf`: the concept standing for the old target (the label's concept unless said otherwise). */
  const addPair = (label: string, target: number, candidate: number, positive: boolean, skipTerm: number, contextOf = target, shiftCategory = false) => {
    const off = row * FEATURE_COUNT;
    const forms = textForms(label);
    feats.lexical(forms, candidate, x, off, skipTerm);
    const own = conceptContext(release, contextOf, ancestors);
    contextFeatures(own, candidate === contextOf ? own : conceptContext(release, candidate, ancestors), x, off + LEXICAL_COUNT);
    if (shiftCategory && x[off + LEXICAL_COUNT] === 1) {
      x[off + LEXICAL_COUNT] = 0;
      x[off + LEXICAL_COUNT + 1] = 1;
    }
    y[row] = positive ? 1 : 0;
    owner[row] = target;
    row++;
  };

  // Positives, and the labels the negatives reuse.
  const samples: Sample[] = [];
  const drawn = draw(eligible, nPos, rng);
  const neighbours = neighbourFinder(release, eligible, o.hierarchy, drawn);
  for (const c of drawn) {
    const terms = activeTermsOf(release, c);
    const t = terms[rng.int(terms.length)];
    const leaveOut = terms.length > 1 && rng.next() < o.leaveOutShare;
    let qualifier = '';
    if (!leaveOut) {
      const other = termTextAt(release, activeTermsOf(release, eligible[rng.int(eligible.length)])[0]).split(' ');
      qualifier = other[rng.int(other.length)];
    }
    const label = leaveOut ? termTextAt(release, t) : localVariant(termTextAt(release, t), rng, qualifier);
    const contextOf = rng.next() < o.neighbourContextShare ? neighbours(c, rng) ?? c : c;
    addPair(label, c, c, true, leaveOut ? t : -1, contextOf, rng.next() < o.categoryShiftShare);
    samples.push({ concept: c, label });
  }

  // Hard negatives: nearest other concepts of the pool.
  const wholeRelease = eligible.length <= o.poolConcepts;
  let index: ConceptIndex;
  let original: Int32Array | null = null;
  let localOf: Map<number, number> | null = null;
  if (wholeRelease) index = o.index ? o.index() : new ConceptIndex(release);
  else {
    const poolConcepts = [...new Set(samples.map((s) => s.concept))].slice(0, o.poolConcepts);
    const sub = subRelease(release, poolConcepts);
    index = new ConceptIndex(sub.release);
    original = sub.original;
    localOf = new Map(poolConcepts.map((c, i) => [c, i]));
  }
  let hard = 0;
  for (const s of samples) {
    if (hard >= nHard) break;
    const self = localOf ? localOf.get(s.concept) : s.concept;
    if (self === undefined) continue;
    for (const hit of index.search([s.label], o.hitsPerQuery, self)) {
      if (hard >= nHard) break;
      const b = original ? original[hit.concept] : hit.concept;
      addPair(s.label, s.concept, b, false, -1);
      hard++;
    }
  }
  // Neighbour negatives: concepts that share the label's context but not (as a rule) its
  // meaning, so that context alone is not taken for a match.
  const nNeighbour = Math.round(nNeg * o.neighbourShare);
  for (let k = 0, tries = 0; k < nNeighbour && tries < 4 * nNeighbour; tries++) {
    const s = samples[tries % samples.length];
    const b = neighbours(s.concept, rng);
    if (b === undefined) continue;
    addPair(s.label, s.concept, b, false, -1);
    k++;
  }
  // Random negatives (also filling in when the other kinds found too few).
  while (row < pairs) {
    const s = samples[rng.int(samples.length)];
    let b = eligible[rng.int(eligible.length)];
    if (b === s.concept) b = eligible[(eligible.indexOf(b) + 1) % eligible.length];
    addPair(s.label, s.concept, b, false, -1);
  }

  // Hold out whole concepts (every pair whose label comes from a held-out concept), so that a
  // label seen in training is never scored in the held-out set.
  const sampled = rng.shuffle([...new Set(samples.map((s) => s.concept))].sort((a, b) => a - b));
  const heldOut = new Set(sampled.slice(0, Math.max(1, Math.round(o.holdOut * sampled.length))));
  const test: number[] = [];
  const train: number[] = [];
  for (let i = 0; i < pairs; i++) (heldOut.has(owner[i]) ? test : train).push(i);
  const trainX = new Float64Array(train.length * FEATURE_COUNT);
  const trainY = new Uint8Array(train.length);
  train.forEach((i, k) => {
    trainX.set(x.subarray(i * FEATURE_COUNT, (i + 1) * FEATURE_COUNT), k * FEATURE_COUNT);
    trainY[k] = y[i];
  });
  const fit = fitLogistic(trainX, trainY, FEATURE_COUNT, { l2: o.l2 });
  const scores = test.map((i) => predictProbability(fit, x, i * FEATURE_COUNT));
  const labels = test.map((i) => y[i]);
  const weights: Record<string, number> = { intercept: round4(fit.intercept) };
  FEATURES.forEach((f, j) => (weights[f] = round4(fit.weights[j])));
  const info: ScorerInfo = {
    auc: round4(rocAuc(scores, labels)),
    ece: round4(expectedCalibrationError(scores, labels, 10)),
    pairs_trained: train.length,
    pairs_held_out: test.length,
    features: [...FEATURES],
    weights,
    seed: o.seed,
  };
  return new Scorer({ intercept: fit.intercept, weights: fit.weights }, df, info);
}

const round4 = (v: number) => Math.round(v * 1e4) / 1e4;
