/**
 * ReleaseBytes: the raw storage behind a loaded release's term texts, term ids and concept ids.
 *
 * A loaded release keeps the UTF-8 bytes it was read from (the file's blocks, plus small side
 * blocks for values that came through the string path) and, per term, only integers: the block
 * and the byte ranges of its text and its term_id. Concept ids are byte ranges too, found by
 * binary search when they came in increasing order and through a hash table over their bytes
 * otherwise. No string is created per row while loading; strings are made when asked for:
 *  - `termTextAt(r, t)` / `termIdAt(r, t)` decode one value;
 *  - `termTextEquals(a, t, b, u)` compares two terms' bytes without decoding;
 *  - `conceptIndexOf(r, id)` and `matchConceptIds(a, b)` find concepts by id bytes (a merge of
 *    two releases whose ids are in order; no Map is built);
 *  - `release.termText`, `release.termId` and `release.conceptIndex` stay plain `string[]` /
 *    `Map` for every consumer: they are lazy properties, built in full on first access and
 *    cached (assigning to them replaces the value as for a plain property).
 * The storage is found through a WeakMap keyed by the release object, so a copy made by spreading
 * a release (`{ ...r, termText: other }`) never reads the original's bytes by mistake: functions
 * given a release without storage read its plain properties.
 */
import type { Release } from './types.js';

/** FNV-1a (32 bit) over buf[s..e): the concept table's hash, the same in every release. */
export function hashBytes(buf: Uint8Array, s: number, e: number): number {
  let h = 0x811c9dc5;
  for (let i = s; i < e; i++) h = Math.imul(h ^ buf[i], 0x01000193);
  return h;
}

/** Are a[as..as+len) and b[bs..bs+len) the same bytes? */
export function bytesEqual(a: Uint8Array, as: number, b: Uint8Array, bs: number, len: number): boolean {
  for (let i = 0; i < len; i++) if (a[as + i] !== b[bs + i]) return false;
  return true;
}

/** A DataView over a buffer's bytes, to compare them four at a time. */
export function viewOf(buf: Uint8Array): DataView {
  return new DataView(buf.buffer, buf.byteOffset, buf.byteLength);
}

/**
 * bytesEqual four bytes at a time: about twice as fast for the short values of a release
 * (ids, statuses, languages) as comparing byte by byte, measured in the loader.
 */
export function viewsEqual(a: DataView, as: number, b: DataView, bs: number, len: number): boolean {
  let i = 0;
  for (; i + 4 <= len; i += 4) if (a.getUint32(as + i) !== b.getUint32(bs + i)) return false;
  for (; i < len; i++) if (a.getUint8(as + i) !== b.getUint8(bs + i)) return false;
  return true;
}

/** Order of a[as..ae) and b[bs..be) byte by byte, a shorter prefix first: <0, 0 or >0. */
export function compareBytes(a: Uint8Array, as: number, ae: number, b: Uint8Array, bs: number, be: number): number {
  const la = ae - as;
  const lb = be - bs;
  const n = la < lb ? la : lb;
  for (let i = 0; i < n; i++) {
    const d = a[as + i] - b[bs + i];
    if (d !== 0) return d;
  }
  return la - lb;
}

/**
 * Concept ids as byte ranges. When the ids came in strictly increasing byte order (`sorted`, the
 * usual layout of a release) they are found by binary search and paired across releases by a
 * merge; otherwise through an open-addressing hash table (slot holds concept + 1, 0 = empty)
 * over FNV-1a hashes of the bytes.
 */
export interface ConceptTable {
  blocks: Buffer[];
  block: Int32Array;
  start: Int32Array;
  end: Int32Array;
  /** True when concept c's id is below concept c+1's for every c; `hash` and `table` then unused. */
  sorted: boolean;
  hash: Int32Array;
  table: Int32Array;
}

/**
 * Find the concept whose id is buf[s..e) (hash h) in the hash table. Returns the concept, or
 * `-1 - slot` with the empty slot where it would be inserted.
 */
export function probeConcept(t: ConceptTable, buf: Uint8Array, s: number, e: number, h: number): number {
  const table = t.table;
  const mask = table.length - 1;
  const len = e - s;
  let p = h & mask;
  for (;;) {
    const v = table[p];
    if (v === 0) return -1 - p;
    const c = v - 1;
    if (t.hash[c] === h) {
      const cs = t.start[c];
      if (t.end[c] - cs === len && bytesEqual(t.blocks[t.block[c]], cs, buf, s, len)) return c;
    }
    p = (p + 1) & mask;
  }
}

