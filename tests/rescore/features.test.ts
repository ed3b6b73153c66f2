import { describe, expect, it } from 'vitest';
import { loadPair } from '../helpers/releases.js';
import {
  AncestorIndex, FEATURES, FEATURE_COUNT, LEXICAL_COUNT, ReleaseFeatures, ancestorSimilarity, conceptContext, contextFeatures,
  releaseDocumentFrequencies, textForms,
} from '../../src/rescore/features.js';
import type { Hierarchy } from '../../src/load/types.js';
import { ACTIVE } from '../../src/load/types.js';

const SPEC = `
A disorder: Heart attack* | Myocardial infarction | MI
B disorder: Fracture of femur* | Femoral fracture
C finding: Rash*
D disorder (inactive): Old thing*
`;

async function release() {
  return (await loadPair({ old: SPEC, new: SPEC })).old;
}

const f = (name: (typeof FEATURES)[number]) => FEATURES.indexOf(name);

describe('lexical features', () => {
  it('exact, folded and lexical matches are graded by normalization level', async () => {
    const r = await release();
    const feats = new ReleaseFeatures(r, releaseDocumentFrequencies(r));
    const x = new Float64Array(FEATURE_COUNT);
    const a = r.conceptIndex.get('A')!;
    feats.lexical(textForms('Heart attack'), a, x);
    expect([x[f('exact')], x[f('folded')], x[f('lexical')]]).toEqual([1, 1, 1]);
    feats.lexical(textForms('HEART-ATTACK'), a, x);
    expect([x[f('exact')], x[f('folded')], x[f('lexical')]]).toEqual([0, 1, 1]);
    feats.lexical(textForms('Femur fractures'), r.conceptIndex.get('B')!, x);
    expect([x[f('exact')], x[f('folded')], x[f('lexical')]]).toEqual([0, 0, 1]);
    expect(x[f('tfidf')]).toBeCloseTo(1, 10); // same stems, same vector
  });

  it('takes the best value over the terms, and leaves a skipped term out', async () => {
    const r = await release();
    const feats = new ReleaseFeatures(r, releaseDocumentFrequencies(r));
    const x = new Float64Array(LEXICAL_COUNT);
    const a = r.conceptIndex.get('A')!;
    const mi = r.termText.indexOf('Myocardial infarction');
    const match = feats.lexical(textForms('Myocardial infarction'), a, x);
    expect(match.bestTerm).toBe(mi);
    expect(x[f('trigram')]).toBe(1);
    feats.lexical(textForms('Myocardial infarction'), a, x, 0, mi);
    expect(x[f('exact')]).toBe(0);
    expect(x[f('trigram')]).toBeLessThan(0.5);
  });

  it('a typo keeps high edit similarity and no exact match', async () => {
    const r = await release();
    const feats = new ReleaseFeatures(r, releaseDocumentFrequencies(r));
    const x = new Float64Array(LEXICAL_COUNT);
    feats.lexical(textForms('Hart attack'), r.conceptIndex.get('A')!, x);
    expect(x[f('exact')]).toBe(0);
    expect(x[f('jaro_winkler')]).toBeGreaterThan(0.9);
    // levenshtein similarity 1 − 1/12 ("hart attack" vs "heart attack")
    expect(x[f('levenshtein')]).toBeCloseTo(1 - 1 / 12, 10);
  });

  it('document frequencies count active terms of active concepts only', async () => {
    const r = await release();
    const df = releaseDocumentFrequencies(r);
    expect(df.count).toBe(6); // 3 + 2 + 1; D is inactive
    expect(df.frequency('fractur')).toBe(2);
    // Sampled: 3 of the 6 terms read, evenly spaced.
    expect(releaseDocumentFrequencies(r, 3).count).toBe(3);
  });
});

function hierarchy(edges: [string, string][]): Hierarchy {
  const parents = new Map<string, string[]>();
  for (const [c, p] of edges) parents.set(c, [...(parents.get(c) ?? []), p]);
  return { path: 'h', sha256: '', accounting: { file: 'h', read: 0, used: 0, rejected: 0, blankLines: 0 }, diagnostics: [], parents, edgeCount: edges.length };
}

