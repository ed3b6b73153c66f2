/**
 * ConceptIndex: an inverted index over the active terms of a release, for nearest-concept search
 * when a concept vanished without a trace (no term flow, no history row) and for mappings whose
 * target needs successors.
 *
 * Built for releases of millions of terms. The index keys are word stems (the tokens of the
 * lexical key, text/normalize.ts); postings are compressed sparse rows in typed arrays (about
 * 4 bytes per term and word). Typos and spelling variants in a query are handled by a second,
 * much smaller index over the vocabulary: character 3-grams → stems, used to expand a query word
 * to the vocabulary words within a trigram-Dice of `fuzzyMin`. (A first version indexed the
 * 3-grams of every term: at 500,000 terms it took 21 s to build and 0.8 s per query; this one is
 * measured in docs/BENCHMARKS.md.)
 *
 * Scores are IDF-weighted Dice overlaps of word sets (0..1); the best term of each concept counts.
 * Words on more than `maxPosting` terms are too common to generate candidates; candidates found by
 * the rarer words are then scored on every query word through a forward index (term → words). A
 * query of common words only is searched by its rarest word. Built lazily, once per release, and only when something needs it.
 */
import type { Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { STOP_WORDS, foldTerm, stemToken } from '../text/normalize.js';
import { GrowableInt32 } from '../load/growable.js';

/** Postings scanned per generating word at most (a bound on the work of one query). */
const CANDIDATE_SCAN_MAX = 20_000;
/** Candidates per query text scored on all its words. */
const CANDIDATES_FULL = 500;

export interface IndexHit {
  concept: number;
  /** Best matching term of the concept. */
  term: number;
  /** IDF-weighted overlap, normalised to 0..1. */
  score: number;
}

export interface ConceptIndexOptions {
  /** Words on more terms than this do not generate candidates (default 2,000: a bound that keeps one search independent of the release size). */
  maxPosting?: number;
  /** Lowest trigram-Dice for a vocabulary word to stand in for a query word. */
  fuzzyMin?: number;
  /** Vocabulary words a query word may expand to. */
  fuzzyMax?: number;
}

function trigrams(word: string): string[] {
  const s = ` ${word} `;
  const out: string[] = [];
  for (let i = 0; i + 3 <= s.length; i++) out.push(s.slice(i, i + 3));
  return out;
}

/** Stems of a text, deduplicated, stop words dropped (the tokens of its lexical key). */
export function indexWords(text: string): string[] {
  const folded = foldTerm(text);
  if (folded === '') return [];
  const out: string[] = [];
  for (const token of folded.split(' ')) {
    if (STOP_WORDS.has(token)) continue;
    const stem = stemToken(token);
    if (!out.includes(stem)) out.push(stem);
  }
  return out.length ? out : [folded];
}

export class ConceptIndex {
  readonly release: Release;
  private readonly wordIds = new Map<string, number>();
  private readonly words: string[] = [];
  /** postings of word w: terms[start[w] .. start[w+1]) */
  private readonly start: Int32Array;
  private readonly terms: Int32Array;
  private readonly idfs: Float64Array;
  private readonly termNorm: Float64Array;
  /** trigram → vocabulary words (for fuzzy expansion), built on first need */
  private gramIndex: Map<string, number[]> | null = null;
  private readonly scratch: Float64Array;
  private readonly termStart: Int32Array;
  private readonly termWords: Int32Array;
  private readonly maxPosting: number;
  private readonly fuzzyCache = new Map<string, { w: number; weight: number }[]>();
  private readonly opts: Required<Omit<ConceptIndexOptions, 'maxPosting'>>;

  constructor(release: Release, options: ConceptIndexOptions = {}) {
    this.release = release;
    this.opts = { fuzzyMin: options.fuzzyMin ?? 0.6, fuzzyMax: options.fuzzyMax ?? 3 };
    // Pass 1: words of every active term, as (word, term) pairs; a folded-token cache spares
    // stemming the same token millions of times.
    const tokenWord = new Map<string, number>();
    const pw = new GrowableInt32(1 << 16);
    const pt = new GrowableInt32(1 << 16);
    let active = 0;
    const texts = release.termText;
    for (let t = 0; t < release.termCount; t++) {
      if (release.conceptStatus[release.termConcept[t]] !== ACTIVE || release.termStatus[t] !== ACTIVE) continue;
      active++;
      const folded = foldTerm(texts[t]);
      if (folded === '') continue;
      const first = pw.length;
      for (const token of folded.split(' ')) {
        let w = tokenWord.get(token);
        if (w === undefined) {
          w = STOP_WORDS.has(token) ? -1 : this.wordId(stemToken(token));
          tokenWord.set(token, w);
        }
        if (w < 0) continue;
        let dup = false;
        for (let k = first; k < pw.length; k++) if (pw.data[k] === w) { dup = true; break; }
        if (!dup) { pw.push(w); pt.push(t); }
      }
      if (pw.length === first) { pw.push(this.wordId(folded)); pt.push(t); }
    }
    const pairWord = pw.data;
    const pairTerm = pt.data;
    const pairs = pw.length;
    // Pass 2: compressed sparse rows.
    const nWords = this.words.length;
    const start = new Int32Array(nWords + 1);
    for (let k = 0; k < pairs; k++) start[pairWord[k] + 1]++;
    for (let w = 0; w < nWords; w++) start[w + 1] += start[w];
    const fill = start.slice(0, nWords);
    const terms = new Int32Array(pairs);
    for (let k = 0; k < pairs; k++) terms[fill[pairWord[k]]++] = pairTerm[k];
    this.start = start;
    this.terms = terms;
    this.idfs = new Float64Array(nWords);
    for (let w = 0; w < nWords; w++) this.idfs[w] = Math.log((active + 1) / (start[w + 1] - start[w] + 1)) + 1;
    this.termNorm = new Float64Array(release.termCount);
    for (let k = 0; k < pairs; k++) this.termNorm[pairTerm[k]] += this.idfs[pairWord[k]];
    // Forward index term → words, to score candidates on common words without scanning their postings.
    const tStart = new Int32Array(release.termCount + 1);
    for (let k = 0; k < pairs; k++) tStart[pairTerm[k] + 1]++;
    for (let t = 0; t < release.termCount; t++) tStart[t + 1] += tStart[t];
    const tFill = tStart.slice(0, release.termCount);
    const tWords = new Int32Array(pairs);
    for (let k = 0; k < pairs; k++) tWords[tFill[pairTerm[k]]++] = pairWord[k];
    this.termStart = tStart;
    this.termWords = tWords;
    this.maxPosting = options.maxPosting ?? 2000;
    this.scratch = new Float64Array(release.termCount);
  }

  private wordId(word: string): number {
    let w = this.wordIds.get(word);
    if (w === undefined) {
      w = this.words.length;
      this.words.push(word);
      this.wordIds.set(word, w);
    }
    return w;
  }

  /** Vocabulary words within `fuzzyMin` trigram-Dice of `word`, best first (not the word itself). */
  private fuzzy(word: string): { w: number; weight: number }[] {
    if (word.length < 4) return [];
    const cached = this.fuzzyCache.get(word);
    if (cached) return cached;
    const found = this.fuzzyUncached(word);
    if (this.fuzzyCache.size > 100_000) this.fuzzyCache.clear();
    this.fuzzyCache.set(word, found);
    return found;
  }

  private fuzzyUncached(word: string): { w: number; weight: number }[] {
    if (!this.gramIndex) {
      this.gramIndex = new Map();
      for (let w = 0; w < this.words.length; w++) {
        for (const g of new Set(trigrams(this.words[w]))) {
          const list = this.gramIndex.get(g);
          if (list) list.push(w);
          else this.gramIndex.set(g, [w]);
        }
      }
    }
    const grams = [...new Set(trigrams(word))];
    const shared = new Map<number, number>();
    for (const g of grams) for (const w of this.gramIndex.get(g) ?? []) shared.set(w, (shared.get(w) ?? 0) + 1);
    const out: { w: number; weight: number }[] = [];
    for (const [w, n] of shared) {
      const other = new Set(trigrams(this.words[w])).size;
      const dice = (2 * n) / (grams.length + other);
      if (dice >= this.opts.fuzzyMin && this.words[w] !== word) out.push({ w, weight: dice });
    }
    return out.sort((a, b) => b.weight - a.weight || a.w - b.w).slice(0, this.opts.fuzzyMax);
  }

  /**
   * Concepts whose terms best match `texts` (IDF-weighted Dice of word sets, best term per
   * concept), best first; ties broken by concept index so results are deterministic.
   */
  search(texts: readonly string[], limit = 10, skipConcept = -1): IndexHit[] {
    const best = new Map<number, IndexHit>();
    const acc = this.scratch;
    for (const text of texts) {
      const query: { w: number; weight: number }[] = [];
      let qNorm = 0;
      for (const word of indexWords(text)) {
        const w = this.wordIds.get(word);
        if (w !== undefined) {
          query.push({ w, weight: 1 });
          qNorm += this.idfs[w];
        } else {
          // An unknown word weighs as a word seen once; its near spellings stand in for it.
          qNorm += Math.log(this.release.termCount + 1) + 1;
          for (const f of this.fuzzy(word)) query.push(f);
        }
      }
      const df = (q: { w: number }) => this.start[q.w + 1] - this.start[q.w];
      // Candidates come from the rarer words; a query of common words only uses its rarest word.
      const rare = query.filter((q) => df(q) <= this.maxPosting);
      const generators = rare.length > 0 || query.length === 0 ? rare : [query.reduce((a, b) => (df(b) < df(a) ? b : a))];
      const touched: number[] = [];
      for (const { w, weight } of generators) {
        const gain = this.idfs[w] * weight;
        const end = Math.min(this.start[w + 1], this.start[w] + CANDIDATE_SCAN_MAX);
        for (let k = this.start[w]; k < end; k++) {
          const t = this.terms[k];
          if (acc[t] === 0) touched.push(t);
          acc[t] += gain;
        }
      }
      // Keep the best partial scores, then score them on every query word (forward index).
      const partial = touched.map((t) => ({ t, a: acc[t] }));
      for (const t of touched) acc[t] = 0;
      if (partial.length > CANDIDATES_FULL) {
        partial.sort((x, y) => y.a - x.a || x.t - y.t);
        partial.length = CANDIDATES_FULL;
      }
      const weightOf = new Map<number, number>();
      for (const q of query) weightOf.set(q.w, Math.max(weightOf.get(q.w) ?? 0, q.weight));
      for (const { t } of partial) {
        let overlap = 0;
        for (let k = this.termStart[t]; k < this.termStart[t + 1]; k++) {
          const wt = weightOf.get(this.termWords[k]);
          if (wt !== undefined) overlap += this.idfs[this.termWords[k]] * wt;
        }
        const c = this.release.termConcept[t];
        if (c === skipConcept) continue;
        const score = Math.min(1, (2 * overlap) / (qNorm + this.termNorm[t]));
        const had = best.get(c);
        if (!had || score > had.score || (score === had.score && t < had.term)) best.set(c, { concept: c, term: t, score });
      }
    }
    return [...best.values()].sort((a, b) => b.score - a.score || a.concept - b.concept).slice(0, limit);
  }
}
