/**
 * alignTerms: find the changed frontier of two releases and identify its terms across them.
 *
 * 1. Concepts present in both releases with the same status, category and active terms
 *    (text, type, language) are unchanged and skipped; the rest form the frontier. Concepts
 *    are paired by their id bytes and term texts compared as bytes (load/releaseBytes.ts), so
 *    the texts of unchanged concepts are never decoded to strings.
 * 2. Frontier terms are matched level by level, each level only among the terms still
 *    unmatched: term_id (when both releases carry one), exact text, folded text, lexical key
 *    (see text/normalize.ts). Within a level a term first looks in the concept with its own
 *    identifier if that concept is still active, then in other active concepts, then in its
 *    own concept if it became inactive. A cross-concept match at the folded or lexical level
 *    needs the same category when both releases give categories: two strings that only
 *    normalize alike and belong to different categories are not the same term (common practice
 *    in terminology maintenance). The identical string or term identifier may cross categories:
 *    a homonym that stays in both concepts is unchanged and never reaches the frontier.
 * Each new term is matched at most once, so flows count terms, not string coincidences.
 */
import type { Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { bytesEqual, hashBytes, matchConceptIds, termIdAt, termIdBytes, termTextAt, termTextComparer } from '../load/releaseBytes.js';
import { foldTerm, lexicalKey, type MatchLevel } from '../text/normalize.js';
import type { Alignment, TermLink } from './types.js';

/** Active terms of concept c, in file order. */
export function activeTerms(r: Release, c: number): number[] {
  const out: number[] = [];
  for (let k = r.conceptTermStart[c]; k < r.conceptTermStart[c + 1]; k++) {
    const t = r.conceptTerms[k];
    if (r.termStatus[t] === ACTIVE) out.push(t);
  }
  return out;
}

function categoryOf(r: Release, c: number): string {
  const i = r.conceptCategory[c];
  return i < 0 ? '' : r.categories[i];
}

function langOf(r: Release, t: number): string {
  const i = r.termLanguage[t];
  return i < 0 ? '' : r.languages[i];
}

/**
 * One code per distinct string of two releases' value tables (categories, term types,
 * languages), so that a value of one release is compared with one of the other as two integers:
 * code[i + 1] is the code of table[i], code[0] that of no value (index -1, the empty string).
 */
function sharedCodes(a: readonly string[], b: readonly string[]): [Int32Array, Int32Array] {
  const ids = new Map<string, number>([['', 0]]);
  const codes = (table: readonly string[]) => {
    const out = new Int32Array(table.length + 1);
    for (let i = 0; i < table.length; i++) {
      let id = ids.get(table[i]);
      if (id === undefined) ids.set(table[i], (id = ids.size));
      out[i + 1] = id;
    }
    return out;
  };
  return [codes(a), codes(b)];
}

/** The codes of two releases' categories, term types and languages (sharedCodes). */
interface ValueCodes {
  catA: Int32Array; catB: Int32Array; typeA: Int32Array; typeB: Int32Array; langA: Int32Array; langB: Int32Array;
}

function valueCodes(a: Release, b: Release): ValueCodes {
  const [catA, catB] = sharedCodes(a.categories, b.categories);
  const [typeA, typeB] = sharedCodes(a.termTypes, b.termTypes);
  const [langA, langB] = sharedCodes(a.languages, b.languages);
  return { catA, catB, typeA, typeB, langA, langB };
}

/**
 * Same status, category and active term list (as a multiset of text+type+language). Terms are
 * compared in file order first, text by its bytes (`sameText`, no string made), values by their
 * codes (valueCodes); only a concept whose terms differ or come in another order has its texts
 * decoded.
 */
function sameConcept(a: Release, ca: number, b: Release, cb: number, sameText: (t: number, u: number) => boolean, v: ValueCodes): boolean {
  if (a.conceptStatus[ca] !== b.conceptStatus[cb]) return false;
  if (v.catA[a.conceptCategory[ca] + 1] !== v.catB[b.conceptCategory[cb] + 1]) return false;
  // The usual case first, with no list made: the active terms of both, walked in step, agree.
  // (Two lists per concept pair were 2 M arrays for a 1 M-concept release, and their collection.)
  let i = a.conceptTermStart[ca];
  const ie = a.conceptTermStart[ca + 1];
  let j = b.conceptTermStart[cb];
  const je = b.conceptTermStart[cb + 1];
  const aTerms = a.conceptTerms;
  const bTerms = b.conceptTerms;
  const aStatus = a.termStatus;
  const bStatus = b.termStatus;
  for (;;) {
    while (i < ie && aStatus[aTerms[i]] !== ACTIVE) i++;
    while (j < je && bStatus[bTerms[j]] !== ACTIVE) j++;
    if (i === ie || j === je) {
      if (i === ie && j === je) return true;
      break;
    }
    const t = aTerms[i];
    const u = bTerms[j];
    if (v.typeA[a.termType[t] + 1] !== v.typeB[b.termType[u] + 1] || v.langA[a.termLanguage[t] + 1] !== v.langB[b.termLanguage[u] + 1] || !sameText(t, u)) break;
    i++;
    j++;
  }
  // The walk stopped at a difference in order: the same terms may still come in another order.
  const ta = activeTerms(a, ca);
  const tb = activeTerms(b, cb);
  if (ta.length !== tb.length) return false;
  const key = (r: Release, t: number) => `${r.termTypes[r.termType[t]]}\u0001${langOf(r, t)}\u0001${termTextAt(r, t)}`;
  const ka = ta.map((t) => key(a, t)).sort();
  const kb = tb.map((t) => key(b, t)).sort();
  return ka.every((k, i) => k === kb[i]);
}

/**
 * A function giving, for term t of a release, the last of `terms` (of r) with the same non-empty
 * term_id, or undefined. Over the ids' bytes when both releases keep them (a hash table of the
 * frontier's ids; no string made: a Map of decoded ids was about 0.3 s of a 4 M-row diff), else a
 * Map of strings.
 */
function termIdFinder(r: Release, terms: readonly number[]): (other: Release, t: number) => number | undefined {
  const b = termIdBytes(r);
  if (b === undefined) {
    const byId = new Map<string, number>();
    for (const t of terms) {
      const id = termIdAt(r, t);
      if (id !== '') byId.set(id, t);
    }
    return (other, t) => {
      const id = termIdAt(other, t);
      return id === '' ? undefined : byId.get(id);
    };
  }
  let size = 1024;
  while (size < terms.length * 2) size *= 2;
  const mask = size - 1;
  /** Slot: term + 1 (0 empty), and its id's hash. */
  const slots = new Int32Array(size);
  const hashes = new Int32Array(size);
  const probe = (buf: Uint8Array, s: number, e: number, h: number): number => {
    let p = h & mask;
    for (;;) {
      const v = slots[p];
      if (v === 0) return p;
      const u = v - 1;
      const us = b.idStart[u];
      if (hashes[p] === h && b.idEnd[u] - us === e - s && bytesEqual(b.blocks[b.termBlock[u]], us, buf, s, e - s)) return p;
      p = (p + 1) & mask;
    }
  };
  for (const t of terms) {
    const s = b.idStart[t];
    const e = b.idEnd[t];
    if (s === e) continue;
    const buf = b.blocks[b.termBlock[t]];
    const h = hashBytes(buf, s, e);
    const p = probe(buf, s, e, h);
    slots[p] = t + 1; // the last term with this id wins, as Map.set
    hashes[p] = h;
  }
  return (other, t) => {
    const ob = termIdBytes(other);
    if (ob === undefined) {
      const id = termIdAt(other, t);
      if (id === '') return undefined;
      const bytes = Buffer.from(id, 'utf8');
      const v = slots[probe(bytes, 0, bytes.length, hashBytes(bytes, 0, bytes.length))];
      return v === 0 ? undefined : v - 1;
    }
    const s = ob.idStart[t];
    const e = ob.idEnd[t];
    if (s === e) return undefined;
    const buf = ob.blocks[ob.termBlock[t]];
    const v = slots[probe(buf, s, e, hashBytes(buf, s, e))];
    return v === 0 ? undefined : v - 1;
  };
}

export interface AlignOptions {
  /** Require the same category for matches across concepts (default true). */
  categoryGuard?: boolean;
}

export function alignTerms(oldR: Release, newR: Release, options: AlignOptions = {}): Alignment {
  const guard = options.categoryGuard ?? true;
  const sameId = new Int32Array(oldR.conceptCount).fill(-1);
  const newHasOld = new Uint8Array(newR.conceptCount);
  const oldFrontier: number[] = [];
  const newFrontier: number[] = [];
  const newInFrontier = new Uint8Array(newR.conceptCount);
  let unchanged = 0;
  const sameIdOf = matchConceptIds(oldR, newR);
  const sameText = termTextComparer(oldR, newR);
  const codes = valueCodes(oldR, newR);
  for (let c = 0; c < oldR.conceptCount; c++) {
    const n = sameIdOf[c];
    if (n < 0) {
      oldFrontier.push(c);
      continue;
    }
    sameId[c] = n;
    newHasOld[n] = 1;
    if (sameConcept(oldR, c, newR, n, sameText, codes)) unchanged++;
    else {
      oldFrontier.push(c);
      newFrontier.push(n);
      newInFrontier[n] = 1;
    }
  }
  for (let n = 0; n < newR.conceptCount; n++) {
    if (!newHasOld[n]) {
      newFrontier.push(n);
      newInFrontier[n] = 1;
    }
  }
  newFrontier.sort((x, y) => x - y);

  const linkOfOld = new Int32Array(oldR.termCount).fill(-1);
  const linkOfNew = new Int32Array(newR.termCount).fill(-1);
  const links: TermLink[] = [];
  const levelCounts: Record<MatchLevel, number> = { term_id: 0, exact: 0, folded: 0, lexical: 0 };

  // Concepts already inactive in the old release carry no meaning forward: their terms are not matched.
  const oldTerms: number[] = [];
  for (const c of oldFrontier) if (oldR.conceptStatus[c] === ACTIVE) for (const t of activeTerms(oldR, c)) oldTerms.push(t);
  const newTerms: number[] = [];
  for (const n of newFrontier) for (const t of activeTerms(newR, n)) newTerms.push(t);
  // Frontier texts, decoded once (unchanged concepts never have theirs decoded).
  const oldTexts = oldTerms.map((t) => termTextAt(oldR, t));
  const newTexts = newTerms.map((t) => termTextAt(newR, t));

  const link = (o: number, n: number, level: MatchLevel) => {
    linkOfOld[o] = links.length;
    linkOfNew[n] = links.length;
    links.push({ oldTerm: o, newTerm: n, level });
    levelCounts[level]++;
  };

  // Level term_id: the publisher's own identity of terms.
  if (oldR.hasColumn.term_id && newR.hasColumn.term_id) {
    const newOfId = termIdFinder(newR, newTerms);
    for (const t of oldTerms) {
      const n = newOfId(oldR, t);
      // A term kept on a concept that is now inactive is matched last (see the passes below),
      // so that a copy of it in an active concept is found first.
      if (n !== undefined && linkOfNew[n] === -1 && newR.conceptStatus[newR.termConcept[n]] === ACTIVE) link(t, n, 'term_id');
    }
  }

  const oldCategory = (t: number) => categoryOf(oldR, oldR.termConcept[t]);
  const newCategory = (t: number) => categoryOf(newR, newR.termConcept[t]);
  const categoriesGiven = oldR.hasColumn.category && newR.hasColumn.category;

  const matchLevel = (level: MatchLevel, keyOf: (text: string) => string) => {
    const normalized = level === 'folded' || level === 'lexical';
    // Unmatched new terms by key, in file order.
    const byKey = new Map<string, number[]>();
    for (let i = 0; i < newTerms.length; i++) {
      const t = newTerms[i];
      if (linkOfNew[t] !== -1) continue;
      const k = keyOf(newTexts[i]);
      const list = byKey.get(k);
      if (list) list.push(t);
      else byKey.set(k, [t]);
    }
    // Three passes so that a term's own concept is always offered it first:
    // 0 own concept still active, 1 another active concept, 2 own concept now inactive.
    const oldKeys: (string | undefined)[] = new Array(oldTerms.length);
    for (let pass = 0; pass < 3; pass++) {
      for (let i = 0; i < oldTerms.length; i++) {
        const t = oldTerms[i];
        if (linkOfOld[t] !== -1) continue;
        const list = byKey.get((oldKeys[i] ??= keyOf(oldTexts[i])));
        if (!list) continue;
        const own = sameId[oldR.termConcept[t]];
        for (const n of list) {
          if (linkOfNew[n] !== -1) continue;
          const nc = newR.termConcept[n];
          const active = newR.conceptStatus[nc] === ACTIVE;
          const rank = nc === own ? (active ? 0 : 2) : active ? 1 : -1;
          if (rank !== pass) continue;
          if (rank === 1 && normalized && guard && categoriesGiven && oldCategory(t) !== newCategory(n)) continue;
          link(t, n, level);
          break;
        }
      }
    }
  };
  matchLevel('exact', (s) => s);
  matchLevel('folded', foldTerm);
  matchLevel('lexical', lexicalKey);

  const removedTerms = oldTerms.filter((t) => linkOfOld[t] === -1);
  const addedTerms = newTerms.filter((t) => linkOfNew[t] === -1);
  return { sameId, oldFrontier, newFrontier, links, removedTerms, addedTerms, linkOfOld, linkOfNew, levelCounts, unchangedConcepts: unchanged };
}
