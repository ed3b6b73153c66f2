/**
 * Tests of src/text/tfidf.ts: the worked example of scikit-learn's user guide,
 * the cosine of talisman 1.1.4 (metrics/cosine) as reference where every idf
 * is 1, and properties of the measure.
 */

import fc from 'fast-check';
import referenceCosine from 'talisman/metrics/cosine.js';
import { describe, expect, it } from 'vitest';
import { DocumentFrequencies, tfidfCosine } from '../../src/text/tfidf.js';

/** A document given as counts of tokens t0, t1, t2 → its token list. */
function fromCounts(counts: number[]): string[] {
  return counts.flatMap((c, i) => Array.from({ length: c }, () => `t${i}`));
}

function frequenciesOf(docs: string[][]): DocumentFrequencies {
  const df = new DocumentFrequencies();
  for (const d of docs) df.add(d);
  return df;
}

describe('DocumentFrequencies', () => {
  it('counts a token once per document', () => {
    const df = frequenciesOf([['fracture', 'fracture', 'femur'], ['fracture'], []]);
    expect(df.count).toBe(3);
    expect(df.vocabularySize).toBe(2);
    expect(df.frequency('fracture')).toBe(2);
    expect(df.frequency('femur')).toBe(1);
    expect(df.frequency('tibia')).toBe(0);
  });

  it('uses the smoothed idf ln((N + 1) / (df + 1)) + 1', () => {
    const df = frequenciesOf([['a', 'b'], ['a'], ['a'], ['c']]);
    expect(df.idf('a')).toBeCloseTo(Math.log(5 / 4) + 1, 12);
    expect(df.idf('b')).toBeCloseTo(Math.log(5 / 2) + 1, 12);
    expect(df.idf('unseen')).toBeCloseTo(Math.log(5) + 1, 12);
    expect(new DocumentFrequencies().idf('x')).toBe(1);
  });

  it('gives rarer tokens larger weights, never below 1', () => {
    const docs = fc.array(fc.array(fc.constantFrom('a', 'b', 'c', 'd'), { maxLength: 6 }), { maxLength: 30 });
    fc.assert(
      fc.property(docs, (ds) => {
        const df = frequenciesOf(ds);
        const tokens = ['a', 'b', 'c', 'd', 'unseen'];
        return tokens.every(
          (x) =>
            df.idf(x) >= 1 &&
            tokens.every((y) => df.frequency(x) >= df.frequency(y) || df.idf(x) > df.idf(y)),
        );
      }),
    );
  });
});

describe('tfidfCosine', () => {
  it('reproduces the scikit-learn user guide example (smooth_idf=True)', () => {
    // scikit-learn user guide, "Feature extraction" → "Tf–idf term weighting":
    // TfidfTransformer(smooth_idf=True) on these six count vectors gives the
    // l2-normalised rows below (quoted from memory of the guide, and checked
    // by hand: idf = 1, ln(7/2) + 1, ln(7/3) + 1). Cosine of two documents is
    // the dot product of their rows.
    const counts = [
      [3, 0, 1],
      [2, 0, 0],
      [3, 0, 0],
      [4, 0, 0],
      [3, 2, 0],
      [3, 0, 2],
    ];
    const rows = [
      [0.85151335, 0, 0.52433293],
      [1, 0, 0],
      [1, 0, 0],
      [1, 0, 0],
      [0.55422893, 0.83236428, 0],
      [0.63035731, 0, 0.77630514],
    ];
    const docs = counts.map(fromCounts);
    const df = frequenciesOf(docs);
    for (let i = 0; i < docs.length; i++) {
      for (let j = 0; j < docs.length; j++) {
        const expected = rows[i].reduce((s, x, k) => s + x * rows[j][k], 0);
        expect(Math.abs(tfidfCosine(docs[i], docs[j], df) - expected)).toBeLessThan(1e-7);
      }
    }
  });

  it('with no documents (every idf 1) equals the plain cosine of counts (talisman metrics/cosine)', () => {
    const vocabulary = ['a', 'b', 'c', 'd', 'e'];
    const counts = fc.array(fc.nat(4), { minLength: 5, maxLength: 5 }).filter((v) => v.some((x) => x > 0));
    const empty = new DocumentFrequencies();
    fc.assert(
      fc.property(counts, counts, (x, y) => {
        const a = x.flatMap((c, i) => Array.from({ length: c }, () => vocabulary[i]));
        const b = y.flatMap((c, i) => Array.from({ length: c }, () => vocabulary[i]));
        return Math.abs(tfidfCosine(a, b, empty) - referenceCosine(x, y)) <= 1e-12;
      }),
    );
  });

  it('weighs a shared rare token above a shared common one', () => {
    const df = frequenciesOf([['disease'], ['disease'], ['disease', 'sarcoidosis'], ['disease', 'lung']]);
    const rare = tfidfCosine(['sarcoidosis', 'lung'], ['sarcoidosis', 'skin'], df);
    const common = tfidfCosine(['disease', 'lung'], ['disease', 'skin'], df);
    expect(rare).toBeGreaterThan(common);
  });

  it('handles empty lists', () => {
    const df = frequenciesOf([['a']]);
    expect(tfidfCosine([], [], df)).toBe(1);
    expect(tfidfCosine(['a'], [], df)).toBe(0);
    expect(tfidfCosine([], ['a'], df)).toBe(0);
  });

  it('is symmetric, in [0, 1], 1 for the same bag of tokens and 0 for disjoint ones', () => {
    const tokens = fc.array(fc.constantFrom('a', 'b', 'c', 'd', 'e', 'f'), { minLength: 1, maxLength: 10 });
    fc.assert(
      fc.property(fc.array(tokens, { maxLength: 20 }), tokens, tokens, (docs, a, b) => {
        const df = frequenciesOf(docs);
        const c = tfidfCosine(a, b, df);
        const disjoint = a.every((t) => !b.includes(t));
        return (
          Math.abs(c - tfidfCosine(b, a, df)) <= 1e-12 &&
          c >= 0 &&
          c <= 1 &&
          Math.abs(tfidfCosine(a, [...a].reverse(), df) - 1) <= 1e-12 &&
          (!disjoint || c === 0)
        );
      }),
    );
  });
});
