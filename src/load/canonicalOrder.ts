/**
 * canonicalOrder: renumber a loaded release so that nothing downstream depends on the order of
 * the file's rows.
 *
 * A loader numbers concepts and terms in first-seen order, and every later stage inherits it:
 * the scorer samples concepts and terms by index (with a seeded generator, so a shuffled file
 * gets other samples and other scores), and evidence lists terms in index order. Given the same
 * rows in another order, a report must not change (docs/RELIABILITY.md, "Reproducibility").
 * After the row checks (which keep "the first in the file wins" for duplicates and a second
 * preferred term), `applyCanonicalOrder` renumbers concepts by identifier (UTF-16 code unit
 * order) and the terms of each concept by: preferred first, then synonyms, then other term types
 * by name; then term_id, text (UTF-8 bytes, so code point order), language and term status.
 * Concept and term lines (for messages) move with their concept and term. `canonicalHierarchy`
 * and `canonicalHistory` do the same for the other tables of a diff.
 *
 * Cost: one pass to see whether the release is in this order already (the usual case for
 * published files and for termdrift's generator, which are sorted by identifier), else a sort of
 * the concept ids, a counting sort of the terms by concept and a sort within each concept (insertion
 * sort for the usual few terms), then one permutation of every column. No string is made per term.
 */
import { hashConceptIds, rehashConcepts, type ReleaseBytes } from './releaseBytes.js';
import { PREFERRED, SYNONYM, type Hierarchy, type HistoryRow, type HistoryTable, type Release } from './types.js';

/** Compare buf a[as..ae) with b[bs..be) as unsigned bytes. */
function compareBytes(a: Uint8Array, as: number, ae: number, b: Uint8Array, bs: number, be: number): number {
  const n = Math.min(ae - as, be - bs);
  for (let i = 0; i < n; i++) {
    const d = a[as + i] - b[bs + i];
    if (d !== 0) return d;
  }
  return ae - as - (be - bs);
}

const cmpStrings = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/** Compare terms t and u of the same concept in the canonical order. */
function termComparer(r: Release, bytes: ReleaseBytes): (t: number, u: number) => number {
  const { termType, termTypes, termLanguage, languages, termStatus } = r;
  const { blocks, termBlock, textStart, textEnd, idStart, idEnd } = bytes;
  const typeRank = (code: number) => (code === PREFERRED ? 0 : code === SYNONYM ? 1 : 2);
  return (t, u) => {
    const ta = termType[t];
    const tb = termType[u];
    if (ta !== tb) {
      const d = typeRank(ta) - typeRank(tb);
      if (d !== 0) return d;
      return cmpStrings(termTypes[ta], termTypes[tb]);
    }
    const ba = blocks[termBlock[t]];
    const bb = blocks[termBlock[u]];
    let d = compareBytes(ba, idStart[t], idEnd[t], bb, idStart[u], idEnd[u]);
    if (d !== 0) return d;
    d = compareBytes(ba, textStart[t], textEnd[t], bb, textStart[u], textEnd[u]);
    if (d !== 0) return d;
    const la = termLanguage[t];
    const lb = termLanguage[u];
    if (la !== lb) return la < 0 ? -1 : lb < 0 ? 1 : cmpStrings(languages[la], languages[lb]);
    return termStatus[t] - termStatus[u];
  };
}

/** Is the release in canonical order: concepts by id, terms grouped by concept and sorted? */
export function isCanonical(r: Release, bytes: ReleaseBytes): boolean {
  const ids = r.conceptIds;
  for (let c = 1; c < r.conceptCount; c++) if (!(ids[c - 1] < ids[c])) return false;
  const concept = r.termConcept;
  const cmp = termComparer(r, bytes);
  for (let t = 1; t < r.termCount; t++) {
    const a = concept[t - 1];
    const b = concept[t];
    if (b < a || (a === b && cmp(t - 1, t) > 0)) return false;
  }
  return true;
}

function permute<T extends Int32Array | Uint8Array>(a: T, order: Int32Array): T {
  const out = new (a.constructor as new (n: number) => T)(order.length);
  for (let i = 0; i < order.length; i++) out[i] = a[order[i]];
  return out;
}

/**
 * Renumber `r` (and its byte storage) in canonical order, in place. Call before any lazy
 * property (termText, termId, conceptIndex) is read; rebuilds conceptTermStart/conceptTerms
 * with `rebuildIndex`. Returns false when the release was in canonical order already.
 */