/** The concept of `count` concepts whose id is buf[s..e), or -1 (either layout). */
export function findConcept(t: ConceptTable, count: number, buf: Uint8Array, s: number, e: number): number {
  if (!t.sorted) {
    const c = probeConcept(t, buf, s, e, hashBytes(buf, s, e));
    return c < 0 ? -1 : c;
  }
  let lo = 0;
  let hi = count - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >>> 1;
    const cmp = compareBytes(t.blocks[t.block[mid]], t.start[mid], t.end[mid], buf, s, e);
    if (cmp === 0) return mid;
    if (cmp < 0) lo = mid + 1;
    else hi = mid - 1;
  }
  return -1;
}

/** Fill t.hash for concepts 0..count-1 (a sorted table never computed them). */
export function hashConceptIds(t: ConceptTable, count: number): void {
  for (let c = 0; c < count; c++) t.hash[c] = hashBytes(t.blocks[t.block[c]], t.start[c], t.end[c]);
}

/** A table of at least twice `count` slots (a power of two) holding concepts 0..count-1. */
export function rehashConcepts(hash: Int32Array, count: number, minSlots: number): Int32Array {
  let size = 1 << 10;
  while (size < minSlots || size < count * 2) size *= 2;
  const table = new Int32Array(size);
  const mask = size - 1;
  for (let c = 0; c < count; c++) {
    let p = hash[c] & mask;
    while (table[p] !== 0) p = (p + 1) & mask;
    table[p] = c + 1;
  }
  return table;
}

export class ReleaseBytes {
  readonly blocks: Buffer[];
  /** Per term: block of its text and term_id, and their byte ranges. */
  termBlock: Int32Array;
  textStart: Int32Array;
  textEnd: Int32Array;
  idStart: Int32Array;
  idEnd: Int32Array;
  readonly concepts: ConceptTable;
  /** The release's concept id list as built; a different array on the release means it was replaced. */
  readonly conceptIds: string[];

  /** Full arrays once built (or assigned). */
  textCache: string[] | undefined;
  idCache: string[] | undefined;
  indexCache: Map<string, number> | undefined;
  private readonly views: DataView[] = [];
  /** Are conceptIds in strictly increasing string order? Found on the first lookup; reset when they are renumbered. */
  idsInStringOrder: boolean | undefined;
  /** Set when a consumer assigned the property: the bytes no longer describe it. */
  textReplaced = false;
  idReplaced = false;
  indexReplaced = false;

