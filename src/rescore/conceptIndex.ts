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
 * query of common words only takes the terms holding its rarest word, narrowed by intersecting
 * with its next rarest words (fromCommonWords). Built lazily, once per release, and only when
 * something needs it.
 */
import type { Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { STOP_WORDS, foldTerm, stemToken } from '../text/normalize.js';
import { GrowableInt32 } from '../load/growable.js';
import { termTextAt, termTextBytes } from '../load/releaseBytes.js';
import { AsciiTokens } from '../text/asciiTokens.js';

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

/** The value at rank k (0 = largest) of v[0..n), by quickselect; reorders v. */
function kthLargest(v: Float64Array, n: number, k: number): number {
  let lo = 0;
  let hi = n - 1;
  while (lo < hi) {
    const pivot = v[(lo + hi) >>> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (v[i] > pivot) i++;
      while (v[j] < pivot) j--;
      if (i <= j) {
        const x = v[i];
        v[i] = v[j];
        v[j] = x;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  return v[k];
}

/**
 * What building an index needs of a release: which terms to index, and their texts (as UTF-8
 * byte ranges where the release keeps its file bytes, else through `text`). A plain object of
 * typed arrays and buffers, so that a worker thread can build from it (indexThread.ts).
 */
export interface IndexSource {
  termCount: number;
  /** 1 for a term to index (active, of an active concept). */
  active: Uint8Array;
  bytes?: { blocks: readonly Uint8Array[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array };
  text(t: number): string;
}

/** The built index: vocabulary, postings (word → terms), forward index (term → words), weights. */
export interface IndexParts {
  words: string[];
  /** postings of word w: terms[start[w] .. start[w+1]) */
  start: Int32Array;
  terms: Int32Array;
  idfs: Float64Array;
  termNorm: Float64Array;
  termStart: Int32Array;
  termWords: Int32Array;
}

/** The vocabulary and forward lists of an index: enough to read the words of an indexed term (termStems). */
export type TermWordLists = Pick<IndexParts, 'words' | 'termStart' | 'termWords'>;

/**
 * The words of indexed term t (active, of an active concept), sorted: the tokens of its lexical
 * key, which is their join by single spaces (text/normalize.ts, lexicalKey: stems of the tokens
 * that are not stop words, sorted, without repeats; the folded text for a term of stop words
 * only, '' for an empty one). Read from the index's forward list, without tokenising or stemming
 * the text again (tests/rescore/conceptIndex.test.ts checks it against lexicalKey).
 */
export function termStems(lists: TermWordLists, t: number): string[] {
  const out: string[] = [];
  for (let k = lists.termStart[t]; k < lists.termStart[t + 1]; k++) out.push(lists.words[lists.termWords[k]]);
  return out.sort();
}

/** The index source of a release. */
export function indexSource(release: Release): IndexSource {
  const active = new Uint8Array(release.termCount);
  for (let t = 0; t < release.termCount; t++) {
    if (release.conceptStatus[release.termConcept[t]] === ACTIVE && release.termStatus[t] === ACTIVE) active[t] = 1;
  }
  const raw = termTextBytes(release);
  return { termCount: release.termCount, active, bytes: raw, text: (t) => termTextAt(release, t) };
}

/**
 * Build an index (the work of the ConceptIndex constructor, and of the index thread). `shared`:
 * its typed arrays in SharedArrayBuffers, so that another thread can search the same index
 * without a copy (indexThread.ts: the main thread takes part of a batch of searches).
 */
export function buildIndexParts(src: IndexSource, onProgress?: (terms: number) => void, shared = false): IndexParts {
  const ints = (n: number) => (shared ? new Int32Array(new SharedArrayBuffer(4 * n)) : new Int32Array(n));
  const floats = (n: number) => (shared ? new Float64Array(new SharedArrayBuffer(8 * n)) : new Float64Array(n));
  const wordIds = new Map<string, number>();
  const words: string[] = [];
  const wordId = (word: string): number => {
    let w = wordIds.get(word);
    if (w === undefined) {
      w = words.length;
      words.push(word);
      wordIds.set(word, w);
    }
    return w;
  };
  // Pass 1: words of every active term, as (word, term) pairs. Each distinct token is stemmed
  // once: plain ASCII terms are tokenised from the loader's bytes (text/asciiTokens.ts, no
  // string per term), the others through foldTerm with a folded-token cache.
  const tokenWord = new Map<string, number>();
  const wordOfToken = (token: string): number => {
    let w = tokenWord.get(token);
    if (w === undefined) {
      w = STOP_WORDS.has(token) ? -1 : wordId(stemToken(token));
      tokenWord.set(token, w);
    }
    return w;
  };
  const ascii = new AsciiTokens(wordOfToken);
  const raw = src.bytes;
  const termCount = src.termCount;
  // The words of term t are pw[termStart[t] .. termStart[t+1]): the pairs are made term by term,
  // so they are the forward index (term → words) as they stand, and the term of a pair is known
  // from termStart without a second list.
  const pw = new GrowableInt32(1 << 16);
  const termStart = ints(termCount + 1);
  let active = 0;
  const push = (w: number, first: number) => {
    for (let k = first; k < pw.length; k++) if (pw.data[k] === w) return;
    pw.push(w);
  };
  for (let t = 0; t < termCount; t++) {
    if (onProgress !== undefined && (t & 0xffff) === 0) onProgress(t);
    const first = pw.length;
    termStart[t] = first;
    if (src.active[t] === 0) continue;
    active++;
    if (raw) {
      const n = ascii.tokens(raw.blocks[raw.termBlock[t]], raw.textStart[t], raw.textEnd[t]);
      if (n === 0) continue; // spaces only: folds to ''
      if (n > 0) {
        for (let k = 0; k < n; k++) if (ascii.out[k] >= 0) push(ascii.out[k], first);
        if (pw.length > first) continue;
        // Stop words only: the folded text is the key, as below.
      }
    }
    const folded = foldTerm(src.text(t));
    if (folded === '') continue;
    for (const token of folded.split(' ')) {
      const w = wordOfToken(token);
      if (w >= 0) push(w, first);
    }
    if (pw.length === first) pw.push(wordId(folded));
  }
  const pairs = pw.length;
  termStart[termCount] = pairs;
  let termWords: Int32Array;
  if (shared) {
    termWords = ints(pairs);
    termWords.set(pw.data.subarray(0, pairs));
  } else termWords = pw.finish();
  // Pass 2: postings (word → terms) as compressed sparse rows, terms ascending within a word.
  const nWords = words.length;
  const start = ints(nWords + 1);
  for (let k = 0; k < pairs; k++) start[termWords[k] + 1]++;
  for (let w = 0; w < nWords; w++) start[w + 1] += start[w];
  const fill = start.slice(0, nWords);
  const terms = ints(pairs);
  const idfs = floats(nWords);
  for (let w = 0; w < nWords; w++) idfs[w] = Math.log((active + 1) / (start[w + 1] - start[w] + 1)) + 1;
  const termNorm = floats(termCount);
  for (let t = 0; t < termCount; t++) {
    let norm = 0;
    for (let k = termStart[t]; k < termStart[t + 1]; k++) {
      const w = termWords[k];
      terms[fill[w]++] = t;
      norm += idfs[w];
    }
    termNorm[t] = norm;
  }
  return { words, start, terms, idfs, termNorm, termStart, termWords };
}

export class ConceptIndex {
  readonly release: Release;
  private readonly wordIds = new Map<string, number>();
  private readonly words: string[];
  /** postings of word w: terms[start[w] .. start[w+1]) */
  private readonly start: Int32Array;
  private readonly terms: Int32Array;
  private readonly idfs: Float64Array;
  private readonly termNorm: Float64Array;
  /** trigram → vocabulary words (for fuzzy expansion), built on first need */
  private grams: ReturnType<ConceptIndex['buildGrams']> | undefined;
  private readonly scratch: Float64Array;
  /** Terms touched by the current query and their scores (reused between queries). */
  private touched = new Int32Array(1 << 14);
  private scores = new Float64Array(1 << 14);
  /** The other buffer of fromCommonWords' intersections. */
  private merged = new Int32Array(1 << 14);
  /** Query word → weight during one query (0 = not in the query); built on the first search. */
  private qWeight: Float64Array | undefined;
  private readonly termStart: Int32Array;
  private readonly termWords: Int32Array;
  private readonly maxPosting: number;
  private readonly fuzzyCache = new Map<string, { w: number; weight: number }[]>();
  private readonly opts: Required<Omit<ConceptIndexOptions, 'maxPosting'>>;

  /** Build the index of `release`, or take `parts` built from its indexSource (e.g. by the index thread). */
  constructor(release: Release, options: ConceptIndexOptions = {}, parts?: IndexParts) {
    this.release = release;
    this.opts = { fuzzyMin: options.fuzzyMin ?? 0.6, fuzzyMax: options.fuzzyMax ?? 3 };
    const p = parts ?? buildIndexParts(indexSource(release));
    if (p.termNorm.length !== release.termCount) throw new Error(`index parts of ${p.termNorm.length} terms given for a release of ${release.termCount}`);
    this.words = p.words;
    for (let w = 0; w < p.words.length; w++) this.wordIds.set(p.words[w], w);
    this.start = p.start;
    this.terms = p.terms;
    this.idfs = p.idfs;
    this.termNorm = p.termNorm;
    this.termStart = p.termStart;
    this.termWords = p.termWords;
    this.maxPosting = options.maxPosting ?? 2000;
    this.scratch = new Float64Array(release.termCount);
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
    const g = (this.grams ??= this.buildGrams());
    const grams = [...new Set(trigrams(word))];
    const count = g.count;
    const touched: number[] = [];
    for (const gram of grams) {
      const id = g.ids.get(gram);
      if (id === undefined) continue;
      for (let k = g.start[id]; k < g.start[id + 1]; k++) {
        const w = g.words[k];
        if (count[w]++ === 0) touched.push(w);
      }
    }
    const out: { w: number; weight: number }[] = [];
    for (const w of touched) {
      const dice = (2 * count[w]) / (grams.length + g.size[w]);
      count[w] = 0;
      if (dice >= this.opts.fuzzyMin && this.words[w] !== word) out.push({ w, weight: dice });
    }
    return out.sort((a, b) => b.weight - a.weight || a.w - b.w).slice(0, this.opts.fuzzyMax);
  }

  /** Character 3-grams → vocabulary words (compressed sparse rows), and each word's count of distinct 3-grams. */
  private buildGrams(): { ids: Map<string, number>; start: Int32Array; words: Int32Array; size: Int32Array; count: Int32Array } {
    const ids = new Map<string, number>();
    const pg = new GrowableInt32(1 << 16);
    const pw = new GrowableInt32(1 << 16);
    const size = new Int32Array(this.words.length);
    for (let w = 0; w < this.words.length; w++) {
      const set = new Set(trigrams(this.words[w]));
      size[w] = set.size;
      for (const gram of set) {
        let id = ids.get(gram);
        if (id === undefined) ids.set(gram, (id = ids.size));
        pg.push(id);
        pw.push(w);
      }
    }
    const start = new Int32Array(ids.size + 1);
    for (let k = 0; k < pg.length; k++) start[pg.data[k] + 1]++;
    for (let i = 0; i < ids.size; i++) start[i + 1] += start[i];
    const fill = start.slice(0, ids.size);
    const words = new Int32Array(pg.length);
    for (let k = 0; k < pg.length; k++) words[fill[pg.data[k]]++] = pw.data[k];
    return { ids, start, words, size, count: new Int32Array(this.words.length) };
  }

  /**
   * Concepts whose terms best match `texts` (IDF-weighted Dice of word sets, best term per
   * concept), best first; ties broken by concept index, then term index, so results are
   * deterministic. Every term found through a generating word is scored on all query words.
   */
  search(texts: readonly string[], limit = 10, skipConcept = -1): IndexHit[] {
    const best = new Map<number, IndexHit>();
    const qWeight = (this.qWeight ??= new Float64Array(this.words.length));
    const concept = this.release.termConcept;
    // Texts with the same word set (word-order variants, which synonyms often are) are one query.
    const seen = new Set<string>();
    for (const text of texts) {
      const queryWords = indexWords(text);
      const key = [...queryWords].sort().join('\n');
      if (seen.has(key)) continue;
      seen.add(key);
      const query: { w: number; weight: number }[] = [];
      let qNorm = 0;
      for (const word of queryWords) {
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
      const rare = query.filter((q) => df(q) <= this.maxPosting);
      const n = rare.length > 0 ? this.fromRareWords(rare) : this.fromCommonWords(query.map((q) => q.w).sort((x, y) => df({ w: x }) - df({ w: y }) || x - y));
      const touched = this.touched;
      if (n === 0) continue;
      // Score every candidate on all query words through the forward index (term → words).
      for (const q of query) if (q.weight > qWeight[q.w]) qWeight[q.w] = q.weight;
      if (this.scores.length < n) this.scores = new Float64Array(Math.max(n, this.scores.length * 2));
      const scores = this.scores;
      let scored = 0;
      for (let i = 0; i < n; i++) {
        const t = touched[i];
        if (concept[t] === skipConcept) continue;
        let overlap = 0;
        for (let k = this.termStart[t]; k < this.termStart[t + 1]; k++) {
          const w = this.termWords[k];
          const wt = qWeight[w];
          if (wt !== 0) overlap += this.idfs[w] * wt;
        }
        touched[scored] = t;
        scores[scored++] = Math.min(1, (2 * overlap) / (qNorm + this.termNorm[t]));
      }
      for (const q of query) qWeight[q.w] = 0;
      for (const hit of this.topConcepts(touched, scores, scored, limit)) {
        const had = best.get(hit.concept);
        if (!had || hit.score > had.score || (hit.score === had.score && hit.term < had.term)) best.set(hit.concept, hit);
      }
    }
    return [...best.values()].sort((a, b) => b.score - a.score || a.concept - b.concept).slice(0, limit);
  }

  private ensureTouched(n: number): Int32Array {
    if (n > this.touched.length) {
      const grown = new Int32Array(Math.max(n, this.touched.length * 2));
      grown.set(this.touched);
      this.touched = grown;
    }
    return this.touched;
  }

  /**
   * Candidates from the query's rarer words (each on at most `maxPosting` terms): the union of
   * their postings, and when that holds more than CANDIDATES_FULL terms, the CANDIDATES_FULL
   * with the most IDF weight of those words (ties by term index). Into this.touched; returns the count.
   */
  private fromRareWords(rare: readonly { w: number; weight: number }[]): number {
    const acc = this.scratch;
    let n = 0;
    for (const { w, weight } of rare) {
      const gain = this.idfs[w] * weight;
      const s = this.start[w];
      const end = Math.min(this.start[w + 1], s + CANDIDATE_SCAN_MAX);
      const touched = this.ensureTouched(n + end - s);
      for (let k = s; k < end; k++) {
        const t = this.terms[k];
        if (acc[t] === 0) touched[n++] = t;
        acc[t] += gain;
      }
    }
    const touched = this.touched;
    if (n > CANDIDATES_FULL) {
      if (this.scores.length < n) this.scores = new Float64Array(Math.max(n, this.scores.length * 2));
      const v = this.scores;
      for (let i = 0; i < n; i++) v[i] = acc[touched[i]];
      const cut = kthLargest(v, n, CANDIDATES_FULL - 1);
      let kept = 0;
      let nt = 0;
      const ties = new Int32Array(n);
      for (let i = 0; i < n; i++) {
        const t = touched[i];
        const a = acc[t];
        if (a > cut) touched[kept++] = t;
        else if (a === cut) ties[nt++] = t;
        acc[t] = 0;
      }
      const tied = ties.subarray(0, nt).sort();
      for (let i = 0; kept < CANDIDATES_FULL && i < nt; i++) touched[kept++] = tied[i];
      return kept;
    }
    for (let i = 0; i < n; i++) acc[touched[i]] = 0;
    return n;
  }

  /**
   * Candidates of a query whose words are all common (each on more than `maxPosting` terms):
   * the terms that have the rarest word, narrowed by intersecting with the next rarest words
   * while more than CANDIDATES_FULL remain and the intersection is not empty. Postings are in
   * term order, so each step is a merge. At most CANDIDATE_SCAN_MAX postings per word are read;
   * of a final set above CANDIDATES_FULL the first (lowest term indexes) are kept.
   */
  private fromCommonWords(byRarity: readonly number[]): number {
    if (byRarity.length === 0) return 0;
    const w0 = byRarity[0];
    const s0 = this.start[w0];
    let n = Math.min(this.start[w0 + 1] - s0, CANDIDATE_SCAN_MAX);
    let cur: Int32Array = this.ensureTouched(n);
    cur.set(this.terms.subarray(s0, s0 + n));
    if (this.merged.length < n) this.merged = new Int32Array(Math.max(n, this.merged.length * 2));
    let next: Int32Array = this.merged;
    const terms = this.terms;
    for (let q = 1; q < byRarity.length && n > CANDIDATES_FULL; q++) {
      const w = byRarity[q];
      let k = this.start[w];
      const end = Math.min(this.start[w + 1], k + CANDIDATE_SCAN_MAX);
      let m = 0;
      for (let i = 0; i < n && k < end; i++) {
        const t = cur[i];
        if (terms[k] < t) {
          // Gallop: the postings hold far more terms than survive, so skip ahead by doubling
          // steps, then bisect (k ends on the first posting >= t, or at end).
          let step = 1;
          while (k + step < end && terms[k + step] < t) step *= 2;
          let lo = k + (step >> 1) + 1;
          let hi = Math.min(k + step, end);
          while (lo < hi) {
            const mid = (lo + hi) >>> 1;
            if (terms[mid] < t) lo = mid + 1;
            else hi = mid;
          }
          k = lo;
        }
        if (k < end && terms[k] === t) next[m++] = t;
      }
      if (m === 0) break;
      const swap = cur;
      cur = next;
      next = swap;
      n = m;
    }
    if (cur !== this.touched) this.touched.set(cur.subarray(0, n));
    return Math.min(n, CANDIDATES_FULL);
  }

  /**
   * The `limit` best concepts among terms[0..n) with their scores: each concept's best term
   * (lowest term index on ties), concepts by score, then concept index. Only the terms at or
   * above a cut found by selection are sorted; if they hold fewer than `limit` concepts, all are.
   */
  private topConcepts(terms: Int32Array, scores: Float64Array, n: number, limit: number): IndexHit[] {
    const concept = this.release.termConcept;
    const pick = (list: number[]): IndexHit[] => {
      list.sort((i, j) => scores[j] - scores[i] || concept[terms[i]] - concept[terms[j]] || terms[i] - terms[j]);
      const out: IndexHit[] = [];
      const taken = new Set<number>();
      for (const i of list) {
        const c = concept[terms[i]];
        if (taken.has(c)) continue;
        taken.add(c);
        out.push({ concept: c, term: terms[i], score: scores[i] });
        if (out.length === limit) break;
      }
      return out;
    };
    const k = Math.min(n, limit * 8);
    if (k === n) return pick(Array.from({ length: n }, (_, i) => i));
    const copy = scores.slice(0, n);
    const cut = kthLargest(copy, n, k - 1);
    const list: number[] = [];
    for (let i = 0; i < n; i++) if (scores[i] >= cut) list.push(i);
    const out = pick(list);
    return out.length === limit ? out : pick(Array.from({ length: n }, (_, i) => i));
  }
}
