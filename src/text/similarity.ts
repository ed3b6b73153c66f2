/**
 * String similarity measures used to re-score mappings whose term text
 * changed between releases: Levenshtein, Jaro and Jaro–Winkler, Sørensen–Dice
 * on character bigrams and trigrams, and Jaccard on token sets.
 *
 * These run in the inner loop of candidate scoring (every changed term
 * against every candidate), so they are hand-written: module-level typed
 * arrays are reused across calls and grown when needed, so the character
 * measures allocate nothing per call beyond the trimmed substrings of
 * levenshtein (each worker thread has its own module and buffers).
 *
 * Measured (Node 20, this project's 2-core machine under load from other
 * jobs, 400,000 pairs of invented 30–50 character terms, best of 4 runs):
 * levenshtein 320–480 ms against 450–570 ms for fastest-levenshtein 1.0.16;
 * jaroWinkler 520–1170 ms against 1600–4000 ms for talisman 1.1.4; the hash
 * table in trigramDice / diceBigrams brought them from 1700 ms (sorting the
 * grams) to 490–1300 ms. The scripts were one-off; re-measure before changing
 * the algorithms.
 *
 * All measures work on UTF-16 code units, as `String.prototype.length` and
 * the reference libraries the tests compare against do; a character outside
 * the Basic Multilingual Plane counts as two. Terms are usually compared after
 * `foldTerm` (./normalize.ts), which makes that rare.
 */

// ---------------------------------------------------------------------------
// Reused buffers

/** Bit masks of the positions of each code unit in the pattern (Myers). */
const peq = new Uint32Array(0x10000);
let row: Int32Array = new Int32Array(64);
let carry: Int8Array = new Int8Array(64);
/** Per code unit, the next position of the same unit in the longer string (Jaro). */
let nextSame: Int32Array = new Int32Array(64);
/** Per code unit, the first position not yet passed over in the longer string (Jaro); -1 when none. */
const firstSame = new Int32Array(0x10000).fill(-1);
let flagsShort: Uint8Array = new Uint8Array(64);
let flagsLong: Uint8Array = new Uint8Array(64);
let gramsA: Float64Array = new Float64Array(64);
let gramsB: Float64Array = new Float64Array(64);

function growInt32(buf: Int32Array, n: number): Int32Array {
  return buf.length >= n ? buf : new Int32Array(Math.max(n, buf.length * 2));
}
function growInt8(buf: Int8Array, n: number): Int8Array {
  return buf.length >= n ? buf : new Int8Array(Math.max(n, buf.length * 2));
}
function growUint8(buf: Uint8Array, n: number): Uint8Array {
  return buf.length >= n ? buf : new Uint8Array(Math.max(n, buf.length * 2));
}
function growFloat64(buf: Float64Array, n: number): Float64Array {
  return buf.length >= n ? buf : new Float64Array(Math.max(n, buf.length * 2));
}

// ---------------------------------------------------------------------------
// Levenshtein

/**
 * Edit distance of `a` (at most 32 code units, not empty) to `b`: Myers' 1999
 * bit-vector algorithm in the formulation of Hyyrö (2003), one machine word.
 */
function myers32(a: string, b: string): number {
  const n = a.length;
  for (let i = 0; i < n; i++) peq[a.charCodeAt(i)] |= 1 << i;
  const high = 1 << (n - 1);
  let pv = -1;
  let mv = 0;
  let score = n;
  for (let j = 0; j < b.length; j++) {
    const eq = peq[b.charCodeAt(j)];
    const xv = eq | mv;
    const xh = ((((eq & pv) + pv) | 0) ^ pv) | eq;
    let ph = mv | ~(xh | pv);
    let mh = pv & xh;
    if (ph & high) score++;
    else if (mh & high) score--;
    ph = (ph << 1) | 1;
    mh <<= 1;
    pv = mh | ~(xv | ph);
    mv = ph & xv;
  }
  for (let i = 0; i < n; i++) peq[a.charCodeAt(i)] = 0;
  return score;
}