  constructor(parts: {
    blocks: Buffer[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array; idStart: Int32Array; idEnd: Int32Array;
    concepts: ConceptTable; conceptIds: string[];
  }) {
    this.blocks = parts.blocks;
    this.termBlock = parts.termBlock;
    this.textStart = parts.textStart;
    this.textEnd = parts.textEnd;
    this.idStart = parts.idStart;
    this.idEnd = parts.idEnd;
    this.concepts = parts.concepts;
    this.conceptIds = parts.conceptIds;
  }

  get termCount(): number {
    return this.termBlock.length;
  }

  text(t: number): string {
    if (this.textCache !== undefined) return this.textCache[t];
    return this.blocks[this.termBlock[t]].toString('utf8', this.textStart[t], this.textEnd[t]);
  }

  id(t: number): string {
    if (this.idCache !== undefined) return this.idCache[t];
    const s = this.idStart[t];
    const e = this.idEnd[t];
    return s === e ? '' : this.blocks[this.termBlock[t]].toString('utf8', s, e);
  }

  allText(): string[] {
    if (this.textCache === undefined) {
      const n = this.termCount;
      const out = new Array<string>(n);
      for (let t = 0; t < n; t++) out[t] = this.blocks[this.termBlock[t]].toString('utf8', this.textStart[t], this.textEnd[t]);
      this.textCache = out;
    }
    return this.textCache;
  }

  allIds(): string[] {
    if (this.idCache === undefined) {
      const n = this.termCount;
      const out = new Array<string>(n);
      for (let t = 0; t < n; t++) out[t] = this.id(t);
      this.idCache = out;
    }
    return this.idCache;
  }

  /** Same text bytes for term t here and term u of `other`. */
  sameText(t: number, other: ReleaseBytes, u: number): boolean {
    const s = this.textStart[t];
    const len = this.textEnd[t] - s;
    const os = other.textStart[u];
    if (other.textEnd[u] - os !== len) return false;
    return viewsEqual(this.view(this.termBlock[t]), s, other.view(other.termBlock[u]), os, len);
  }

  private view(block: number): DataView {
    return (this.views[block] ??= viewOf(this.blocks[block]));
  }

  /** Keep the terms for which `keep` is true, in order. */
  compactTerms(keep: (t: number) => boolean): void {
    let n = 0;
    for (let t = 0; t < this.termCount; t++) {
      if (!keep(t)) continue;
      this.termBlock[n] = this.termBlock[t];
      this.textStart[n] = this.textStart[t];
      this.textEnd[n] = this.textEnd[t];
      this.idStart[n] = this.idStart[t];
      this.idEnd[n] = this.idEnd[t];
      n++;
    }
    this.termBlock = this.termBlock.slice(0, n);
    this.textStart = this.textStart.slice(0, n);
    this.textEnd = this.textEnd.slice(0, n);
    this.idStart = this.idStart.slice(0, n);
    this.idEnd = this.idEnd.slice(0, n);
    this.textCache = undefined;
    this.idCache = undefined;
  }

  /** Concept with this id, or -1 (no Map is built). */
  conceptOf(id: string): number {
    // Ids in increasing string order (the canonical order, and any file sorted by id): a binary
    // search over the id strings, no encoding of the id. Checked once, on the first lookup.
    const ids = this.conceptIds;
    if ((this.idsInStringOrder ??= inStringOrder(ids))) return indexInSorted(ids, id);
    const need = id.length * 3;
    if (scratch.length < need) scratch = Buffer.allocUnsafe(Math.max(need, scratch.length * 2));
    const len = scratch.write(id, 0, 'utf8');
    return findConcept(this.concepts, this.conceptIds.length, scratch, 0, len);
  }
}

let scratch = Buffer.allocUnsafe(256);

/** Are the ids in strictly increasing string (UTF-16 code unit) order? */
export function inStringOrder(ids: readonly string[]): boolean {
  for (let c = 1; c < ids.length; c++) if (!(ids[c - 1] < ids[c])) return false;
  return true;
}

/**
 * For each id of `a`, the index of the same id in `b` (strictly increasing), or -1: a merge when
 * `a` is in order too, else a binary search per id.
 */
export function alignIds(a: readonly string[], b: readonly string[]): Int32Array {
  const out = new Int32Array(a.length).fill(-1);
  if (inStringOrder(a)) {
    let k = 0;
    for (let i = 0; i < a.length && k < b.length; i++) {
      const id = a[i];
      while (k < b.length && b[k] < id) k++;
      if (k < b.length && b[k] === id) out[i] = k;
    }
    return out;
  }
  for (let i = 0; i < a.length; i++) out[i] = indexInSorted(b, a[i]);
  return out;
}

/** The index of `id` in ids (strictly increasing), or -1: a binary search. */
export function indexInSorted(ids: readonly string[], id: string): number {
  let lo = 0;
  let hi = ids.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >>> 1;
    const v = ids[mid];
    if (v === id) return mid;
    if (v < id) lo = mid + 1;
    else hi = mid - 1;
  }
  return -1;
}

const storage = new WeakMap<object, ReleaseBytes>();

/** The byte storage of a release loaded from a file, if it has one that still describes it. */
function bytesOf(r: Release): ReleaseBytes | undefined {
  return storage.get(r);
}

/** The byte storage of a release, for code that moves a release between threads (releaseThread.ts). */
export const releaseBytesOf = bytesOf;

function lazyProperty<T>(target: object, key: string, get: () => T, onSet: (value: T) => void): void {
  Object.defineProperty(target, key, {
    enumerable: true,
    configurable: true,
    get,
    set(value: T) {
      Object.defineProperty(target, key, { value, writable: true, enumerable: true, configurable: true });
      onSet(value);
    },
  });
}

/**
 * Attach the storage to a release and define `termText`, `termId` and `conceptIndex` on it as
 * lazy properties (built in full on first access, then cached).
 */
export function attachReleaseBytes(r: Omit<Release, 'termText' | 'termId' | 'conceptIndex'>, bytes: ReleaseBytes): Release {
  storage.set(r, bytes);
  lazyProperty(r, 'termText', () => bytes.allText(), (v: string[]) => { bytes.textCache = v; bytes.textReplaced = true; });
  lazyProperty(r, 'termId', () => bytes.allIds(), (v: string[]) => { bytes.idCache = v; bytes.idReplaced = true; });
  lazyProperty(r, 'conceptIndex', () => (bytes.indexCache ??= new Map(bytes.conceptIds.map((id, i) => [id, i]))), (v: Map<string, number>) => { bytes.indexCache = v; bytes.indexReplaced = true; });
  return r as Release;
}