describe('context features', () => {
  it('walks ancestors up to three levels and survives cycles', () => {
    const idx = new AncestorIndex(hierarchy([['A', 'P'], ['P', 'G'], ['G', 'GG'], ['GG', 'GGG'], ['X', 'Y'], ['Y', 'X']]));
    expect([...idx.ancestors('A')]).toEqual([['P', 1], ['G', 2], ['GG', 3]]);
    expect([...idx.ancestors('X')]).toEqual([['Y', 1]]);
  });

  it('tells when a concept has the same ancestors in two hierarchies without building them', () => {
    const before = [['A', 'P'], ['P', 'G'], ['G', 'GG'], ['GG', 'GGG'], ['B', 'Q'], ['Q', 'G'], ['C', 'C'], ['X', 'Y'], ['Y', 'X']] as [string, string][];
    const old = new AncestorIndex(hierarchy(before));
    // GG's parent changed: A's walk (P, G, GG) never expands GG; P's walk (G, GG, GGG) does.
    const moved = new AncestorIndex(hierarchy(before.map(([c, p]) => (c === 'GG' ? [c, 'OTHER'] : [c, p]))));
    // Q's parent changed: B's ancestry differs at depth 2.
    const reparented = new AncestorIndex(hierarchy(before.map(([c, p]) => (c === 'Q' ? [c, 'R'] : [c, p]))));
    for (const other of [old, moved, reparented, new AncestorIndex(hierarchy(before))]) {
      for (const id of ['A', 'P', 'G', 'B', 'Q', 'C', 'X', 'NONE']) {
        const same = old.sameAncestors(other, id);
        // "Same" is never wrong: the maps are then equal, depths included.
        if (same) expect([...other.ancestors(id)]).toEqual([...old.ancestors(id)]);
        expect(old.hasAncestors(id)).toBe(old.ancestors(id).size > 0);
      }
    }
    expect(old.sameAncestors(old, 'A')).toBe(true);
    expect(old.sameAncestors(moved, 'A')).toBe(true); // GG's parents lie beyond A's three levels
    expect(old.sameAncestors(moved, 'P')).toBe(false); // … but are P's third level
    expect(old.sameAncestors(reparented, 'B')).toBe(false);
    expect(old.sameAncestors(reparented, 'A')).toBe(true);
    expect(old.sameAncestors(reparented, 'X')).toBe(true); // a cycle ends the walk
    expect([old.hasAncestors('C'), old.hasAncestors('NONE'), old.hasAncestors('X')]).toEqual([false, false, true]); // C is only its own parent
    expect([old.sameParents(reparented, 'Q'), old.sameParents(reparented, 'A'), old.sameParents(reparented, 'NONE')]).toEqual([false, true, true]);
  });

  it('weighted Jaccard of ancestors (hand-computed)', () => {
    // A: P(1), G(1/2); B: P(1), Q(1), G(1/2). Shared min: 1 + 1/2; union max: 1 + 1 + 1/2 → 0.6.
    expect(ancestorSimilarity(new Map([['P', 1], ['G', 2]]), new Map([['P', 1], ['Q', 1], ['G', 2]]))).toBeCloseTo(0.6, 12);
    // Siblings under the same parents score 1, like a concept against itself.
    expect(ancestorSimilarity(new Map([['P', 1]]), new Map([['P', 1]]))).toBe(1);
    expect(ancestorSimilarity(new Map(), new Map([['P', 1]]))).toBe(0);
  });

  it('category and hierarchy indicators, all 0 when unknown', async () => {
    const r = await release();
    const anc = new AncestorIndex(hierarchy([['A', 'P'], ['B', 'P'], ['C', 'Z']]));
    const x = new Float64Array(FEATURE_COUNT).fill(9);
    const ctx = (id: string) => conceptContext(r, r.conceptIndex.get(id)!, anc);
    contextFeatures(ctx('A'), ctx('B'), x);
    expect([...x.slice(LEXICAL_COUNT)]).toEqual([1, 0, 1, 0]);
    contextFeatures(ctx('A'), ctx('C'), x);
    expect([...x.slice(LEXICAL_COUNT)]).toEqual([0, 1, 0, 1]);
    contextFeatures(null, ctx('C'), x);
    expect([...x.slice(LEXICAL_COUNT)]).toEqual([0, 0, 0, 0]);
    contextFeatures({ category: null, ancestors: null }, ctx('C'), x);
    expect([...x.slice(LEXICAL_COUNT)]).toEqual([0, 0, 0, 0]);
  });
});

