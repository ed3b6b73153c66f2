/**
 * A small TF-IDF model for comparing the token lists of two terms, so that a
 * shared rare word ("sarcoidosis") weighs more than a shared common one
 * ("disease"). Document frequencies are learnt from a stream of token lists
 * (usually every term of a release, tokenized by ../text/normalize.js), then
 * {@link tfidfCosine} compares two token lists with those weights.
 *
 * Weights: raw term frequency (occurrences in the list) times the smoothed
 * inverse document frequency `idf(t) = ln((N + 1) / (df(t) + 1)) + 1`, where
 * `N` is the number of documents added and `df(t)` how many of them contain
 * `t`. This is the `smooth_idf=True` form of scikit-learn's TfidfTransformer:
 * the +1 inside acts as if one extra document contained every token, so an
 * unseen token gets a finite weight (ln(N + 1) + 1, the largest there is);
 * the +1 outside keeps a token found in every document at weight 1 instead of
 * 0, so two terms made of common words still compare.
 */

/** Document frequencies of tokens, counted over a stream of documents. */
export class DocumentFrequencies {
  private readonly counts = new Map<string, number>();
  private documents = 0;
  private readonly seen = new Set<string>();

  /** Add one document; each distinct token counts once however often it occurs. */
  add(tokens: readonly string[]): void {
    this.documents++;
    const seen = this.seen;
    seen.clear();
    for (const token of tokens) {
      if (seen.has(token)) continue;
      seen.add(token);
      this.counts.set(token, (this.counts.get(token) ?? 0) + 1);
    }
  }

  /** Number of documents added so far (N). */
  get count(): number {
    return this.documents;
  }

  /** Number of distinct tokens seen. */
  get vocabularySize(): number {
    return this.counts.size;
  }

  /** Number of documents that contain `token` (df); 0 for an unseen token. */
  frequency(token: string): number {
    return this.counts.get(token) ?? 0;
  }

  /** Smoothed inverse document frequency `ln((N + 1) / (df + 1)) + 1`, always ≥ 1. */
  idf(token: string): number {
    return Math.log((this.documents + 1) / (this.frequency(token) + 1)) + 1;
  }

  /** The counts as plain data, for a worker thread (see fromParts). */
  toParts(): { documents: number; tokens: string[]; counts: Int32Array } {
    return { documents: this.documents, tokens: [...this.counts.keys()], counts: Int32Array.from(this.counts.values()) };
  }

  /** Document frequencies equal to those `toParts` was taken from. */
  static fromParts(p: { documents: number; tokens: string[]; counts: Int32Array }): DocumentFrequencies {
    const df = new DocumentFrequencies();
    df.documents = p.documents;
    p.tokens.forEach((t, i) => df.counts.set(t, p.counts[i]));
    return df;
  }
}

/**
 * Distinct tokens of a list in first-seen order with their counts, in two reused arrays (the
 * lists are a term's few words; a Map per call cost more than the scan).
 */
class Frequencies {
  readonly tokens: string[] = [];
  counts = new Int32Array(16);
  size = 0;

  of(list: readonly string[]): this {
    this.size = 0;
    if (this.counts.length < list.length) this.counts = new Int32Array(list.length * 2);
    for (const t of list) {
      let k = 0;
      while (k < this.size && this.tokens[k] !== t) k++;
      if (k === this.size) {
        this.tokens[this.size] = t;
        this.counts[this.size++] = 1;
      } else this.counts[k]++;
    }
    return this;
  }

  get(t: string): number | undefined {
    for (let k = 0; k < this.size; k++) if (this.tokens[k] === t) return this.counts[k];
    return undefined;
  }
}
const freqA = new Frequencies();
const freqB = new Frequencies();

/**
 * Cosine of the TF-IDF vectors of two token lists, in [0, 1]. Two empty lists
 * score 1; an empty list against a non-empty one 0. Since every idf is ≥ 1,
 * any non-empty list has a non-zero vector.
 */
export function tfidfCosine(tokensA: readonly string[], tokensB: readonly string[], df: DocumentFrequencies): number {
  if (tokensA.length === 0 || tokensB.length === 0) {
    return tokensA.length === tokensB.length ? 1 : 0;
  }
  // Sums in the same order as over Maps of the lists (first occurrence), so the same floats.
  const tfA = freqA.of(tokensA);
  const tfB = freqB.of(tokensB);
  let dot = 0;
  let normA = 0;
  let normB = 0;
  for (let k = 0; k < tfA.size; k++) {
    const token = tfA.tokens[k];
    const idf = df.idf(token);
    const wa = tfA.counts[k] * idf;
    normA += wa * wa;
    const countB = tfB.get(token);
    if (countB !== undefined) dot += wa * countB * idf;
  }
  for (let k = 0; k < tfB.size; k++) {
    const wb = tfB.counts[k] * df.idf(tfB.tokens[k]);
    normB += wb * wb;
  }
  const cosine = dot / Math.sqrt(normA * normB);
  return cosine > 1 ? 1 : cosine;
}
