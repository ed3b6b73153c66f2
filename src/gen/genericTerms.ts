/**
 * Helpers for injecting changes into a release that the synthetic vocabulary did not make
 * (an imported Gene Ontology or Language Subtag Registry release):
 *
 * - `baseReleaseFromRows`: the importers' row form (release and hierarchy rows) → BaseRelease;
 * - `genericTermSource`: fresh terms made from the release's own words. A new concept's name
 *   joins the first half of one concept's name to the second half of another's (same
 *   category); variants of a concept's term are the word order around " of " turned round
 *   ("regulation of growth" → "growth regulation"), a comma inversion ("cell growth" →
 *   "growth, cell") and an acronym of a term of three words or more ("RCG"). The injector
 *   keeps only candidates whose lexical key is free, as for the synthetic vocabulary.
 */
import type { Rng } from './random.js';
import type { BaseConcept, BaseRelease, BaseTerm, TermSource } from './types.js';

/** The fields of a release row the generator uses (importers/types.ts ReleaseRow has them). */
export interface RowLike {
  concept_id: string;
  term: string;
  term_type: 'preferred' | 'synonym';
  status: 'active' | 'inactive';
  category: string;
  term_id?: string;
}

/** Release rows (one per term) and hierarchy rows → BaseRelease; concepts in first-seen order. */
export function baseReleaseFromRows(rows: readonly RowLike[], hierarchy: readonly { concept_id: string; parent_id: string }[] = []): BaseRelease {
  const byId = new Map<string, BaseConcept>();
  const concepts: BaseConcept[] = [];
  for (const r of rows) {
    let c = byId.get(r.concept_id);
    if (!c) {
      c = { id: r.concept_id, category: r.category, status: r.status, terms: [] };
      byId.set(r.concept_id, c);
      concepts.push(c);
    }
    const term: BaseTerm = { text: r.term, type: r.term_type, termId: r.term_id ?? '' };
    if (term.type === 'preferred') c.terms.unshift(term);
    else c.terms.push(term);
  }
  const parents = new Map<string, string[]>();
  for (const h of hierarchy) {
    const list = parents.get(h.concept_id);
    if (list) list.push(h.parent_id);
    else parents.set(h.concept_id, [h.parent_id]);
  }
  return { concepts, parents };
}

const words = (s: string) => s.split(' ').filter((w) => w !== '');

/** Function words an acronym leaves out. */
const FUNCTION_WORDS = new Set(['of', 'the', 'and', 'in', 'on', 'to', 'for', 'by', 'an', 'a']);

function acronym(text: string): string {
  const ws = words(text).filter((w) => /^[A-Za-z]/.test(w) && !FUNCTION_WORDS.has(w.toLowerCase()));
  return ws.length >= 3 ? ws.map((w) => w.charAt(0).toUpperCase()).join('') : '';
}

/** Variants of one term (see the file header). */
export function termVariants(text: string): string[] {
  const out: string[] = [];
  const of = text.indexOf(' of ');
  if (of > 0) {
    const head = text.slice(0, of);
    const tail = text.slice(of + 4);
    out.push(`${tail.charAt(0).toUpperCase()}${tail.slice(1)} ${head.toLowerCase()}`);
  }
  const ws = words(text);
  if (ws.length >= 2 && of < 0) out.push(`${ws.slice(1).join(' ')}, ${ws[0].toLowerCase()}`);
  const a = acronym(text);
  if (a) out.push(a);
  return out.filter((v) => v !== text && v.trim() !== '');
}

export function genericTermSource(base: BaseRelease): TermSource {
  const byCategory = new Map<string, number[]>();
  base.concepts.forEach((c, i) => {
    if (c.status !== 'active' || c.terms.length === 0) return;
    const list = byCategory.get(c.category);
    if (list) list.push(i);
    else byCategory.set(c.category, [i]);
  });
  return {
    newConcept(category: string, rng: Rng): string[] {
      const pool = byCategory.get(category);
      if (!pool || pool.length < 2) return [];
      const a = words(base.concepts[rng.pick(pool)].terms[0].text);
      const b = words(base.concepts[rng.pick(pool)].terms[0].text);
      const head = a.slice(0, Math.ceil(a.length / 2));
      const tail = b.slice(Math.floor(b.length / 2));
      if (head.length === 0 || tail.length === 0) return [];
      const name = [...head, ...tail.map((w) => w.toLowerCase())].join(' ');
      return [name, ...termVariants(name)];
    },
    variants(_index: number, concept: BaseConcept, rng: Rng): string[] {
      return rng.shuffle(concept.terms.flatMap((t) => termVariants(t.text)));
    },
  };
}