describe('document frequencies from the release bytes', () => {
  it('sample the active terms at positions 0, step, 2 step … (floored), skipping inactive ones, for any step', async () => {
    const spec = `
A disorder: Heart attack* | Attacks of the heart | Cardiac arrest
B disorder (inactive): Old fracture* | Former break
C disorder: Fracture of femur* | Femoral fracture | Broken thigh bone
D finding: Skin rash* | Eruption
E disorder (inactive): Retired item*
F finding: Itching* | Pruritus | Itch of skin
`;
    const r = (await loadPair({ old: spec, new: spec })).old;
    const { lexicalKey } = await import('../../src/text/normalize.js');
    const { DocumentFrequencies } = await import('../../src/text/tfidf.js');
    // The reference: the list of every counted term, indexed at floor(i) for i = 0, step, …
    const active: number[] = [];
    for (let t = 0; t < r.termCount; t++) if (r.termStatus[t] === ACTIVE && r.conceptStatus[r.termConcept[t]] === ACTIVE) active.push(t);
    expect(active.length).toBe(11);
    for (const maxTerms of [1, 2, 3, 4, 5, 7, 10, 11, 50]) {
      const expected = new DocumentFrequencies();
      const step = Math.max(1, active.length / maxTerms);
      for (let i = 0; i < active.length; i += step) {
        const key = lexicalKey(r.termText[active[Math.floor(i)]]);
        expected.add(key === '' ? [] : key.split(' '));
      }
      const got = releaseDocumentFrequencies(r, maxTerms);
      expect([maxTerms, got.count, got.vocabularySize]).toEqual([maxTerms, expected.count, expected.vocabularySize]);
      for (const stem of ['heart', 'attack', 'cardiac', 'fractur', 'femur', 'broken', 'rash', 'erupt', 'itch', 'pruritu', 'skin', 'old']) {
        expect([maxTerms, stem, got.frequency(stem)]).toEqual([maxTerms, stem, expected.frequency(stem)]);
      }
    }
  });

  it('count the same stems as the lexical keys of every sampled term (plain, punctuated, other scripts, stop words only)', async () => {
    const spec = `
A disorder: Heart attack* | Attacks of the heart | heart, attack (acute) | The
B disorder: Fracture of femur* | Femoral fracture | Rh+ fracture | 0.5 mg femur
C finding: Ménière disease* | Crohn's disease | Disease of the heart | of the
`;
    const r = (await loadPair({ old: spec, new: spec })).old;
    const { lexicalKey } = await import('../../src/text/normalize.js');
    const { DocumentFrequencies } = await import('../../src/text/tfidf.js');
    const expected = new DocumentFrequencies();
    for (let t = 0; t < r.termCount; t++) {
      const key = lexicalKey(r.termText[t]);
      expected.add(key === '' ? [] : key.split(' '));
    }
    const got = releaseDocumentFrequencies(r);
    expect(got.count).toBe(expected.count);
    expect(got.vocabularySize).toBe(expected.vocabularySize);
    for (const stem of ['heart', 'attack', 'fractur', 'femur', 'diseas', 'the', 'rh+', '0.5', 'menier', 'crohn']) expect([stem, got.frequency(stem)]).toEqual([stem, expected.frequency(stem)]);
  });
});