/**
 * Edit distance of `a` (more than 32 code units) to `b`: the blocked form of
 * the same algorithm (Myers 1999, section 4), one 32-bit block of `a` at a
 * time over the whole of `b`, the horizontal deltas at the bottom of each
 * block carried to the next one in `carry`.
 */
function myersBlocks(a: string, b: string): number {
  const n = a.length;
  const m = b.length;
  carry = growInt8(carry, m);
  const h = carry;
  h.fill(1, 0, m); // row 0 of the matrix: 0, 1, 2, … so every delta is +1
  for (let start = 0; start < n; start += 32) {
    const end = start + 32 < n ? start + 32 : n;
    for (let i = start; i < end; i++) peq[a.charCodeAt(i)] |= 1 << (i - start);
    const high = 1 << (end - 1 - start);
    let pv = -1;
    let mv = 0;
    for (let j = 0; j < m; j++) {
      let eq = peq[b.charCodeAt(j)] | 0;
      const hin = h[j];
      const xv = eq | mv;
      if (hin < 0) eq |= 1;
      const xh = ((((eq & pv) + pv) | 0) ^ pv) | eq;
      let ph = mv | ~(xh | pv);
      let mh = pv & xh;
      h[j] = ph & high ? 1 : mh & high ? -1 : 0;
      ph <<= 1;
      mh <<= 1;
      if (hin < 0) mh |= 1;
      else if (hin > 0) ph |= 1;
      pv = mh | ~(xv | ph);
      mv = ph & xv;
    }
    for (let i = start; i < end; i++) peq[a.charCodeAt(i)] = 0;
  }
  let score = n;
  for (let j = 0; j < m; j++) score += h[j];
  return score;
}

/**
 * Edit distance of `a` (the shorter) to `b` by the two-row dynamic programme,
 * restricted to the diagonal band |i − j| ≤ `max` and stopped as soon as a
 * whole row exceeds `max` (then `max + 1` is returned).
 */
function levenshteinRows(a: string, b: string, max: number): number {
  const n = a.length;
  const m = b.length;
  row = growInt32(row, n + 1);
  const r = row;
  const over = max + 1;
  for (let j = 0; j <= n; j++) r[j] = j <= max ? j : over;
  for (let i = 1; i <= m; i++) {
    const bc = b.charCodeAt(i - 1);
    const lo = i - max > 1 ? i - max : 1;
    const hi = i + max < n ? i + max : n;
    // The cell left of the band counts as "over"; column 0 is i. Cells right
    // of the band still hold their row-0 value, "over", since the band's
    // right edge only moves right.
    let diag = r[lo - 1];
    let left = lo === 1 ? (i <= max ? i : over) : over;
    r[lo - 1] = left;
    let rowMin = left;
    for (let j = lo; j <= hi; j++) {
      const up = r[j];
      let v = diag + (a.charCodeAt(j - 1) === bc ? 0 : 1);
      if (up + 1 < v) v = up + 1;
      if (left + 1 < v) v = left + 1;
      if (v > over) v = over;
      diag = up;
      r[j] = v;
      left = v;
      if (v < rowMin) rowMin = v;
    }
    if (rowMin > max) return over;
  }
  return r[n] > max ? over : r[n];
}

/**
 * Bounds below which the banded programme beats the blocked bit vectors on
 * strings of more than 32 units (measured on 40–60 unit terms: bound 4, 90 ms
 * against 180 ms; bound 8, about even; bound 16, 1400 ms against 520 ms).
 */
const BAND_LIMIT = 8;

/**
 * Levenshtein distance (insertions, deletions and substitutions of one code
 * unit, each costing 1).
 *
 * With `maxDistance`, the exact distance is returned when it is at most
 * `maxDistance` and `maxDistance + 1` otherwise, which lets the computation
 * stop early; `maxDistance` is floored and must be ≥ 0.
 *
 * Common prefix and suffix are skipped first; when the shorter remainder has
 * at most 32 code units the bit-vector algorithm of Myers/Hyyrö runs in one
 * pass over the longer one; otherwise its blocked form, or, for a bound below
 * {@link BAND_LIMIT}, the banded two-row dynamic programme.
 */
