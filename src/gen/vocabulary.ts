/**
 * generateVocabulary: a synthetic base release of N concepts, deterministic for a seed.
 *
 * - Categories drawn by weight (default: disorder, finding, procedure, lab test, substance,
 *   organism, body structure; see lexicon.ts DEFAULT_CATEGORY_WEIGHTS).
 * - Each concept is a core of its category's scheme; its preferred term is the canonical
 *   name and 0–6 synonyms are other names of the same core (mean ≈ 3, so ≈ 4 terms per
 *   concept, fewer where a scheme has fewer names, as for substances and organisms).
 * - Every lexical key belongs to one concept (see keyOwnership.ts), so term strings are
 *   unique within a category and across categories, and no two concepts have terms that
 *   termdrift's aligner could take for one another; terms of different concepts still share
 *   words (same site, same process).
 * - Hierarchy: each concept but the first of its category has 1 parent (2 with probability
 *   `secondParent`) among earlier concepts of the same category, preferably one that shares
 *   the first dimension (the same process, finding, action, analyte, genus...).
 * - Identifiers: `G` + 7-digit number; term identifiers `T` + 8-digit number.
 *
 * Capacity: with the default weights the body structure category fills first (about 165,000
 * distinct names, 8% of the concepts), so about 2 million concepts; beyond that the generator
 * stops with an error naming the category.
 */
import { foldTerm } from '../text/normalize.js';
import { KeyTable, termKeyOfFolded } from './keyOwnership.js';
import { DEFAULT_CATEGORY_WEIGHTS, SCHEMES, packCore, unpackCore, type NameList, type Scheme } from './lexicon.js';
import { Rng } from './random.js';
import type { BaseConcept, BaseRelease, BaseTerm, TermSource } from './types.js';

export interface VocabularyOptions {
  concepts: number;
  seed: number | string;
  /** Relative weight of each category; names must be categories of lexicon.ts SCHEMES. */
  categoryWeights?: Readonly<Record<string, number>>;
  /** Probability of 0, 1, … 6 synonyms. */
  synonymWeights?: readonly number[];
  /** Probability that a concept has a second parent (default 0.25). */
  secondParent?: number;
}

/** P(0..6 synonyms): mean 3.45 asked; schemes with few names give fewer, ≈ 4 terms per concept overall. */
export const DEFAULT_SYNONYM_WEIGHTS: readonly number[] = [0.04, 0.08, 0.14, 0.22, 0.24, 0.16, 0.12];

export interface Vocabulary {
  release: BaseRelease;
  /** Lexical key (hashed, see keyOwnership.ts) → index of the concept that owns it. */
  keyOwners: KeyTable;
  /** Fresh names for new concepts and variants of existing ones, from the same schemes. */
  termSource: TermSource;
  /** The k-th identifier not used by the release (k = 0, 1, …). */
  conceptIdFor(k: number): string;
  termIdFor(k: number): string;
  /** Index of a concept id in release.concepts (ids encode their position), or -1. */
  indexOf(id: string): number;
}

/**
 * The synthetic hierarchy as a read-only Map over typed arrays: at most two parents per
 * concept, stored as indices. A Map of a million ids to a million small arrays cost a sixth
 * of the vocabulary's time and most of its garbage collection (measured at 1M concepts);
 * `get` builds the small array when asked.
 */
export class ParentTable implements ReadonlyMap<string, readonly string[]> {
  readonly size: number;

  constructor(
    private readonly ids: readonly string[],
    private readonly first: Int32Array,
    private readonly second: Int32Array,
    private readonly indexOf: (id: string) => number,
  ) {
    let n = 0;
    for (let i = 0; i < first.length; i++) if (first[i] >= 0) n++;
    this.size = n;
  }

  private at(i: number): string[] | undefined {
    const a = this.first[i];
    if (a < 0) return undefined;
    const b = this.second[i];
    return b < 0 ? [this.ids[a]] : [this.ids[a], this.ids[b]];
  }

  /** Every child → parent edge as indices into the release's concepts (spares id lookups). */
  forEachParentIndex(fn: (child: number, parent: number) => void): void {
    for (let i = 0; i < this.first.length; i++) {
      if (this.first[i] < 0) continue;
      fn(i, this.first[i]);
      if (this.second[i] >= 0) fn(i, this.second[i]);
    }
  }

