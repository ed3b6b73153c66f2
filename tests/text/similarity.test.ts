/**
 * Tests of src/text/similarity.ts: published worked examples, then property
 * tests against general-purpose reference libraries from npm —
 * `fastest-levenshtein` 1.0.16 for Levenshtein, `talisman` 1.1.4
 * (metrics/jaro, metrics/jaro-winkler, metrics/dice, metrics/jaccard) for the
 * others. talisman's Jaro–Winkler is Winkler's definition with p = 0.1, a
 * prefix of at most 4 and the 0.7 boost threshold, the same as ours by default
 * (checked by reading its source: node_modules/talisman/metrics/jaro-winkler.js).
 */

import fc from 'fast-check';
import { distance as referenceLevenshtein } from 'fastest-levenshtein';
import referenceDice from 'talisman/metrics/dice.js';
import referenceJaccard from 'talisman/metrics/jaccard.js';
import referenceJaro from 'talisman/metrics/jaro.js';
import referenceJaroWinkler from 'talisman/metrics/jaro-winkler.js';
import { describe, expect, it } from 'vitest';
import {
  charNgrams,
  diceBigrams,
  jaro,
  jaroWinkler,
  levenshtein,
  levenshteinSimilarity,
  tokenJaccard,
  trigramDice,
} from '../../src/text/similarity.js';

// --- arbitraries -----------------------------------------------------------

/** Few letters, so that strings share characters; up to 90 units (3 Myers blocks). */
const smallAlphabet = fc.string({ unit: fc.constantFrom('a', 'b', 'c', 'd', ' '), maxLength: 90 });
/** Any code point, astral ones included (two UTF-16 units each). */
const anyUnicode = fc.string({ unit: 'binary', maxLength: 40 });
/** Letters that fold or decompose differently, plus an astral emoji. */
const trickyUnicode = fc.string({
  unit: fc.constantFrom('a', 'é', 'e\u0301', 'Σ', 'ς', 'ß', '😀', '\uD800', 'ﬁ', '1'),
  maxLength: 30,
});
const someString = fc.oneof(smallAlphabet, anyUnicode, trickyUnicode);

/** Two strings sharing a prefix and a suffix, to exercise the trimming. */
const relatedPair = fc
  .tuple(someString, someString, someString, someString)
  .map(([p, x, y, q]): [string, string] => [p + x + q, p + y + q]);
const anyPair = fc.oneof(fc.tuple(someString, someString), relatedPair);

/** A long string and a copy with a few random edits, for bounded distances. */
const fewEdits = fc
  .tuple(
    fc.string({ unit: fc.constantFrom('a', 'b', 'c', 'd', 'e'), minLength: 33, maxLength: 150 }),
    fc.array(fc.tuple(fc.nat(), fc.constantFrom('ins', 'del', 'sub'), fc.constantFrom('a', 'b', 'x')), {
      maxLength: 8,
    }),
  )
  .map(([base, edits]): [string, string] => {
    let t = base;
    for (const [at, op, ch] of edits) {
      const i = at % (t.length + 1);
      if (op === 'ins') t = t.slice(0, i) + ch + t.slice(i);
      else if (op === 'del') t = t.slice(0, i) + t.slice(i + 1);
      else t = t.slice(0, i) + ch + t.slice(i + 1);
    }
    return [base, t];
  });

const RUNS = { numRuns: 2000 };

// --- Levenshtein -----------------------------------------------------------

