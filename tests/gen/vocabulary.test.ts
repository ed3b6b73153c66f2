/** The synthetic base release: size, identifiers, term variants, uniqueness, hierarchy, determinism. */
import { describe, expect, it } from 'vitest';
import { foldTerm, lexicalKey } from '../../src/text/normalize.js';
import { generateVocabulary, DEFAULT_SYNONYM_WEIGHTS } from '../../src/gen/vocabulary.js';
import { DEFAULT_CATEGORY_WEIGHTS, SCHEMES, packCore, unpackCore } from '../../src/gen/lexicon.js';
import { Rng } from '../../src/gen/random.js';

const N = 20_000;
const vocab = generateVocabulary({ concepts: N, seed: 4 });
const { concepts, parents } = vocab.release;

describe('naming schemes', () => {
  for (const scheme of Object.values(SCHEMES)) {
    it(`${scheme.category}: names after the canonical one marked same-key have its lexical key; names are clean`, () => {
      const r = new Rng(scheme.category);
      const d: number[] = [];
      let marked = 0;
      for (let i = 0; i < 3000; i++) {
        if (i % 2) scheme.draw(r, d);
        else scheme.drawUniform(r, d);
        expect(unpackCore(scheme.radix, packCore(scheme.radix, d), [])).toEqual(d);
        const names = scheme.names(d);
        expect(scheme.names(d, false)[0]).toBe(names[0]);
        const key = lexicalKey(names[0]);
        for (let j = 1; j <= (names.sameKey ?? 0); j++) {
          expect(lexicalKey(names[j]), `${names[0]} / ${names[j]}`).toBe(key);
          marked++;
        }
        for (const name of names) {
          expect(name).toMatch(/^[A-Z0-9]/);
          expect(name).not.toMatch(/[\t\r\n"]|\s{2}|\s$/);
        }
      }
      if (scheme.category !== 'substance' && scheme.category !== 'organism') expect(marked).toBeGreaterThanOrEqual(3000);
    });
  }
});

describe('generateVocabulary', () => {
  it('makes N concepts with G + 7-digit ids and unique T + 8-digit term ids, the preferred term first', () => {
    expect(concepts.length).toBe(N);
    expect(concepts[0].id).toBe('G0000001');
    expect(concepts[N - 1].id).toBe('G0020000');
    const termIds = new Set<string>();
    for (const c of concepts) {
      expect(c.id).toMatch(/^G\d{7}$/);
      expect(c.status).toBe('active');
      expect(c.terms[0].type).toBe('preferred');
      expect(c.terms.slice(1).every((t) => t.type === 'synonym')).toBe(true);
      expect(c.terms.length).toBeLessThanOrEqual(7);
      for (const t of c.terms) {
        expect(t.termId).toMatch(/^T\d{8}$/);
        termIds.add(t.termId);
      }
    }
    const terms = concepts.reduce((a, c) => a + c.terms.length, 0);
    expect(termIds.size).toBe(terms);
    // About 4 terms per concept (1 preferred + a mean of 3.45 synonyms asked, fewer where a scheme has fewer names).
    expect(terms / N).toBeGreaterThan(3.6);
    expect(terms / N).toBeLessThan(4.4);
    expect(DEFAULT_SYNONYM_WEIGHTS.length).toBe(7);
    expect(vocab.conceptIdFor(0)).toBe('G0020001');
    expect(vocab.indexOf('G0000005')).toBe(4);
    expect(vocab.indexOf('G0020001')).toBe(-1);
    expect(vocab.indexOf('X0000005')).toBe(-1);
  });

  it('draws the categories in the default proportions', () => {
    const counts = new Map<string, number>();
    for (const c of concepts) counts.set(c.category, (counts.get(c.category) ?? 0) + 1);
    for (const [cat, w] of Object.entries(DEFAULT_CATEGORY_WEIGHTS)) expect(Math.abs((counts.get(cat) ?? 0) / N - w)).toBeLessThan(0.015);
  });

  it('gives each lexical key to one concept, so every term string is unique (within and across categories)', () => {
    const owner = new Map<string, string>();
    const strings = new Set<string>();
    for (const c of concepts) {
      for (const t of c.terms) {
        const k = lexicalKey(t.text);
        const o = owner.get(k);
        expect(o === undefined || o === c.id, `${t.text} of ${c.id} has the key of ${o}`).toBe(true);
        owner.set(k, c.id);
        expect(strings.has(t.text)).toBe(false);
        strings.add(t.text);
      }
    }
  });

  it('makes the terms of one concept variants of one name, and lets concepts share words (hard negatives)', () => {
    const tokens = (s: string) => new Set(lexicalKey(s).split(' '));
    let withVariants = 0;
    const wordConcepts = new Map<string, number>();
    for (const c of concepts) {
      const pref = tokens(c.terms[0].text);
      for (const t of c.terms.slice(1)) {
        // Every synonym shares a word stem with the preferred term, or is an abbreviation or code of it.
        if ([...tokens(t.text)].some((w) => pref.has(w))) withVariants++;
      }
      for (const w of pref) wordConcepts.set(w, (wordConcepts.get(w) ?? 0) + 1);
      expect(new Set(c.terms.map((t) => t.text)).size).toBe(c.terms.length);
    }
    const synonyms = concepts.reduce((a, c) => a + c.terms.length - 1, 0);
    expect(withVariants / synonyms).toBeGreaterThan(0.9);
    // Concepts named from sites and processes share a word of their preferred term with at least
    // 10 other concepts (invented substance and organism names are mostly their own).
    const sited = concepts.filter((c) => c.category !== 'substance' && c.category !== 'organism');
    const sharing = sited.filter((c) => [...tokens(c.terms[0].text)].some((w) => (wordConcepts.get(w) ?? 0) > 10)).length;
    expect(sharing / sited.length).toBeGreaterThan(0.95);
  });

  it('builds a hierarchy of 1–2 parents among earlier concepts of the same category', () => {
    const index = new Map(concepts.map((c, i) => [c.id, i]));
    const firstOfCategory = new Set<string>();
    const seen = new Set<string>();
    for (const c of concepts) {
      if (!seen.has(c.category)) firstOfCategory.add(c.id);
      seen.add(c.category);
    }
    let two = 0;
    for (let i = 0; i < N; i++) {
      const c = concepts[i];
      const ps = parents.get(c.id);
      if (firstOfCategory.has(c.id)) {
        expect(ps).toBeUndefined();
        continue;
      }
      expect(ps && ps.length >= 1 && ps.length <= 2).toBe(true);
      if (ps!.length === 2) two++;
      expect(new Set(ps).size).toBe(ps!.length);
      for (const p of ps!) {
        expect(index.get(p)!).toBeLessThan(i);
        expect(concepts[index.get(p)!].category).toBe(c.category);
      }
    }
    expect(two / N).toBeGreaterThan(0.15);
    expect(parents.size).toBe(N - firstOfCategory.size);
    expect([...parents.keys()].length).toBe(parents.size);
  });

  it('is deterministic for a seed', () => {
    const a = generateVocabulary({ concepts: 2000, seed: 'same' });
    const b = generateVocabulary({ concepts: 2000, seed: 'same' });
    const c = generateVocabulary({ concepts: 2000, seed: 'other' });
    expect(a.release.concepts).toEqual(b.release.concepts);
    expect([...a.release.parents]).toEqual([...b.release.parents]);
    expect(a.release.concepts).not.toEqual(c.release.concepts);
  });

  it('offers fresh names: new concepts with a free key, variants of a concept that mean the same', () => {
    const r = new Rng('fresh');
    const fresh = vocab.termSource.newConcept('procedure', r);
    expect(fresh.length).toBeGreaterThan(0);
    expect(vocab.keyOwners.get(0)).toBeUndefined();
    const c = concepts.find((x) => x.category === 'disorder' && x.terms.length <= 2)!;
    const variants = vocab.termSource.variants(concepts.indexOf(c), c, r);
    const pref = new Set(lexicalKey(c.terms[0].text).split(' '));
    expect(variants.map(foldTerm)).toContain(foldTerm(c.terms[0].text));
    expect(variants.every((v) => lexicalKey(v).split(' ').some((w) => pref.has(w)))).toBe(true);
    expect(() => generateVocabulary({ concepts: 10, seed: 1, categoryWeights: { gene: 1 } })).toThrow(/unknown category "gene"/);
    expect(() => generateVocabulary({ concepts: 0, seed: 1 })).toThrow(RangeError);
  });
});