  get(id: string): readonly string[] | undefined {
    const i = this.indexOf(id);
    return i < 0 ? undefined : this.at(i);
  }

  has(id: string): boolean {
    const i = this.indexOf(id);
    return i >= 0 && this.first[i] >= 0;
  }

  *entries(): MapIterator<[string, readonly string[]]> {
    for (let i = 0; i < this.first.length; i++) {
      const list = this.at(i);
      if (list) yield [this.ids[i], list];
    }
  }

  *keys(): MapIterator<string> {
    for (const [k] of this.entries()) yield k;
  }

  *values(): MapIterator<readonly string[]> {
    for (const [, v] of this.entries()) yield v;
  }

  [Symbol.iterator](): MapIterator<[string, readonly string[]]> {
    return this.entries();
  }

  forEach(fn: (value: readonly string[], key: string, map: ReadonlyMap<string, readonly string[]>) => void): void {
    for (const [k, v] of this.entries()) fn(v, k, this);
  }
}

const CONCEPT_WIDTH = 7;
const TERM_WIDTH = 8;
const pad = (n: number, width: number) => String(n).padStart(width, '0');

/** Draw attempts with weighted dimensions before falling back to uniform draws. */
const WEIGHTED_ATTEMPTS = 8;
const MAX_ATTEMPTS = 400;
/** Above the size of any scheme's first dimension, so (category, head) packs into a small integer. */
const HEAD_SPAN = 1 << 20;

/**
 * Draw a core of `scheme` whose canonical name's lexical key is free in `owners`; returns its names, or
 * null when MAX_ATTEMPTS draws all hit taken keys (the category is nearly full).
 */
export function drawFreshCore(scheme: Scheme, rng: Rng, d: number[], owners: KeyTable): { names: NameList; key: number; folded: string } | null {
  for (let attempt = 0; attempt < MAX_ATTEMPTS; attempt++) {
    if (attempt < WEIGHTED_ATTEMPTS) scheme.draw(rng, d);
    else scheme.drawUniform(rng, d);
    const folded = foldTerm(scheme.names(d, false)[0]);
    const key = termKeyOfFolded(folded);
    if (owners.get(key) === undefined) return { names: scheme.names(d), key, folded };
  }
  return null;
}