export function applyCanonicalOrder(r: Release, bytes: ReleaseBytes, rebuildIndex: (r: Release) => void): boolean {
  if (isCanonical(r, bytes)) return false;
  if (sortWithinConcepts(r, bytes)) {
    resetCaches(bytes);
    rebuildIndex(r);
    return true;
  }
  const n = r.conceptCount;
  const ids = r.conceptIds;

  // Concepts by id; newOf[old] = new index.
  const conceptOrder = Int32Array.from({ length: n }, (_, c) => c).sort((a, b) => cmpStrings(ids[a], ids[b]));
  const newOf = new Int32Array(n);
  for (let k = 0; k < n; k++) newOf[conceptOrder[k]] = k;

  // Terms: counting sort by new concept, then insertion sort within each concept.
  const m = r.termCount;
  const start = new Int32Array(n + 1);
  for (let t = 0; t < m; t++) start[newOf[r.termConcept[t]] + 1]++;
  for (let c = 0; c < n; c++) start[c + 1] += start[c];
  const fill = start.slice(0, n);
  const termOrder = new Int32Array(m);
  for (let t = 0; t < m; t++) termOrder[fill[newOf[r.termConcept[t]]]++] = t;
  const cmp = termComparer(r, bytes);
  for (let c = 0; c < n; c++) sortRange(termOrder, start[c], start[c + 1], cmp);

  // Concept columns (the id list is permuted in place: the byte storage holds the same array).
  const sortedIds = Array.from(conceptOrder, (c) => ids[c]);
  for (let c = 0; c < n; c++) ids[c] = sortedIds[c];
  r.conceptStatus = permute(r.conceptStatus, conceptOrder);
  r.conceptCategory = permute(r.conceptCategory, conceptOrder);
  r.conceptLine = permute(r.conceptLine, conceptOrder);
  const table = bytes.concepts;
  table.block = permute(table.block, conceptOrder);
  table.start = permute(table.start, conceptOrder);
  table.end = permute(table.end, conceptOrder);
  table.hash = permute(table.hash, conceptOrder);
  // The renumbered ids are usually still in byte order (a file sorted by concept whose terms
  // were not): then lookups stay binary searches. Otherwise (or when the file was unsorted) the
  // hash table is rebuilt over hashes of every id; a sorted table never computed them.
  let byteSorted = true;
  for (let c = 1; c < n && byteSorted; c++) {
    byteSorted = compareBytes(table.blocks[table.block[c - 1]], table.start[c - 1], table.end[c - 1], table.blocks[table.block[c]], table.start[c], table.end[c]) < 0;
  }
  if (!byteSorted) {
    if (table.sorted) hashConceptIds(table, n);
    table.table = rehashConcepts(table.hash, n, table.table.length);
  }
  table.sorted = byteSorted;

  // Term columns.
  const concept = new Int32Array(m);
  for (let i = 0; i < m; i++) concept[i] = newOf[r.termConcept[termOrder[i]]];
  r.termConcept = concept;
  r.termType = permute(r.termType, termOrder);
  r.termLanguage = permute(r.termLanguage, termOrder);
  r.termStatus = permute(r.termStatus, termOrder);
  r.termLine = permute(r.termLine, termOrder);
  bytes.termBlock = permute(bytes.termBlock, termOrder);
  bytes.textStart = permute(bytes.textStart, termOrder);
  bytes.textEnd = permute(bytes.textEnd, termOrder);
  bytes.idStart = permute(bytes.idStart, termOrder);
  bytes.idEnd = permute(bytes.idEnd, termOrder);
  resetCaches(bytes);
  rebuildIndex(r);
  return true;
}

function resetCaches(bytes: ReleaseBytes): void {
  bytes.textCache = undefined;
  bytes.idCache = undefined;
  bytes.indexCache = undefined;
  bytes.idsInStringOrder = undefined;
}

/**
 * Sort terms[s..e) (term numbers) by `cmp`, stably: insertion sort for the usual few, Array's
 * merge sort above 16 (a concept with many terms must not cost the insertion sort's n²).
 */