describe('levenshtein', () => {
  it('matches the published examples', () => {
    // Wikipedia, "Levenshtein distance": kitten → sitting = 3, Saturday → Sunday = 3.
    expect(levenshtein('kitten', 'sitting')).toBe(3);
    expect(levenshtein('Saturday', 'Sunday')).toBe(3);
    // Rosetta Code, "Levenshtein distance": rosettacode → raisethysword = 8.
    expect(levenshtein('rosettacode', 'raisethysword')).toBe(8);
  });

  it('handles empty strings', () => {
    expect(levenshtein('', '')).toBe(0);
    expect(levenshtein('', 'abc')).toBe(3);
    expect(levenshtein('abc', '')).toBe(3);
  });

  it('agrees with fastest-levenshtein on random strings', () => {
    fc.assert(
      fc.property(anyPair, ([a, b]) => levenshtein(a, b) === referenceLevenshtein(a, b)),
      RUNS,
    );
  });

  it('agrees with fastest-levenshtein on long strings (more than 32 units after trimming)', () => {
    const long = fc.string({ unit: fc.constantFrom('a', 'b', 'c'), minLength: 33, maxLength: 200 });
    fc.assert(
      fc.property(long, long, (a, b) => levenshtein(a, b) === referenceLevenshtein(a, b)),
      { numRuns: 500 },
    );
  });

  it('with a bound, returns the distance when within it and bound + 1 otherwise', () => {
    fc.assert(
      fc.property(anyPair, fc.nat(40), ([a, b], k) => {
        const d = referenceLevenshtein(a, b);
        return levenshtein(a, b, k) === (d <= k ? d : k + 1);
      }),
      RUNS,
    );
    fc.assert(
      fc.property(fewEdits, fc.nat(12), ([a, b], k) => {
        const d = referenceLevenshtein(a, b);
        return levenshtein(a, b, k) === (d <= k ? d : k + 1) && levenshtein(b, a, k) === (d <= k ? d : k + 1);
      }),
      RUNS,
    );
    expect(levenshtein('kitten', 'sitting', 2)).toBe(3);
    expect(levenshtein('kitten', 'sitting', 3)).toBe(3);
    expect(levenshtein('kitten', 'sitting', 2.9)).toBe(3); // bound floored to 2
  });

  it('rejects a negative or NaN bound', () => {
    expect(() => levenshtein('a', 'b', -1)).toThrow(RangeError);
    expect(() => levenshtein('a', 'b', Number.NaN)).toThrow(RangeError);
  });

  it('is a metric: identity, symmetry, triangle inequality', () => {
    fc.assert(
      fc.property(someString, someString, someString, (a, b, c) => {
        const ab = levenshtein(a, b);
        return (
          levenshtein(a, a) === 0 &&
          (ab === 0) === (a === b) &&
          ab === levenshtein(b, a) &&
          levenshtein(a, c) <= ab + levenshtein(b, c)
        );
      }),
      RUNS,
    );
  });

  it('similarity lies in [0, 1], is 1 exactly for equal strings and for two empty ones', () => {
    expect(levenshteinSimilarity('', '')).toBe(1);
    expect(levenshteinSimilarity('kitten', 'sitting')).toBeCloseTo(1 - 3 / 7, 12);
    fc.assert(
      fc.property(anyPair, ([a, b]) => {
        const s = levenshteinSimilarity(a, b);
        return s >= 0 && s <= 1 && (s === 1) === (a === b);
      }),
      RUNS,
    );
  });
});

// --- Jaro and Jaro–Winkler ---------------------------------------------------