export function generateVocabulary(options: VocabularyOptions): Vocabulary {
  const n = options.concepts;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`generateVocabulary: concepts must be a positive integer, got ${n}`);
  const weightsByName = options.categoryWeights ?? DEFAULT_CATEGORY_WEIGHTS;
  const categories = Object.keys(weightsByName);
  for (const c of categories) {
    if (!SCHEMES[c]) throw new RangeError(`generateVocabulary: unknown category ${JSON.stringify(c)}; expected one of ${Object.keys(SCHEMES).join(', ')}`);
  }
  const weights = categories.map((c) => weightsByName[c]);
  const synWeights = options.synonymWeights ?? DEFAULT_SYNONYM_WEIGHTS;
  const secondParent = options.secondParent ?? 0.25;
  const rng = new Rng(options.seed, 'vocabulary');
  const schemes = categories.map((c) => SCHEMES[c]);

  const idWidth = Math.max(CONCEPT_WIDTH, String(n * 2).length);
  const concepts: BaseConcept[] = new Array(n);
  const parentA = new Int32Array(n).fill(-1);
  const parentB = new Int32Array(n).fill(-1);
  const cores = new Float64Array(n);
  const categoryOf = new Uint8Array(n);
  const owners = new KeyTable(n * 4);
  const byCategory: number[][] = categories.map(() => []);
  /** (category, first dimension) → concepts, for parents that share it. */
  const byHead = new Map<number, number[]>();
  const d: number[] = [];
  let termNo = 0;
  const folds: string[] = [];
  const texts: string[] = [];
  const order: number[] = [];
  const ids: string[] = new Array(n);

  for (let i = 0; i < n; i++) {
    const cat = rng.weighted(weights);
    const scheme = schemes[cat];
    const core = drawFreshCore(scheme, rng, d, owners);
    if (core === null) {
      throw new RangeError(`generateVocabulary: the "${scheme.category}" category has no free names left after ${byCategory[cat].length} concepts; lower --concepts or its weight`);
    }
    const { names, key, folded } = core;
    owners.set(key, i);
    cores[i] = packCore(scheme.radix, d);
    categoryOf[i] = cat;
    const want = 1 + rng.weighted(synWeights);
    const terms: BaseTerm[] = [{ text: names[0], type: 'preferred', termId: `T${pad(++termNo, TERM_WIDTH)}` }];
    folds.length = 0;
    folds.push(folded);
    texts.length = 0;
    texts.push(names[0]);
    // Names 1..sameKey have the canonical name's key, which this concept now owns: no key to check.
    const sameKey = names.sameKey ?? 0;
    order.length = 0;
    for (let j = 1; j < names.length; j++) order.push(j);
    rng.shuffle(order);
    for (const j of order) {
      if (terms.length >= want) break;
      const text = names[j];
      if (j <= sameKey) {
        // Same words as the canonical name: only an identical string is a duplicate. Two such
        // names may differ only in punctuation ("X due to trauma", "X, due to trauma"); a
        // concept may hold both, as real terminologies do.
        if (texts.includes(text)) continue;
        // A name built by concatenation is a tree of string pieces until something reads it
        // whole; trim() makes V8 flatten it, so a million kept names hold a sixth less memory
        // (measured: heap 403 → 337 MB at 300,000 concepts). Folded names are flat already.
        text.trim();
      } else {
        const f = foldTerm(text);
        if (folds.includes(f)) continue;
        const k = termKeyOfFolded(f);
        const o = owners.get(k);
        if (o !== undefined && o !== i) continue;
        owners.set(k, i);
        folds.push(f);
      }
      texts.push(text);
      terms.push({ text, type: 'synonym', termId: `T${pad(++termNo, TERM_WIDTH)}` });
    }
    const id = `G${pad(i + 1, idWidth)}`;
    ids[i] = id;
    concepts[i] = { id, category: scheme.category, status: 'active', terms };

    const earlier = byCategory[cat];
    if (earlier.length > 0) {
      const headKey = cat * HEAD_SPAN + d[0];
      const sameHead = byHead.get(headKey);
      const first = sameHead && rng.chance(0.7) ? rng.pick(sameHead) : rng.pick(earlier);
      parentA[i] = first;
      if (earlier.length > 1 && rng.chance(secondParent)) {
        const second = rng.pick(earlier);
        if (second !== first) parentB[i] = second;
      }
    }
    earlier.push(i);
    const headKey = cat * HEAD_SPAN + d[0];
    const group = byHead.get(headKey);
    if (group) group.push(i);
    else byHead.set(headKey, [i]);
  }

  const termSource: TermSource = {
    newConcept(category, r) {
      const scheme = SCHEMES[category];
      if (!scheme) throw new RangeError(`termSource.newConcept: unknown category ${JSON.stringify(category)}`);
      const dd: number[] = [];
      const core = drawFreshCore(scheme, r, dd, owners);
      if (core === null) return [];
      return [core.names[0], ...r.shuffle(core.names.slice(1))];
    },
    variants(index, concept, r) {
      if (index < 0 || index >= n) return [];
      const scheme = schemes[categoryOf[index]];
      if (scheme.category !== concept.category) {
        // The concept changed category in between: its core no longer names it in that scheme.
        return [];
      }
      return r.shuffle(scheme.names(unpackCore(scheme.radix, cores[index], [])));
    },
  };

  const indexOf = (id: string) => {
    if (id.length !== idWidth + 1 || id.charCodeAt(0) !== 71 /* G */) return -1;
    const i = Number(id.slice(1)) - 1;
    return Number.isInteger(i) && i >= 0 && i < n && ids[i] === id ? i : -1;
  };
  return {
    release: { concepts, parents: new ParentTable(ids, parentA, parentB, indexOf) },
    keyOwners: owners,
    termSource,
    conceptIdFor: (k) => `G${pad(n + 1 + k, idWidth)}`,
    termIdFor: (k) => `T${pad(termNo + 1 + k, TERM_WIDTH)}`,
    indexOf,
  };
}