export function levenshtein(a: string, b: string, maxDistance: number = Infinity): number {
  if (!(maxDistance >= 0)) {
    throw new RangeError(`levenshtein: maxDistance must be a number >= 0, got ${maxDistance}`);
  }
  const max = Math.floor(maxDistance);
  if (a === b) return 0;
  let s = a;
  let l = b;
  if (s.length > l.length) {
    s = b;
    l = a;
  }
  let sl = s.length;
  let ll = l.length;
  if (ll - sl > max) return max + 1;
  let start = 0;
  while (start < sl && s.charCodeAt(start) === l.charCodeAt(start)) start++;
  while (sl > start && s.charCodeAt(sl - 1) === l.charCodeAt(ll - 1)) {
    sl--;
    ll--;
  }
  if (start > 0 || sl < s.length || ll < l.length) {
    s = s.slice(start, sl);
    l = l.slice(start, ll);
  }
  let d: number;
  if (s.length === 0) d = l.length;
  else if (s.length <= 32) d = myers32(s, l);
  else if (max < BAND_LIMIT) return levenshteinRows(s, l, max);
  else d = myersBlocks(s, l);
  return d > max ? max + 1 : d;
}

/**
 * Levenshtein similarity `1 − d / max(|a|, |b|)`, in [0, 1]; 1 for two empty
 * strings.
 */
export function levenshteinSimilarity(a: string, b: string): number {
  const longest = a.length > b.length ? a.length : b.length;
  if (longest === 0) return 1;
  return 1 - levenshtein(a, b) / longest;
}

// ---------------------------------------------------------------------------
// Jaro and Jaro–Winkler

/**
 * Jaro similarity (Jaro 1989), in [0, 1]:
 * `(m/|a| + m/|b| + (m − t)/m) / 3`, 0 when there are no matches `m`.
 *
 * Two code units match when equal and at most `⌊max(|a|,|b|)/2⌋ − 1` apart;
 * each unit of the shorter string takes the first unmatched equal unit of the
 * longer one in that window (the first string when lengths are equal). `t` is
 * half the number of matched units that are out of order, rounded down, as in
 * Winkler's reference code and the talisman library. Identical strings
 * (including two empty ones) score 1; an empty and a non-empty string 0.
 */
export function jaro(a: string, b: string): number {
  if (a === b) return 1;
  let s = a;
  let l = b;
  if (a.length > b.length) {
    s = b;
    l = a;
  }
  const sl = s.length;
  const ll = l.length;
  if (sl === 0) return 0;
  const range = Math.max((ll >> 1) - 1, 0);
  flagsShort = growUint8(flagsShort, sl);
  flagsLong = growUint8(flagsLong, ll);
  nextSame = growInt32(nextSame, ll);
  const fs = flagsShort;
  const fl = flagsLong;
  const next = nextSame;
  const first = firstSame;
  fs.fill(0, 0, sl);
  fl.fill(0, 0, ll);
  // Positions of each code unit in the longer string, as linked lists in
  // increasing order. The window start only moves right and a matched
  // position is never matched again, so each list is walked once, from a
  // cursor kept in `first`: O(|a| + |b|) instead of O(|a| · window).
  for (let j = ll - 1; j >= 0; j--) {
    const c = l.charCodeAt(j);
    next[j] = first[c];
    first[c] = j;
  }
  let m = 0;
  for (let i = 0; i < sl; i++) {
    const c = s.charCodeAt(i);
    const lo = i - range;
    let p = first[c];
    while (p !== -1 && p < lo) p = next[p];
    if (p !== -1 && p <= i + range) {
      fs[i] = 1;
      fl[p] = 1;
      m++;
      p = next[p];
    }
    first[c] = p;
  }
  for (let j = 0; j < ll; j++) first[l.charCodeAt(j)] = -1;
  if (m === 0) return 0;
  let outOfOrder = 0;
  let k = 0;
  for (let i = 0; i < sl; i++) {
    if (fs[i] === 0) continue;
    while (fl[k] === 0) k++;
    if (s.charCodeAt(i) !== l.charCodeAt(k)) outOfOrder++;
    k++;
  }
  const t = outOfOrder >> 1;
  return (m / sl + m / ll + (m - t) / m) / 3;
}