describe('jaro and jaroWinkler', () => {
  // Winkler 1990, as given by Wikipedia "Jaro–Winkler distance" and Rosetta
  // Code "Jaro similarity" (p = 0.1, prefix ≤ 4), to 3 decimals.
  it.each([
    ['MARTHA', 'MARHTA', 0.944, 0.961],
    ['DWAYNE', 'DUANE', 0.822, 0.84],
    ['DIXON', 'DICKSONX', 0.767, 0.813],
  ])('%s / %s: Jaro %f, Jaro–Winkler %f', (a, b, j, jw) => {
    expect(Math.abs(jaro(a, b) - j)).toBeLessThanOrEqual(0.001);
    expect(Math.abs(jaroWinkler(a, b) - jw)).toBeLessThanOrEqual(0.001);
    expect(Math.abs(jaroWinkler(b, a) - jw)).toBeLessThanOrEqual(0.001);
  });

  it('scores identical strings 1 and a string against the empty string 0', () => {
    expect(jaro('', '')).toBe(1);
    expect(jaro('abc', '')).toBe(0);
    expect(jaro('', 'abc')).toBe(0);
    expect(jaroWinkler('abc', 'abc')).toBe(1);
    expect(jaro('abc', 'xyz')).toBe(0);
  });

  it('agrees with talisman metrics/jaro within 1e-9', () => {
    fc.assert(
      fc.property(anyPair, ([a, b]) => Math.abs(jaro(a, b) - referenceJaro(a, b)) <= 1e-9),
      RUNS,
    );
  });

  it('agrees with talisman metrics/jaro-winkler (p = 0.1, prefix 4, threshold 0.7) within 1e-9', () => {
    fc.assert(
      fc.property(anyPair, ([a, b]) => Math.abs(jaroWinkler(a, b) - referenceJaroWinkler(a, b)) <= 1e-9),
      RUNS,
    );
  });

  it('agrees with talisman for other prefix scales and without the boost threshold', () => {
    fc.assert(
      fc.property(
        anyPair,
        fc.double({ min: 0, max: 0.25, noNaN: true }),
        fc.constantFrom(0, 0.7),
        ([a, b], p, threshold) =>
          Math.abs(
            jaroWinkler(a, b, p, 4, threshold) -
              referenceJaroWinkler.custom({ scalingFactor: p, boostThreshold: threshold }, a, b),
          ) <= 1e-9,
      ),
      RUNS,
    );
  });

  it('is symmetric and lies in [0, 1], Jaro–Winkler never below Jaro', () => {
    fc.assert(
      fc.property(anyPair, ([a, b]) => {
        const j = jaro(a, b);
        const jw = jaroWinkler(a, b);
        return j === jaro(b, a) && jw === jaroWinkler(b, a) && j >= 0 && jw <= 1 && jw >= j;
      }),
      RUNS,
    );
  });

  it('rejects parameters that would leave [0, 1]', () => {
    expect(() => jaroWinkler('a', 'b', 0.3, 4)).toThrow(RangeError);
    expect(() => jaroWinkler('a', 'b', -0.1)).toThrow(RangeError);
    expect(() => jaroWinkler('a', 'b', 0.1, 2.5)).toThrow(RangeError);
    expect(() => jaroWinkler('a', 'b', 0.1, 4, 1.5)).toThrow(RangeError);
  });
});

// --- n-grams -----------------------------------------------------------------

/** Bigram multiset has no repeated bigram: there set and multiset Dice agree. */
function hasDistinctBigrams(s: string): boolean {
  const seen = new Set<string>();
  for (let i = 0; i + 1 < s.length; i++) {
    const g = s.slice(i, i + 2);
    if (seen.has(g)) return false;
    seen.add(g);
  }
  return true;
}

/** Multiset Dice of two gram lists, written plainly with Maps (test oracle). */
function multisetDice(x: string[], y: string[]): number {
  const counts = new Map<string, number>();
  for (const g of x) counts.set(g, (counts.get(g) ?? 0) + 1);
  let common = 0;
  for (const g of y) {
    const c = counts.get(g) ?? 0;
    if (c > 0) {
      counts.set(g, c - 1);
      common++;
    }
  }
  return (2 * common) / (x.length + y.length);
}

describe('diceBigrams', () => {
  it('matches the published example', () => {
    // Wikipedia, "Sørensen–Dice coefficient": night / nacht share "ht" of 4 + 4 bigrams.
    expect(diceBigrams('night', 'nacht')).toBe(0.25);
  });

  it('counts repeated bigrams as a multiset', () => {
    // "aaaa" has aa×3, "aa" has aa×1: 2·1 / (3 + 1), where set Dice would give 1.
    expect(diceBigrams('aaaa', 'aa')).toBe(0.5);
  });

  it('scores identical strings 1 and strings without bigrams 0', () => {
    expect(diceBigrams('', '')).toBe(1);
    expect(diceBigrams('a', 'a')).toBe(1);
    expect(diceBigrams('a', 'b')).toBe(0);
    expect(diceBigrams('a', 'ab')).toBe(0);
  });

  it('agrees with talisman metrics/dice where no bigram repeats (set and multiset coincide)', () => {
    const distinct = fc.oneof(smallAlphabet, anyUnicode).filter((s) => s.length >= 2 && hasDistinctBigrams(s));
    fc.assert(
      fc.property(distinct, distinct, (a, b) => Math.abs(diceBigrams(a, b) - referenceDice(a, b)) <= 1e-9),
      RUNS,
    );
  });

  it('agrees with a Map-based multiset Dice on all strings', () => {
    const bigrams = (s: string): string[] => Array.from({ length: Math.max(s.length - 1, 0) }, (_, i) => s.slice(i, i + 2));
    fc.assert(
      fc.property(anyPair, ([a, b]) => {
        fc.pre(a !== b && a.length >= 2 && b.length >= 2);
        return Math.abs(diceBigrams(a, b) - multisetDice(bigrams(a), bigrams(b))) <= 1e-12;
      }),
      RUNS,
    );
  });

  it('is symmetric and lies in [0, 1]', () => {
    fc.assert(
      fc.property(anyPair, ([a, b]) => {
        const d = diceBigrams(a, b);
        return d === diceBigrams(b, a) && d >= 0 && d <= 1;
      }),
      RUNS,
    );
  });
});