/**
 * The bytes of every term text (term t: blocks[termBlock[t]][textStart[t] .. textEnd[t]), UTF-8),
 * for readers that scan texts without decoding them; undefined when the release has no byte
 * storage or its termText was replaced.
 */
export function termTextBytes(r: Release): { blocks: readonly Buffer[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array } | undefined {
  const b = bytesOf(r);
  if (b === undefined || b.textReplaced) return undefined;
  return { blocks: b.blocks, termBlock: b.termBlock, textStart: b.textStart, textEnd: b.textEnd };
}

/**
 * The bytes of every term_id (term t: blocks[termBlock[t]][idStart[t] .. idEnd[t]), empty when it
 * has none); undefined when the release has no byte storage or its termId was replaced.
 */
export function termIdBytes(r: Release): { blocks: readonly Buffer[]; termBlock: Int32Array; idStart: Int32Array; idEnd: Int32Array } | undefined {
  const b = bytesOf(r);
  if (b === undefined || b.idReplaced) return undefined;
  return { blocks: b.blocks, termBlock: b.termBlock, idStart: b.idStart, idEnd: b.idEnd };
}

/** Text of term t, decoded alone (the full `termText` array is not built). */
export function termTextAt(r: Release, t: number): string {
  const b = bytesOf(r);
  return b !== undefined ? b.text(t) : r.termText[t];
}

/** term_id of term t ('' when absent), decoded alone. */
export function termIdAt(r: Release, t: number): string {
  const b = bytesOf(r);
  return b !== undefined ? b.id(t) : r.termId[t];
}

/**
 * A comparer of term texts between releases a and b: equal text of a's term t and b's term u.
 * Compares bytes (length first, no allocation) when both releases keep them, else strings.
 */
export function termTextComparer(a: Release, b: Release): (t: number, u: number) => boolean {
  const ba = bytesOf(a);
  const bb = bytesOf(b);
  if (ba !== undefined && bb !== undefined && !ba.textReplaced && !bb.textReplaced) return (t, u) => ba.sameText(t, bb, u);
  return (t, u) => termTextAt(a, t) === termTextAt(b, u);
}

/** Same text for term t of a and term u of b. */
export function termTextEquals(a: Release, t: number, b: Release, u: number): boolean {
  return termTextComparer(a, b)(t, u);
}

function tableUsable(r: Release, b: ReleaseBytes | undefined): b is ReleaseBytes {
  return b !== undefined && !b.indexReplaced && r.conceptIds === b.conceptIds;
}

/** Index of the concept with this id, or -1; uses the byte table when there is one (no Map built). */
export function conceptIndexOf(r: Release, id: string): number {
  const b = bytesOf(r);
  if (tableUsable(r, b)) return b.conceptOf(id);
  return r.conceptIndex.get(id) ?? -1;
}

/**
 * For each concept of a, the concept of b with the same id, or -1. When b's ids are in string
 * order (a canonical release's are), a merge of the two id lists as strings: 30-40 ms for 1 M
 * concepts, against 300-340 ms comparing their bytes (measured on the 4 M-row pair).
 */
export function matchConceptIds(a: Release, b: Release): Int32Array {
  const bb = bytesOf(b);
  const ordered = bb !== undefined && tableUsable(b, bb) ? (bb.idsInStringOrder ??= inStringOrder(bb.conceptIds)) : inStringOrder(b.conceptIds);
  if (ordered) return alignIds(a.conceptIds, b.conceptIds);
  const out = new Int32Array(a.conceptCount);
  const ba = bytesOf(a);
  if (tableUsable(a, ba) && tableUsable(b, bb)) {
    const ca = ba.concepts;
    const cb = bb.concepts;
    if (ca.sorted && cb.sorted) {
      // Both in id order: one merge, no lookups.
      let k = 0;
      for (let c = 0; c < a.conceptCount; c++) {
        const abuf = ca.blocks[ca.block[c]];
        let cmp = -1;
        while (k < b.conceptCount && (cmp = compareBytes(cb.blocks[cb.block[k]], cb.start[k], cb.end[k], abuf, ca.start[c], ca.end[c])) < 0) k++;
        out[c] = k < b.conceptCount && cmp === 0 ? k : -1;
      }
      return out;
    }
    for (let c = 0; c < a.conceptCount; c++) out[c] = findConcept(cb, b.conceptCount, ca.blocks[ca.block[c]], ca.start[c], ca.end[c]);
    return out;
  }
  for (let c = 0; c < a.conceptCount; c++) out[c] = conceptIndexOf(b, a.conceptIds[c]);
  return out;
}