function sortRange(terms: Int32Array, s: number, e: number, cmp: (t: number, u: number) => number): void {
  if (e - s > 16) {
    terms.subarray(s, e).set(Array.from(terms.subarray(s, e)).sort(cmp));
    return;
  }
  for (let i = s + 1; i < e; i++) {
    const t = terms[i];
    let j = i - 1;
    while (j >= s && cmp(terms[j], t) > 0) {
      terms[j + 1] = terms[j];
      j--;
    }
    terms[j + 1] = t;
  }
}

/**
 * The usual layout that is not canonical: concepts in id order, each concept's terms together,
 * but the terms of some concepts out of order (a synonym added after the others, a new preferred
 * term). Then the concepts keep their numbers and only those concepts' terms are sorted, their
 * columns moved within the concept's run: the same order as the full renumbering (both sorts are
 * stable), without sorting a million ids and permuting every column (1.4 s of the new release's
 * 4 M rows, docs/BENCHMARKS.md). Returns false, changing nothing, for any other layout.
 */
function sortWithinConcepts(r: Release, bytes: ReleaseBytes): boolean {
  const ids = r.conceptIds;
  for (let c = 1; c < r.conceptCount; c++) if (!(ids[c - 1] < ids[c])) return false;
  const concept = r.termConcept;
  const m = r.termCount;
  for (let t = 1; t < m; t++) if (concept[t] < concept[t - 1]) return false;
  const cmp = termComparer(r, bytes);
  let scratch = new Int32Array(64);
  const columns = [r.termType, r.termLanguage, r.termStatus, r.termLine, bytes.termBlock, bytes.textStart, bytes.textEnd, bytes.idStart, bytes.idEnd];
  let movedBuf = new Int32Array(64);
  for (let s = 0; s < m; ) {
    let e = s + 1;
    let sorted = true;
    while (e < m && concept[e] === concept[s]) {
      if (sorted && cmp(e - 1, e) > 0) sorted = false;
      e++;
    }
    if (!sorted) {
      const len = e - s;
      if (scratch.length < len) {
        scratch = new Int32Array(len * 2);
        movedBuf = new Int32Array(len * 2);
      }
      for (let k = 0; k < len; k++) scratch[k] = s + k;
      sortRange(scratch, 0, len, cmp);
      for (const col of columns) {
        for (let k = 0; k < len; k++) movedBuf[k] = col[scratch[k]];
        for (let k = 0; k < len; k++) col[s + k] = movedBuf[k];
      }
    }
    s = e;
  }
  return true;
}

/**
 * The hierarchy with its children in identifier order and each child's parents sorted: its walks
 * (ancestors, neighbours, the scorer's context) no longer follow the file's row order. Parent
 * lists are sorted in place (the pipeline gives a hierarchy just loaded); the Map is rebuilt only
 * when the children are out of order.
 */
export function canonicalHierarchy(h: Hierarchy): Hierarchy {
  // A loaded hierarchy is a graph in canonical order already (load/hierarchyGraph.ts).
  if (h.graph) return h;
  if (childrenInOrder(h)) {
    // The usual file sorted by child: sort the parent lists that need it, keys as they are
    // (copying the Map of a million children cost 0.5 s).
    for (const list of h.parents.values()) if (!inOrder(list)) list.sort(cmpStrings);
    return h;
  }
  const parents = new Map<string, string[]>();
  for (const child of [...h.parents.keys()].sort(cmpStrings)) parents.set(child, [...h.parents.get(child)!].sort(cmpStrings));
  return { ...h, parents };
}

function inOrder(list: readonly string[]): boolean {
  for (let k = 1; k < list.length; k++) if (!(list[k - 1] < list[k])) return false;
  return true;
}

function childrenInOrder(h: Hierarchy): boolean {
  let prev: string | undefined;
  for (const child of h.parents.keys()) {
    if (prev !== undefined && !(prev < child)) return false;
    prev = child;
  }
  return true;
}

/** The same history table with its rows sorted by old id, relation, new id (byOld likewise). */
export function canonicalHistory(h: HistoryTable): HistoryTable {
  const rows = [...h.rows].sort((a, b) => cmpStrings(a.oldId, b.oldId) || cmpStrings(a.relation, b.relation) || cmpStrings(a.newId, b.newId));
  const byOld = new Map<string, HistoryRow[]>();
  for (const row of rows) {
    const list = byOld.get(row.oldId);
    if (list) list.push(row);
    else byOld.set(row.oldId, [row]);
  }
  return { ...h, rows, byOld };
}