describe('charNgrams and trigramDice', () => {
  it('pads with one space at each end', () => {
    expect(charNgrams('femur')).toEqual([' fe', 'fem', 'emu', 'mur', 'ur ']);
    expect(charNgrams('femur', 2)).toEqual([' f', 'fe', 'em', 'mu', 'ur', 'r ']);
    expect(charNgrams('a')).toEqual([' a ']);
    expect(charNgrams('ab', 5)).toEqual([' ab ']);
    expect(charNgrams('')).toEqual([]);
  });

  it('keeps inner spaces and repeated grams', () => {
    expect(charNgrams('a a')).toEqual([' a ', 'a a', ' a ']);
  });

  it('rejects n that is not a positive integer', () => {
    expect(() => charNgrams('abc', 0)).toThrow(RangeError);
    expect(() => charNgrams('abc', 1.5)).toThrow(RangeError);
  });

  it('trigramDice equals multiset Dice over charNgrams(s, 3)', () => {
    fc.assert(
      fc.property(anyPair, ([a, b]) => {
        fc.pre(a !== b && a !== '' && b !== '');
        return Math.abs(trigramDice(a, b) - multisetDice(charNgrams(a, 3), charNgrams(b, 3))) <= 1e-12;
      }),
      RUNS,
    );
  });

  it('trigramDice: identical strings 1, empty against non-empty 0, symmetric, in [0, 1]', () => {
    expect(trigramDice('', '')).toBe(1);
    expect(trigramDice('femur', '')).toBe(0);
    // femur / femora: " fe", "fem" shared of 5 + 6 trigrams.
    expect(trigramDice('femur', 'femora')).toBeCloseTo(4 / 11, 12);
    fc.assert(
      fc.property(anyPair, ([a, b]) => {
        const d = trigramDice(a, b);
        return d === trigramDice(b, a) && d >= 0 && d <= 1 && (a !== b || d === 1);
      }),
      RUNS,
    );
  });
});

// --- tokens ------------------------------------------------------------------

describe('tokenJaccard', () => {
  const token = fc.string({ unit: fc.constantFrom('a', 'b', 'c', 'd'), minLength: 1, maxLength: 3 });
  const tokens = fc.array(token, { minLength: 1, maxLength: 12 });

  it('counts each token once', () => {
    expect(tokenJaccard(['femur', 'fracture', 'fracture'], ['fracture'])).toBe(0.5);
    expect(tokenJaccard(['a', 'b'], ['c'])).toBe(0);
  });

  it('scores two empty lists 1 (the usual convention for J(∅, ∅), Wikipedia "Jaccard index")', () => {
    expect(tokenJaccard([], [])).toBe(1);
    expect(tokenJaccard([], ['a'])).toBe(0);
  });

  it('agrees with talisman metrics/jaccard on non-empty lists', () => {
    // talisman scores two distinct empty arrays 0, so they are left out here.
    fc.assert(
      fc.property(tokens, tokens, (a, b) => Math.abs(tokenJaccard(a, b) - referenceJaccard(a, b)) <= 1e-12),
      RUNS,
    );
  });

  it('is symmetric and lies in [0, 1]', () => {
    fc.assert(
      fc.property(tokens, tokens, (a, b) => {
        const j = tokenJaccard(a, b);
        return j === tokenJaccard(b, a) && j >= 0 && j <= 1;
      }),
      RUNS,
    );
  });
});
