/**
 * The hashed lexical key must never tell two terms apart that `lexicalKey` (text/normalize.ts)
 * takes for one: equal lexical keys, equal hashes. Checked on generated term pairs
 * (fast-check) and on every term of a synthetic vocabulary.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { lexicalKey } from '../../src/text/normalize.js';
import { KeyOwnership, KeyTable, SHARED, buildKeyOwners, termKey } from '../../src/gen/keyOwnership.js';
import { generateVocabulary } from '../../src/gen/vocabulary.js';
import { OverlayMap } from '../../src/gen/overlayMap.js';

const WORDS = ['fracture', 'fractures', 'of', 'the', 'left', 'Left', 'femur', 'femoral', 'acute', 'in', 'and', 'type', '2', 'A', 'X-ray', 'serum', 'sodium', 'Na', 'measurement', 'measurements'];
const SEPARATORS = [' ', ', ', ' - ', ' (', ') ', '. '];

const phrase = fc.tuple(fc.array(fc.constantFrom(...WORDS), { minLength: 1, maxLength: 6 }), fc.array(fc.constantFrom(...SEPARATORS), { minLength: 6, maxLength: 6 }))
  .map(([ws, seps]) => ws.map((w, i) => (i ? seps[i - 1] : '') + w).join(''));

describe('termKey', () => {
  it('gives equal hashes to terms with equal lexical keys (word order, case, stop words, punctuation, inflection)', () => {
    let compared = 0;
    fc.assert(
      fc.property(phrase, fc.integer({ min: 0, max: 1000 }), (p, seed) => {
        // A variant: shuffled words, changed case, different separators.
        const ws = p.split(/[\s,().-]+/).filter(Boolean);
        const rot = seed % Math.max(1, ws.length);
        const variant = [...ws.slice(rot), ...ws.slice(0, rot)].map((w, i) => (i % 2 ? w.toUpperCase() : w)).join(seed % 2 ? ' , ' : ' ');
        if (lexicalKey(variant) === lexicalKey(p)) {
          compared++;
          expect(termKey(variant)).toBe(termKey(p));
        }
      }),
      { numRuns: 2000 },
    );
    // The variants are built to keep the lexical key; nearly all pairs are compared.
    expect(compared).toBeGreaterThan(1800);
    expect(termKey('Fractures of the left femur')).toBe(termKey('left femur fracture'));
    expect(termKey('The of')).toBe(termKey('the of'));
  });

  it('tells apart the distinct lexical keys of a whole vocabulary (no collision among its terms)', () => {
    const v = generateVocabulary({ concepts: 5000, seed: 9 });
    const byKey = new Map<string, number>();
    const hashes = new Map<number, string>();
    for (const c of v.release.concepts) {
      for (const t of c.terms) {
        const k = lexicalKey(t.text);
        const h = termKey(t.text);
        const seen = hashes.get(h);
        if (seen !== undefined) expect(seen).toBe(k);
        hashes.set(h, k);
        byKey.set(k, h);
      }
    }
    expect(hashes.size).toBe(byKey.size);
    expect(byKey.size).toBeGreaterThan(5000);
  });
});

describe('KeyTable and KeyOwnership', () => {
  it('stores and grows like a map', () => {
    const t = new KeyTable(4);
    const model = new Map<number, number>();
    const r = fc.sample(fc.tuple(fc.integer({ min: 1, max: 2 ** 52 - 1 }), fc.integer({ min: -1, max: 1e6 })), { numRuns: 5000, seed: 5 });
    for (const [k, o] of r) {
      t.set(k, o);
      model.set(k, o);
    }
    expect(t.size).toBe(model.size);
    for (const [k, o] of model) expect(t.get(k)).toBe(o);
    expect(t.get(123456789)).toBe(model.get(123456789));
  });

  it('marks keys two base concepts share, and claims go to an overlay that leaves the base alone', () => {
    const base = { concepts: [
      { id: 'A', category: 'x', status: 'active' as const, terms: [{ text: 'Left femur', type: 'preferred' as const, termId: '' }] },
      { id: 'B', category: 'x', status: 'active' as const, terms: [{ text: 'femur, left', type: 'preferred' as const, termId: '' }, { text: 'Tibia', type: 'synonym' as const, termId: '' }] },
    ], parents: new Map() };
    const owners = buildKeyOwners(base);
    expect(owners.get(termKey('left femur'))).toBe(SHARED);
    expect(owners.get(termKey('tibia'))).toBe(1);
    const own = new KeyOwnership(owners);
    expect(own.usableBy(termKey('tibias'), 1)).toBe(true);
    expect(own.usableBy(termKey('tibia'), 0)).toBe(false);
    expect(own.free(termKey('fibula'))).toBe(true);
    own.claim(termKey('fibula'), 0);
    expect(own.usableBy(termKey('fibula'), 1)).toBe(false);
    expect(owners.get(termKey('fibula'))).toBeUndefined();
  });
});

describe('OverlayMap', () => {
  it('behaves like a copied Map under any sequence of sets and deletes, keeping the base untouched', () => {
    const op = fc.oneof(
      fc.record({ kind: fc.constant('set' as const), key: fc.integer({ min: 0, max: 30 }), value: fc.integer() }),
      fc.record({ kind: fc.constant('delete' as const), key: fc.integer({ min: 0, max: 30 }) }),
    );
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: 0, max: 20 }), fc.integer()), { maxLength: 15 }), fc.array(op, { maxLength: 40 }), (entries, ops) => {
        const base = new Map(entries);
        const before = [...base];
        const overlay = new OverlayMap(base);
        const model = new Map(base);
        for (const o of ops) {
          if (o.kind === 'set') {
            overlay.set(o.key, o.value);
            model.set(o.key, o.value);
          } else expect(overlay.delete(o.key)).toBe(model.delete(o.key));
        }
        expect(overlay.size).toBe(model.size);
        for (let k = 0; k <= 30; k++) {
          expect(overlay.has(k)).toBe(model.has(k));
          expect(overlay.get(k)).toBe(model.get(k));
        }
        expect(new Map(overlay)).toEqual(model);
        expect([...base]).toEqual(before);
      }),
      { numRuns: 500 },
    );
  });
});
