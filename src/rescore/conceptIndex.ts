/**
 * ConceptIndex: an inverted index over the active concepts of a release, for nearest-concept
 * search when a concept vanished without a trace (no term flow, no history row).
 *
 * Keys are the stems of each term's lexical key (text/normalize.ts) and, for robustness to
 * typos and abbreviations, the character 3-grams of its folded form. A query accumulates
 * IDF-weighted overlaps over the postings, keeps the best candidates, and returns their
 * concepts. Built lazily, once per release, and only when something needs it.
 */
import type { Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { foldTerm, lexicalKey } from '../text/normalize.js';

export interface IndexHit {
  concept: number;
  /** Best matching term of the concept. */
  term: number;
  /** IDF-weighted overlap, normalised to 0..1. */
  score: number;
}

function trigrams(folded: string): string[] {
  const s = ` ${folded} `;
  const out: string[] = [];
  for (let i = 0; i + 3 <= s.length; i++) out.push(s.slice(i, i + 3));
  return out;
}

/** Keys of one text: stems prefixed 'w', trigrams prefixed 'g', deduplicated. */
export function indexKeys(text: string): string[] {
  const stems = lexicalKey(text).split(' ').filter(Boolean).map((w) => `w${w}`);
  const grams = trigrams(foldTerm(text)).map((g) => `g${g}`);
  return [...new Set([...stems, ...grams])];
}

export class ConceptIndex {
  readonly release: Release;
  private readonly postings = new Map<string, number[]>();
  private readonly termNorm: Float64Array;
  private readonly termCount: number;

  constructor(release: Release) {
    this.release = release;
    let n = 0;
    for (let t = 0; t < release.termCount; t++) {
      if (release.conceptStatus[release.termConcept[t]] !== ACTIVE || release.termStatus[t] !== ACTIVE) continue;
      n++;
      for (const k of indexKeys(release.termText[t])) {
        const list = this.postings.get(k);
        if (list) list.push(t);
        else this.postings.set(k, [t]);
      }
    }
    this.termCount = n;
    this.termNorm = new Float64Array(release.termCount);
    for (const [k, list] of this.postings) {
      const w = this.idf(list.length, k);
      for (const t of list) this.termNorm[t] += w;
    }
  }

  /** Stems weigh more than trigrams: a shared word says more than a shared letter run. */
  private idf(df: number, key: string): number {
    const base = Math.log((this.termCount + 1) / (df + 1)) + 1;
    return key.charCodeAt(0) === 119 /* w */ ? 2 * base : base;
  }

  /**
   * Concepts whose terms best match `texts` (weighted Dice of keys, best term per concept),
   * best first; ties broken by concept index so results are deterministic.
   */
  search(texts: readonly string[], limit = 10, skipConcept = -1): IndexHit[] {
    const best = new Map<number, IndexHit>();
    for (const text of texts) {
      const keys = indexKeys(text);
      let qNorm = 0;
      const overlap = new Map<number, number>();
      for (const k of keys) {
        const list = this.postings.get(k);
        const w = this.idf(list?.length ?? 0, k);
        qNorm += w;
        if (!list || list.length > 50000) continue;
        for (const t of list) overlap.set(t, (overlap.get(t) ?? 0) + w);
      }
      for (const [t, o] of overlap) {
        const c = this.release.termConcept[t];
        if (c === skipConcept) continue;
        const score = (2 * o) / (qNorm + this.termNorm[t]);
        const had = best.get(c);
        if (!had || score > had.score || (score === had.score && t < had.term)) best.set(c, { concept: c, term: t, score });
      }
    }
    return [...best.values()].sort((a, b) => b.score - a.score || a.concept - b.concept).slice(0, limit);
  }
}
