/**
 * Which concept owns each lexical key (text/normalize.ts `lexicalKey`).
 *
 * termdrift's aligner identifies terms across releases by exact text, folded text and lexical
 * key. If two concepts had terms with the same lexical key, a term removed from one could be
 * identified with a term added to the other, and the injected truth would no longer be the
 * only reading of the files. So the generator keeps every lexical key owned by one concept:
 * a concept may hold several terms with one key (word-order variants of one name), but a
 * fresh term is only given to a concept when its key is free or already that concept's own.
 * A key once owned stays owned, also after its term is removed, so a removed term is never
 * mistaken for a term added elsewhere.
 *
 * Hot path (measured): the vocabulary computes a key for every term it considers, 5 million
 * at 1M concepts, and `lexicalKey` took about 2 µs per term on the build machine (sorting and
 * joining stems). `termKey` computes a 52-bit hash of the same set of stems instead, in about
 * a quarter of the time, and keys live in a flat open-addressing table (Float64Array keys,
 * Int32Array owners) rather than a Map of strings. Equal lexical keys always give equal
 * hashes; two different keys that collide only make the generator more cautious (it rejects
 * a name it could have used), never less.
 */
import { foldTerm, stemToken, STOP_WORDS } from '../text/normalize.js';
import type { BaseRelease } from './types.js';

/** Owner value of a key that two concepts of a base release already share. */
export const SHARED = -1;

function fnv(s: string, seed: number): number {
  let h = seed;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return finish(h);
}

function finish(x: number): number {
  let h = x;
  h ^= h >>> 15;
  h = Math.imul(h, 0x2c1b3c6d);
  h ^= h >>> 12;
  h = Math.imul(h, 0x297a2d39);
  h ^= h >>> 15;
  return h >>> 0;
}

/**
 * Token cache: 32-bit hash of a folded token → the two hashes of its stem (STOP for a stop
 * word), in flat arrays, so a token is hashed from the folded text without slicing it. Two
 * tokens whose hashes collide share an entry; that can only make two keys look equal.
 */
const TOKEN_SLOTS = 1 << 18;
const tokenKey = new Int32Array(TOKEN_SLOTS);
const tokenUsed = new Uint8Array(TOKEN_SLOTS);
const tokenA = new Int32Array(TOKEN_SLOTS);
const tokenB = new Int32Array(TOKEN_SLOTS);
const STOP = 2;
let tokenCount = 0;

/** Slot of the token folded[start, end) with hash h, filled on first sight. */
function tokenSlot(folded: string, start: number, end: number, h: number): number {
  let i = Math.imul(h, 0x9e3779b1) >>> 14;
  while (tokenUsed[i] !== 0 && tokenKey[i] !== (h | 0)) i = (i + 1) & (TOKEN_SLOTS - 1);
  if (tokenUsed[i] !== 0) return i;
  if (tokenCount * 2 >= TOKEN_SLOTS) {
    tokenUsed.fill(0);
    tokenCount = 0;
    return tokenSlot(folded, start, end, h);
  }
  const token = folded.slice(start, end);
  tokenKey[i] = h | 0;
  if (STOP_WORDS.has(token)) tokenUsed[i] = STOP;
  else {
    const stem = stemToken(token);
    tokenA[i] = fnv(stem, 0x811c9dc5) | 0;
    tokenB[i] = fnv(stem, 0x9747b28c) | 0;
    tokenUsed[i] = 1;
  }
  tokenCount++;
  return i;
}

const seen: number[] = [];