/**
 * Jaro–Winkler similarity (Winkler 1990), in [0, 1]:
 * `j + ℓ · p · (1 − j)` where `j` is {@link jaro} and `ℓ` the length of the
 * common prefix, at most `maxPrefix`.
 *
 * As in Winkler's implementation the prefix bonus is given only when
 * `j ≥ boostThreshold` (0.7); pass 0 for the plain formula. `p` must lie in
 * [0, 1/maxPrefix] so that the result stays within [0, 1].
 */
export function jaroWinkler(
  a: string,
  b: string,
  p: number = 0.1,
  maxPrefix: number = 4,
  boostThreshold: number = 0.7,
): number {
  if (!Number.isInteger(maxPrefix) || maxPrefix < 0) {
    throw new RangeError(`jaroWinkler: maxPrefix must be an integer >= 0, got ${maxPrefix}`);
  }
  if (!(p >= 0) || p * maxPrefix > 1) {
    throw new RangeError(`jaroWinkler: p must be in [0, 1/maxPrefix] = [0, ${1 / maxPrefix}], got ${p}`);
  }
  if (!(boostThreshold >= 0 && boostThreshold <= 1)) {
    throw new RangeError(`jaroWinkler: boostThreshold must be in [0, 1], got ${boostThreshold}`);
  }
  if (a === b) return 1;
  const j = jaro(a, b);
  if (j < boostThreshold) return j;
  const limit = Math.min(a.length, b.length, maxPrefix);
  let prefix = 0;
  while (prefix < limit && a.charCodeAt(prefix) === b.charCodeAt(prefix)) prefix++;
  return j + prefix * p * (1 - j);
}

// ---------------------------------------------------------------------------
// n-gram and token overlap

// Multiset intersection through an open-addressing hash table whose slots
// are marked used by the current call's stamp, so it never needs clearing.
let tableKeys: Float64Array = new Float64Array(256);
let tableCounts: Int32Array = new Int32Array(256);
let tableStamps: Int32Array = new Int32Array(256);
let stamp = 0;

/** Hash of a gram code (an integer below 2⁴⁸). */
function hashCode(key: number): number {
  let h = Math.imul((key | 0) ^ Math.imul((key / 0x100000000) | 0, 0x27d4eb2d), 0x9e3779b1);
  h ^= h >>> 16;
  return h;
}

/**
 * Sørensen–Dice `2|A ∩ B| / (|A| + |B|)` of the multisets of codes
 * `x[0, nx)` and `y[0, ny)`, both non-empty.
 */
function diceMultiset(x: Float64Array, nx: number, y: Float64Array, ny: number): number {
  let size = tableKeys.length;
  if (size < 2 * nx) {
    while (size < 2 * nx) size *= 2;
    tableKeys = new Float64Array(size);
    tableCounts = new Int32Array(size);
    tableStamps = new Int32Array(size);
  }
  const keys = tableKeys;
  const counts = tableCounts;
  const stamps = tableStamps;
  const mask = size - 1;
  if (++stamp === 0x7fffffff) {
    stamps.fill(0);
    stamp = 1;
  }
  const now = stamp;
  for (let i = 0; i < nx; i++) {
    const key = x[i];
    let h = hashCode(key) & mask;
    while (stamps[h] === now && keys[h] !== key) h = (h + 1) & mask;
    if (stamps[h] === now) counts[h]++;
    else {
      stamps[h] = now;
      keys[h] = key;
      counts[h] = 1;
    }
  }
  let common = 0;
  for (let j = 0; j < ny; j++) {
    const key = y[j];
    let h = hashCode(key) & mask;
    while (stamps[h] === now) {
      if (keys[h] === key) {
        if (counts[h] > 0) {
          counts[h]--;
          common++;
        }
        break;
      }
      h = (h + 1) & mask;
    }
  }
  return (2 * common) / (nx + ny);
}

