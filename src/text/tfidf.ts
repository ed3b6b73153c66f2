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
}

function termFrequencies(tokens: readonly string[]): Map<string, number> {
  const tf = new Map<string, number>();
  for (const t of tokens) tf.set(t, (tf.get(t) ?? 0) + 1);
  return tf;
}

/**
 * Cosine of the TF-IDF vectors of two token lists, in [0, 1]. Two empty lists
 * score 1; an empty list against a non-empty one 0. Since every idf is ≥ 1,
 * any non-empty list has a non-zero vector.
 */
export function tfidfCosine(tokensA: readonly string[], tokensB: readonly string[], df: DocumentFrequencies): number {
  if (tokensA.length === 0 || tokensB.length === 0) {
    return tokensA.length === tokensB.length ? 1 : 0;
  }
  const tfA = termFrequencies(tokensA);
  const tfB = termFrequencies(tokensB);
  let dot = 0;
  let normA = 0;
  let normB = 0;
  for (const [token, count] of tfA) {
    const idf = df.idf(token);
    const wa = count * idf;
    normA += wa * wa;
    const countB = tfB.get(token);
    if (countB !== undefined) dot += wa * countB * idf;
  }
  for (const [token, count] of tfB) {
    const wb = count * df.idf(token);
    normB += wb * wb;
  }
  const cosine = dot / Math.sqrt(normA * normB);
  return cosine > 1 ? 1 : cosine;
}