/** The key hash of a term already folded with `foldTerm`. Never 0. */
export function termKeyOfFolded(folded: string): number {
  let sumA = 0;
  let xorB = 0;
  let count = 0;
  seen.length = 0;
  let start = 0;
  let h = 0x811c9dc5;
  const len = folded.length;
  for (let i = 0; i <= len; i++) {
    const c = i < len ? folded.charCodeAt(i) : 32;
    if (c !== 32) {
      h = Math.imul(h ^ c, 0x01000193);
      continue;
    }
    if (i > start) {
      const slot = tokenSlot(folded, start, i, finish(h));
      if (tokenUsed[slot] !== STOP) {
        const a = tokenA[slot];
        if (!seen.includes(a)) {
          seen.push(a);
          sumA = (sumA + (a >>> 0)) >>> 0;
          xorB = (xorB ^ Math.imul(tokenB[slot], 0x9e3779b1)) >>> 0;
          count++;
        }
      }
    }
    start = i + 1;
    h = 0x811c9dc5;
  }
  if (count === 0) {
    // lexicalKey keeps the folded form of a term made only of stop words.
    sumA = fnv(folded, 0x01234567);
    xorB = fnv(folded, 0x89abcdef);
  }
  const key = sumA * 1048576 + (xorB >>> 12);
  return key === 0 ? 1 : key;
}

/** The key hash of a term: equal `lexicalKey`s give equal hashes. */
export function termKey(text: string): number {
  return termKeyOfFolded(foldTerm(text));
}

/** Open-addressing hash table: key hash → owner concept index. */
export class KeyTable {
  private keys: Float64Array;
  private owners: Int32Array;
  private mask: number;
  size = 0;
  /** How many keys are marked SHARED (two concepts of the base hold them). */
  sharedKeys = 0;

  constructor(expected = 1024) {
    let cap = 1024;
    while (cap < expected * 2) cap *= 2;
    this.keys = new Float64Array(cap);
    this.owners = new Int32Array(cap);
    this.mask = cap - 1;
  }

  private slot(key: number): number {
    let i = (Math.imul(key >>> 0, 0x9e3779b1) ^ Math.floor(key / 4294967296)) & this.mask;
    const keys = this.keys;
    while (keys[i] !== 0 && keys[i] !== key) i = (i + 1) & this.mask;
    return i;
  }

  /** Owner of a key, or undefined when the key is free. */
  get(key: number): number | undefined {
    const i = this.slot(key);
    return this.keys[i] === 0 ? undefined : this.owners[i];
  }

  set(key: number, owner: number): void {
    let i = this.slot(key);
    if (owner === SHARED && (this.keys[i] === 0 || this.owners[i] !== SHARED)) this.sharedKeys++;
    else if (owner !== SHARED && this.keys[i] !== 0 && this.owners[i] === SHARED) this.sharedKeys--;
    if (this.keys[i] === 0) {
      if ((this.size + 1) * 2 > this.keys.length) {
        this.grow();
        i = this.slot(key);
      }
      this.keys[i] = key;
      this.size++;
    }
    this.owners[i] = owner;
  }

  private grow(): void {
    const oldKeys = this.keys;
    const oldOwners = this.owners;
    this.keys = new Float64Array(oldKeys.length * 2);
    this.owners = new Int32Array(oldKeys.length * 2);
    this.mask = this.keys.length - 1;
    for (let j = 0; j < oldKeys.length; j++) {
      if (oldKeys[j] === 0) continue;
      const i = this.slot(oldKeys[j]);
      this.keys[i] = oldKeys[j];
      this.owners[i] = oldOwners[j];
    }
  }
}

/** Key owners of a release (a key two concepts share → SHARED). */
export function buildKeyOwners(release: BaseRelease): KeyTable {
  const table = new KeyTable(release.concepts.length * 4);
  const { concepts } = release;
  for (let c = 0; c < concepts.length; c++) {
    for (const t of concepts[c].terms) {
      const key = termKey(t.text);
      const had = table.get(key);
      if (had === undefined) table.set(key, c);
      else if (had !== c) table.set(key, SHARED);
    }
  }
  return table;
}

/**
 * Ownership during an injection: the base table is only read; claims go to an overlay, so
 * one vocabulary can be injected several times with the same result each time.
 */
export class KeyOwnership {
  private readonly overlay = new KeyTable();

  constructor(private readonly base: KeyTable) {}

  owner(key: number): number | undefined {
    return this.overlay.get(key) ?? this.base.get(key);
  }

  /** May concept `c` take a term with this key? */
  usableBy(key: number, c: number): boolean {
    const o = this.owner(key);
    return o === undefined || o === c;
  }

  free(key: number): boolean {
    return this.owner(key) === undefined;
  }

  claim(key: number, c: number): void {
    this.overlay.set(key, c);
  }
}