/** Write the bigram codes of `s` (c1 · 2¹⁶ + c2) into `buf`; returns how many. */
function bigramCodes(s: string, buf: Float64Array): number {
  const n = s.length - 1;
  for (let i = 0; i < n; i++) buf[i] = s.charCodeAt(i) * 0x10000 + s.charCodeAt(i + 1);
  return n > 0 ? n : 0;
}

/**
 * Sørensen–Dice coefficient on the multisets of adjacent character bigrams:
 * `2 · |bigrams(a) ∩ bigrams(b)| / (|bigrams(a)| + |bigrams(b)|)`, where a
 * bigram that occurs twice in both strings counts twice. No padding. Identical
 * strings score 1; otherwise a string with fewer than two code units has no
 * bigrams and scores 0.
 */
export function diceBigrams(a: string, b: string): number {
  if (a === b) return 1;
  if (a.length < 2 || b.length < 2) return 0;
  gramsA = growFloat64(gramsA, a.length);
  gramsB = growFloat64(gramsB, b.length);
  const na = bigramCodes(a, gramsA);
  const nb = bigramCodes(b, gramsB);
  return diceMultiset(gramsA, na, gramsB, nb);
}

/**
 * The character n-grams of `s`, in order, duplicates kept.
 *
 * Padding: one space is added at each end, so the first and last characters
 * also open and close a gram and a one-letter difference at an edge costs as
 * much as one inside ("femur" → " fe", "fem", "emu", "mur", "ur "). Spaces
 * inside `s` are kept, so grams span word boundaries. When the padded string
 * is shorter than `n`, it is the only gram; the empty string has none.
 */
export function charNgrams(s: string, n: number = 3): string[] {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`charNgrams: n must be an integer >= 1, got ${n}`);
  if (s === '') return [];
  const padded = ` ${s} `;
  if (padded.length <= n) return [padded];
  const grams: string[] = [];
  for (let i = 0; i + n <= padded.length; i++) grams.push(padded.slice(i, i + n));
  return grams;
}

/** Write the padded trigram codes of `s` into `buf` (see {@link charNgrams}). */
function trigramCodes(s: string, buf: Float64Array): number {
  // Padded string: ' ' + s + ' ', length s.length + 2, grams s.length.
  const len = s.length;
  let c0 = 0x20;
  let c1 = s.charCodeAt(0);
  for (let i = 0; i < len; i++) {
    const c2 = i + 1 < len ? s.charCodeAt(i + 1) : 0x20;
    buf[i] = c0 * 0x100000000 + c1 * 0x10000 + c2;
    c0 = c1;
    c1 = c2;
  }
  return len;
}

/**
 * Sørensen–Dice coefficient on the multisets of padded character trigrams of
 * {@link charNgrams}(s, 3). Identical strings score 1; an empty string against
 * a non-empty one 0.
 */
export function trigramDice(a: string, b: string): number {
  if (a === b) return 1;
  if (a === '' || b === '') return 0;
  gramsA = growFloat64(gramsA, a.length);
  gramsB = growFloat64(gramsB, b.length);
  const na = trigramCodes(a, gramsA);
  const nb = trigramCodes(b, gramsB);
  return diceMultiset(gramsA, na, gramsB, nb);
}

/**
 * Jaccard index `|A ∩ B| / |A ∪ B|` of the sets of tokens (duplicates count
 * once). Two empty lists score 1, the usual convention for J(∅, ∅).
 */
export function tokenJaccard(tokensA: readonly string[], tokensB: readonly string[]): number {
  const setA = new Set(tokensA);
  const setB = new Set(tokensB);
  if (setA.size === 0 && setB.size === 0) return 1;
  let common = 0;
  for (const t of setB) if (setA.has(t)) common++;
  return common / (setA.size + setB.size - common);
}
