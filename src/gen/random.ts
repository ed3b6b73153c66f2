/**
 * Rng: the seeded pseudo-random generator of the ground-truth generator.
 *
 * mulberry32 (a 32-bit state, one multiply-xorshift output step): small, fast and good enough
 * for sampling test data; it is not for cryptography. Seeds may be numbers or strings; a seed
 * and a label are hashed together (32-bit FNV-1a, then a murmur3 finaliser) so that each part
 * of the generator draws from its own stream: adding a draw in the vocabulary does not shift
 * what the injector picks. Math.random is never used, so the same seed gives the same output.
 */

/** 32-bit FNV-1a of a string, finished with the murmur3 avalanche step. */
export function hash32(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

export class Rng {
  private state: number;

  /** A stream for `seed` and `label`: equal pairs give equal streams. */
  constructor(seed: number | string, label = '') {
    this.state = hash32(`${typeof seed}:${seed}\u0001${label}`);
  }

  /** Next 32-bit unsigned integer (mulberry32). */
  nextUint32(): number {
    let t = (this.state = (this.state + 0x6d2b79f5) | 0);
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (t ^ (t >>> 14)) >>> 0;
  }

  /** Uniform in [0, 1). */
  next(): number {
    return this.nextUint32() / 4294967296;
  }

  /** Uniform integer in [0, n); n must be a positive integer below 2^32. */
  int(n: number): number {
    return Math.floor(this.next() * n);
  }

  /** True with probability p. */
  chance(p: number): boolean {
    return this.next() < p;
  }

  /** A uniformly chosen element of a non-empty array. */
  pick<T>(items: readonly T[]): T {
    if (items.length === 0) throw new RangeError('Rng.pick: empty array');
    return items[this.int(items.length)];
  }

  /** Index chosen with probability proportional to `weights[i]` (non-negative, not all 0). */
  weighted(weights: readonly number[]): number {
    let total = 0;
    for (const w of weights) total += w;
    if (!(total > 0)) throw new RangeError('Rng.weighted: weights must have a positive sum');
    let x = this.next() * total;
    for (let i = 0; i < weights.length; i++) {
      x -= weights[i];
      if (x < 0) return i;
    }
    return weights.length - 1;
  }

  /** Shuffle in place (Fisher–Yates) and return the array. */
  shuffle<T>(items: T[]): T[] {
    for (let i = items.length - 1; i > 0; i--) {
      const j = this.int(i + 1);
      const x = items[i];
      items[i] = items[j];
      items[j] = x;
    }
    return items;
  }
}
