/**
 * The change injector: every kind at 20,000 concepts, disjoint and neighbour-free changes, and
 * truth that agrees with the files it describes (checked here from the releases themselves,
 * independently of termdrift's detector). Also run on a real release, the IANA Language Subtag
 * Registry (npm `language-subtag-registry`, installed as lsr-2025), through the generic term
 * source.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CHANGE_KINDS } from '../../src/classify/types.js';
import { DEFAULT_THRESHOLDS } from '../../src/classify/thresholds.js';
import { foldTerm, lexicalKey } from '../../src/text/normalize.js';
import { DEFAULT_MIX, bestPairSimilarity, carryCount, cosmeticEdits, injectChanges, planCounts } from '../../src/gen/inject.js';
import { baseReleaseFromRows, genericTermSource, termVariants } from '../../src/gen/genericTerms.js';
import { loadLanguageSubtagRegistry, languageSubtagsToRelease } from '../../src/importers/languageSubtags.js';
import type { BaseConcept, BaseRelease } from '../../src/gen/types.js';
import { Rng } from '../../src/gen/random.js';
import { dataset } from './fixture.js';

const d = dataset(1);
const { injected } = d;
const byId = (r: BaseRelease) => new Map(r.concepts.map((c) => [c.id, c]));
const oldById = byId(d.old);
const newById = byId(d.new);
const active = (c: BaseConcept | undefined) => c !== undefined && c.status === 'active';
const texts = (c: BaseConcept | undefined) => new Set((c?.terms ?? []).map((t) => t.text));
/** Old concepts whose identifier ends: inactive or absent in the new release. */
const ends = (id: string) => !active(newById.get(id));
const carried = (from: BaseConcept, to: BaseConcept | undefined) => from.terms.filter((t) => texts(to).has(t.text));
const carries = (from: BaseConcept, to: BaseConcept | undefined) => {
  const got = carried(from, to);
  return got.some((t) => t.type === 'preferred') || (got.length / from.terms.length >= DEFAULT_THRESHOLDS.carryShare && got.length >= 2);
};

