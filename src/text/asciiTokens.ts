/**
 * AsciiTokens: the tokens of `foldTerm` read straight from UTF-8 bytes, for the terms where that
 * is certain, so that indexing a release of millions of terms decodes no string per term.
 *
 * A "plain" term is ASCII without the four characters that the punctuation rule of
 * text/normalize.ts treats by context: "." (kept before a digit), "+" and "-" (kept after a
 * word), and the apostrophe (dropped inside a word). For such a term `foldTerm` is exactly:
 * lower case, every character other than a letter or digit a separator (",", "(", "/", the space
 * …), runs of separators one space, none at the ends — NFKC, case folding and diacritics cannot
 * change ASCII. Any other byte (those four, or UTF-8 of another script) makes `tokens` return -1
 * and the caller takes the string path; tests/text/asciiTokens.test.ts checks the equivalence
 * against `foldTerm` on random strings.
 *
 * Tokens are interned in an open-addressing hash table over their lower-cased bytes (FNV-1a);
 * the first time a token is seen, `resolve` turns its string into the caller's value (a word id,
 * or -1 for a stop word), which is kept, so each distinct token is decoded and stemmed once.
 */

const OTHER = 0;
/** A separator: any ASCII character but a letter, a digit and the four above. */
const SPACE = 1;
const LOWER = 2;
const UPPER = 3;

const CLASS = new Uint8Array(256);
for (let c = 0x30; c <= 0x39; c++) CLASS[c] = LOWER;
for (let c = 0x61; c <= 0x7a; c++) CLASS[c] = LOWER;
for (let c = 0x41; c <= 0x5a; c++) CLASS[c] = UPPER;
for (let c = 0; c < 0x80; c++) if (CLASS[c] === OTHER) CLASS[c] = SPACE;
for (const c of '.+-\'') CLASS[c.charCodeAt(0)] = OTHER;

export class AsciiTokens {
  private arena = new Uint8Array(1 << 16);
  private arenaLength = 0;
  private entryStart = new Int32Array(1 << 12);
  private entryLength = new Int32Array(1 << 12);
  private entryHash = new Int32Array(1 << 12);
  private entryValue = new Int32Array(1 << 12);
  private entries = 0;
  private table = new Int32Array(1 << 13);
  /** Values of the tokens of the last `tokens` call. */
  out = new Int32Array(64);

  constructor(private readonly resolve: (token: string) => number) {}

  /** Distinct tokens interned so far. */
  get size(): number {
    return this.entries;
  }

  /**
   * Values of the tokens of buf[s..e) into `out` (in order, repeats kept); returns their count,
   * or -1 when the bytes are not a plain term (the caller must fold the decoded string).
   */
  tokens(buf: Uint8Array, s: number, e: number): number {
    let n = 0;
    let i = s;
    while (i < e) {
      const k = CLASS[buf[i]];
      if (k === SPACE) { i++; continue; }
      if (k === OTHER) return -1;
      const start = i;
      let h = 0x811c9dc5;
      for (; i < e; i++) {
        const b = buf[i];
        const c = CLASS[b];
        if (c === SPACE) break;
        if (c === OTHER) return -1;
        h = Math.imul(h ^ (c === UPPER ? b | 0x20 : b), 0x01000193);
      }
      if (n === this.out.length) {
        const grown = new Int32Array(n * 2);
        grown.set(this.out);
        this.out = grown;
      }
      this.out[n++] = this.valueOf(buf, start, i, h | 0);
    }
    return n;
  }

  private valueOf(buf: Uint8Array, s: number, e: number, h: number): number {
    const table = this.table;
    const mask = table.length - 1;
    const len = e - s;
    let p = h & mask;
    for (;;) {
      const v = table[p];
      if (v === 0) break;
      const x = v - 1;
      if (this.entryHash[x] === h && this.entryLength[x] === len && this.sameLower(x, buf, s, len)) return this.entryValue[x];
      p = (p + 1) & mask;
    }
    // New token: copy its lower-cased bytes, resolve its string once.
    if (this.arenaLength + len > this.arena.length) {
      const grown = new Uint8Array(Math.max(this.arena.length * 2, this.arenaLength + len));
      grown.set(this.arena.subarray(0, this.arenaLength));
      this.arena = grown;
    }
    const at = this.arenaLength;
    for (let k = 0; k < len; k++) {
      const b = buf[s + k];
      this.arena[at + k] = CLASS[b] === UPPER ? b | 0x20 : b;
    }
    this.arenaLength += len;
    const value = this.resolve(String.fromCharCode(...this.arena.subarray(at, at + len)));
    const x = this.entries++;
    if (x === this.entryStart.length) this.growEntries();
    this.entryStart[x] = at;
    this.entryLength[x] = len;
    this.entryHash[x] = h;
    this.entryValue[x] = value;
    table[p] = x + 1;
    if (this.entries * 2 > table.length) this.rehash();
    return value;
  }

  private sameLower(x: number, buf: Uint8Array, s: number, len: number): boolean {
    const a = this.arena;
    const at = this.entryStart[x];
    for (let k = 0; k < len; k++) {
      const b = buf[s + k];
      if (a[at + k] !== (CLASS[b] === UPPER ? b | 0x20 : b)) return false;
    }
    return true;
  }

  private growEntries(): void {
    const grow = (a: Int32Array) => {
      const g = new Int32Array(a.length * 2);
      g.set(a);
      return g;
    };
    this.entryStart = grow(this.entryStart);
    this.entryLength = grow(this.entryLength);
    this.entryHash = grow(this.entryHash);
    this.entryValue = grow(this.entryValue);
  }

  private rehash(): void {
    const table = new Int32Array(this.table.length * 2);
    const mask = table.length - 1;
    for (let x = 0; x < this.entries; x++) {
      let p = this.entryHash[x] & mask;
      while (table[p] !== 0) p = (p + 1) & mask;
      table[p] = x + 1;
    }
    this.table = table;
  }
}
