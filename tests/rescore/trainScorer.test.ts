import { describe, expect, it } from 'vitest';
import { loadPair } from '../helpers/releases.js';
import { localVariant, neighbourFinder, trainScorer } from '../../src/rescore/trainScorer.js';
import { SeededRandom } from '../../src/rescore/random.js';
import { FEATURES, textForms } from '../../src/rescore/features.js';
import { BASE, BASE_HIERARCHY } from './fixtures.js';

describe('trainScorer', () => {
  it('is deterministic for a seed and fills ScorerInfo', async () => {
    const { new: r, newHierarchy } = await loadPair({ old: BASE, new: BASE, oldHierarchy: BASE_HIERARCHY, newHierarchy: BASE_HIERARCHY });
    const a = trainScorer(r, { hierarchy: newHierarchy, seed: 7 });
    const b = trainScorer(r, { hierarchy: newHierarchy, seed: 7 });
    expect(a.info).toEqual(b.info);
    expect(a.info.features).toEqual([...FEATURES]);
    expect(Object.keys(a.info.weights)).toEqual(['intercept', ...FEATURES]);
    expect(a.info.seed).toBe(7);
    // 36 concepts: at most 8 pairs per concept are drawn.
    expect(a.info.pairs_trained + a.info.pairs_held_out).toBe(8 * 36);
    expect(a.info.pairs_held_out).toBeGreaterThan(0.15 * 8 * 36);
    const c = trainScorer(r, { hierarchy: newHierarchy, seed: 8 });
    expect(c.info.weights).not.toEqual(a.info.weights);
  });

  it('picks the same neighbours whatever concepts it was told to expect', async () => {
    // Siblings under G1 (B01, B05, B06), G2 (B07, B08), G3 (B21, B22); a concept with two parents.
    const { new: r, newHierarchy } = await loadPair({ old: BASE, new: BASE, newHierarchy: BASE_HIERARCHY + 'B08 < G1\n' });
    const all = Array.from({ length: r.conceptCount }, (_, c) => c);
    const picks = (focus: number[]) => {
      const find = neighbourFinder(r, all, newHierarchy, focus);
      const rng = new SeededRandom(11);
      return Array.from({ length: 200 }, (_, k) => find(all[k % all.length], rng));
    };
    const everything = picks(all);
    const id = (c: number | undefined) => (c === undefined ? undefined : r.conceptIds[c]);
    const b08 = r.conceptIndex.get('B08')!;
    // B08's neighbours: a sibling under G1 or G2, never itself.
    expect(new Set(everything.filter((_, k) => all[k % all.length] === b08).map(id)).size).toBeGreaterThan(1);
    expect(everything.filter((_, k) => all[k % all.length] === b08).map(id)).not.toContain('B08');
    expect(picks([])).toEqual(everything); // every concept outside the focus
    expect(picks([b08])).toEqual(everything);
    expect(picks(all.slice(0, 5))).toEqual(everything);
  });

  it('learns weights that favour matching text', async () => {
    const { new: r } = await loadPair({ old: BASE, new: BASE });
    const s = trainScorer(r, { seed: 3 });
    // The held-out set of a 36-concept release is small (about 70 pairs), so only a loose bound;
    // the real-data check is in realData.test.ts.
    expect(s.info.auc).toBeGreaterThan(0.7);
    expect(s.info.weights.trigram + s.info.weights.tfidf + s.info.weights.jaro_winkler + s.info.weights.lexical).toBeGreaterThan(2);
    // A label that is a term scores high, an unrelated one low.
    const f = s.features(r);
    const x = new Float64Array(FEATURES.length);
    f.lexical(textForms('Bronchial asthma'), r.conceptIndex.get('B01')!, x);
    x[FEATURES.indexOf('category_same')] = 1;
    const match = s.probability(x);
    f.lexical(textForms('Bronchial asthma'), r.conceptIndex.get('B29')!, x);
    x[FEATURES.indexOf('category_same')] = 0;
    x[FEATURES.indexOf('category_differs')] = 1;
    expect(match).toBeGreaterThan(0.9);
    expect(s.probability(x)).toBeLessThan(0.1);
  });

  it('needs at least two active concepts', async () => {
    const { new: r } = await loadPair({ old: 'A disorder: Asthma*', new: 'A disorder: Asthma*' });
    expect(() => trainScorer(r)).toThrow(/at least 2/);
  });

  it('rejects bad options', async () => {
    const { new: r } = await loadPair({ old: BASE, new: BASE });
    expect(() => trainScorer(r, { pairs: 5 })).toThrow(/pairs/);
    expect(() => trainScorer(r, { holdOut: 1 })).toThrow(/holdOut/);
  });
});

describe('localVariant', () => {
  it('produces the local-list variants, reproducibly', () => {
    const seen = new Set<string>();
    const rng = new SeededRandom(11);
    for (let i = 0; i < 200; i++) seen.add(localVariant('Removal of gallbladder', rng));
    expect(seen).toContain('Removal of gallbladder');
    expect(seen).toContain('REMOVAL OF GALLBLADDER');
    expect(seen).toContain('gallbladder Removal of');
    expect(seen).toContain('Removal gallbladder');
    expect(seen).toContain('Removal of gall.');
    // and some one-letter typos
    expect([...seen].some((v) => v.length === 'Removal of gallbladder'.length - 1 && v !== 'Removal gallbladder')).toBe(true);
    const again = new SeededRandom(11);
    expect(localVariant('Removal of gallbladder', again)).toBe(localVariant('Removal of gallbladder', new SeededRandom(11)));
  });
});