describe('injectChanges at 20,000 concepts (default mix)', () => {
  it('injects every kind as planned: dozens of each, each at least 1% of the changes, about 4% of concepts', () => {
    const total = injected.changes.length;
    expect(total).toBe(Math.round(0.04 * 20_000));
    for (const k of CHANGE_KINDS) {
      expect(injected.injected[k], k).toBe(injected.planned[k]);
      expect(injected.injected[k], k).toBeGreaterThanOrEqual(24);
      expect(injected.injected[k] / total, k).toBeGreaterThanOrEqual(0.01);
    }
    expect(planCounts(20_000, {})).toEqual(injected.planned);
    expect(planCounts(1000, { mix: { ...DEFAULT_MIX, id_reuse: 0 } }).id_reuse).toBe(0);
    expect(injected.cosmetic.length).toBe(200);
  });

  it('touches each concept in at most one change and leaves the parents and children of touched concepts alone', () => {
    const owner = new Map<string, number>();
    injected.changes.forEach((c, i) => {
      for (const id of c.olds) {
        expect(owner.has(id), id).toBe(false);
        owner.set(id, i);
      }
    });
    for (const id of injected.cosmetic) {
      expect(owner.has(id)).toBe(false);
      owner.set(id, -1);
    }
    for (const [id, i] of owner) {
      for (const p of d.old.parents.get(id) ?? []) {
        const j = owner.get(p);
        expect(j === undefined || j === i, `${id} (change ${i}) has parent ${p} in change ${j}`).toBe(true);
      }
    }
  });

  it('writes truth in the conventions of classify/types.ts', () => {
    for (const t of injected.truth) {
      expect([...t.from].sort()).toEqual(t.from);
      if (t.kind === 'id_reuse') {
        expect(t.to[0]).toBe(t.from[0]);
        expect(t.to.slice(1)).toEqual([...t.to.slice(1)].sort());
      } else expect([...t.to].sort()).toEqual(t.to);
      if (t.kind === 'addition') expect(t.from).toEqual([]);
      if (t.kind === 'retirement') expect(t.to).toEqual([]);
      if (['preferred_term_change', 'synonym_added', 'synonym_removed', 'category_change', 'hierarchy_change'].includes(t.kind)) expect(t.to).toEqual(t.from);
    }
    const kinds = injected.truth.map((t) => CHANGE_KINDS.indexOf(t.kind));
    expect(kinds).toEqual([...kinds].sort((a, b) => a - b));
  });

  it('agrees with the releases, kind by kind', () => {
    const newTexts = new Map<string, string>();
    for (const c of d.new.concepts) if (c.status === 'active') for (const t of c.terms) newTexts.set(t.text, c.id);
    const checked = new Set<string>();
    for (const t of injected.truth) {
      checked.add(t.kind);
      const [a] = t.from;
      const before = oldById.get(a);
      const after = newById.get(a);
      switch (t.kind) {
        case 'addition':
          expect(oldById.has(t.to[0])).toBe(false);
          expect(active(newById.get(t.to[0]))).toBe(true);
          break;
        case 'retirement':
          expect(ends(a)).toBe(true);
          // No term of a retired concept lives on in an active concept.
          for (const term of before!.terms) expect(newTexts.has(term.text) && newTexts.get(term.text) !== a).toBe(false);
          break;
        case 'replacement': {
          expect(ends(a)).toBe(true);
          const b = newById.get(t.to[0]);
          expect(oldById.has(t.to[0])).toBe(false);
          const viaHistory = injected.history.some((h) => h.old_id === a && h.new_id === t.to[0] && h.relation === 'replaced_by');
          expect(carries(before!, b) || viaHistory).toBe(true);
          if (!carries(before!, b)) expect(t.note).toMatch(/history only/);
          break;
        }
        case 'merge': {
          const [s] = t.to;
          expect(active(newById.get(s))).toBe(true);
          for (const id of t.from.filter((x) => x !== s)) {
            expect(ends(id)).toBe(true);
            const viaHistory = injected.history.some((h) => h.old_id === id && h.new_id === s && h.relation !== 'consider');
            expect(carries(oldById.get(id)!, newById.get(s)) || viaHistory).toBe(true);
          }
          // The survivor keeps its id and its own terms.
          if (t.from.includes(s)) for (const term of oldById.get(s)!.terms) expect(texts(newById.get(s)).has(term.text)).toBe(true);
          break;
        }
        case 'split':
          expect(t.to.length).toBeGreaterThanOrEqual(2);
          expect(t.to.length).toBeLessThanOrEqual(3);
          for (const p of t.to) if (p !== a) expect(carries(before!, newById.get(p)), `${a} → ${p}`).toBe(true);
          if (!t.to.includes(a)) expect(ends(a)).toBe(true);
          break;
        case 'reorganization':
          expect(t.from.length).toBe(2);
          for (const id of t.from) {
            expect(ends(id)).toBe(true);
            expect(t.to.filter((n) => carries(oldById.get(id)!, newById.get(n))).length).toBeGreaterThanOrEqual(1);
          }
          // Crossing: some new concept is carried by both old ones.
          expect(t.to.some((n) => t.from.every((id) => carries(oldById.get(id)!, newById.get(n))))).toBe(true);
          break;
        case 'moved_synonym': {
          const b = t.to[0];
          const moved = before!.terms.filter((x) => !texts(after).has(x.text));
          expect(moved.length).toBe(1);
          expect(moved[0].type).toBe('synonym');
          expect(texts(newById.get(b)).has(moved[0].text)).toBe(true);
          expect(after!.terms.length).toBeGreaterThanOrEqual(3);
          expect(1 / before!.terms.length).toBeLessThan(DEFAULT_THRESHOLDS.carryShare);
          break;
        }
        case 'preferred_term_change': {
          expect(foldTerm(after!.terms[0].text)).not.toBe(foldTerm(before!.terms[0].text));
          // Only the name changed: the old synonyms are all still there.
          for (const x of before!.terms.slice(1)) if (x.text !== after!.terms[0].text) expect(texts(after).has(x.text)).toBe(true);
          break;
        }
        case 'synonym_added':
          expect([...texts(before)].every((x) => texts(after).has(x))).toBe(true);
          expect(after!.terms.length).toBeGreaterThan(before!.terms.length);
          break;
        case 'synonym_removed':
          expect([...texts(after)].every((x) => texts(before).has(x))).toBe(true);
          expect(after!.terms[0].text).toBe(before!.terms[0].text);
          expect(after!.terms.length).toBeLessThan(before!.terms.length);
          break;
        case 'id_reuse':
          expect(active(after)).toBe(true);
          expect(bestPairSimilarity(before!.terms.map((x) => x.text), after!.terms.map((x) => x.text))).toBeLessThan(DEFAULT_THRESHOLDS.reuseSimilarity);
          for (const n of t.to.slice(1)) expect(carries(before!, newById.get(n))).toBe(true);
          break;
        case 'category_change':
          expect(after!.category).not.toBe(before!.category);
          expect(after!.terms).toEqual(before!.terms);
          break;
        case 'hierarchy_change':
          expect([...(d.new.parents.get(a) ?? [])].sort()).not.toEqual([...(d.old.parents.get(a) ?? [])].sort());
          expect(after!.terms).toEqual(before!.terms);
          break;
      }
    }
    expect([...checked].sort()).toEqual([...CHANGE_KINDS].sort());
  });

  it('makes both retirement styles, both split styles, both merge styles, and exercises the history path', () => {
    const notes = (k: string) => injected.changes.filter((c) => c.kind === k).map((c) => c.note);
    for (const style of ['absent', 'inactive']) expect(notes('retirement').some((n) => n.startsWith(style))).toBe(true);
    expect(notes('split').some((n) => n.includes('keeps the identifier'))).toBe(true);
    expect(notes('split').some((n) => n.includes('new identifiers'))).toBe(true);
    expect(notes('merge').some((n) => n.includes('into a survivor'))).toBe(true);
    expect(notes('merge').some((n) => n.includes('into a new concept'))).toBe(true);
    expect(notes('replacement').some((n) => n.includes('history only'))).toBe(true);
    expect(notes('id_reuse').some((n) => n.includes('moved to a new identifier'))).toBe(true);
    // History rows for about 60% of retirements, replacements and merges.
    const withRows = new Set(injected.history.map((h) => h.old_id));
    const ended = injected.changes.filter((c) => ['retirement', 'replacement', 'merge'].includes(c.kind));
    const share = ended.filter((c) => c.olds.some((id) => withRows.has(id))).length / ended.length;
    expect(share).toBeGreaterThan(0.5);
    expect(share).toBeLessThan(0.7);
    expect(injected.history.filter((h) => h.relation === 'consider').length).toBeGreaterThan(0);
  });

  it('makes cosmetic edits that only change case or punctuation', () => {
    for (const id of injected.cosmetic) {
      const before = oldById.get(id)!;
      const after = newById.get(id)!;
      expect(after.terms.map((t) => foldTerm(t.text))).toEqual(before.terms.map((t) => foldTerm(t.text)));
      expect(after.terms.filter((t, i) => t.text !== before.terms[i].text).length).toBe(1);
    }
    expect(cosmeticEdits('Fracture of femur, left')).toEqual(expect.arrayContaining(['fracture of femur, left', 'Fracture Of Femur, Left', 'Fracture of femur left']));
  });

  it('shares unchanged concept objects with the base and leaves the base untouched', () => {
    const again = dataset(1);
    expect(again.old).toBe(d.old);
    const shared = d.new.concepts.filter((c) => oldById.get(c.id) === c).length;
    expect(shared).toBeGreaterThan(20_000 * 0.9);
    // Injecting again gives the same result: the base was not modified.
    const second = injectChanges(d.vocabulary.release, { seed: 1, termSource: d.vocabulary.termSource, keyOwners: d.vocabulary.keyOwners, conceptIdFor: d.vocabulary.conceptIdFor, termIdFor: d.vocabulary.termIdFor, indexOf: d.vocabulary.indexOf });
    expect(second.truth).toEqual(injected.truth);
    expect(second.newRelease.concepts).toEqual(d.new.concepts);
  });

  it('computes carry counts as the detector compares shares', () => {
    expect(carryCount(3, 0.3)).toBe(2);
    expect(carryCount(10, 0.3)).toBe(3);
    expect(carryCount(7, 0.3)).toBe(3);
    expect(carryCount(20, 0.3)).toBe(6);
    expect(2 / 7).toBeLessThan(0.3);
  });
});

describe('injectChanges on an imported release (IANA Language Subtag Registry, npm lsr-2025)', async () => {
  const parsed = await loadLanguageSubtagRegistry(join(process.cwd(), 'node_modules', 'lsr-2025'));
  const out = languageSubtagsToRelease(parsed);
  const base = baseReleaseFromRows(out.release, out.hierarchy);

  it('reads the importer rows into a BaseRelease', () => {
    expect(base.concepts.length).toBe(new Set(out.release.map((r) => r.concept_id)).size);
    expect(base.concepts.reduce((a, c) => a + c.terms.length, 0)).toBe(out.release.length);
    for (const c of base.concepts) expect(c.terms.filter((t) => t.type === 'preferred').length).toBeLessThanOrEqual(1);
    expect([...base.parents.values()].reduce((a, p) => a + p.length, 0)).toBe(out.hierarchy.length);
  });

  it('injects disjoint changes with the generic term source and leaves concepts sharing a term alone', () => {
    const r = injectChanges(base, { seed: 2 });
    expect(r.changes.length).toBeGreaterThan(250);
    const seen = new Set<string>();
    for (const c of r.changes) for (const id of c.olds) {
      expect(seen.has(id)).toBe(false);
      seen.add(id);
    }
    // Concepts with a duplicate description elsewhere (extlang records repeat their language's) are never touched.
    const keyConcepts = new Map<string, Set<string>>();
    for (const c of base.concepts) for (const t of c.terms) {
      const k = lexicalKey(t.text);
      if (!keyConcepts.has(k)) keyConcepts.set(k, new Set());
      keyConcepts.get(k)!.add(c.id);
    }
    const sharing = new Set([...keyConcepts.values()].filter((s) => s.size > 1).flatMap((s) => [...s]));
    expect(sharing.size).toBeGreaterThan(100);
    for (const id of seen) expect(sharing.has(id)).toBe(false);
    // New identifiers do not clash with the registry's.
    const ids = new Set(base.concepts.map((c) => c.id));
    for (const c of r.changes) for (const id of c.created) expect(ids.has(id)).toBe(false);
  });

  it('makes variants from a term\'s own words', () => {
    expect(termVariants('Regulation of cell growth')).toEqual(['Cell growth regulation', 'RCG']);
    expect(termVariants('Old Persian')).toEqual(['Persian, old']);
    const src = genericTermSource(base);
    const fresh = src.newConcept('language', new Rng('fresh'));
    expect(fresh.length).toBeGreaterThan(0);
  });
});
