/** The seeded generator: streams are reproducible, independent by label, and uniform enough. */
import { describe, expect, it } from 'vitest';
import { Rng, hash32 } from '../../src/gen/random.js';

const draws = (r: Rng, n: number) => Array.from({ length: n }, () => r.nextUint32());

describe('Rng', () => {
  it('gives the same stream for the same seed and label, and another for another label or seed', () => {
    expect(draws(new Rng(42, 'a'), 20)).toEqual(draws(new Rng(42, 'a'), 20));
    expect(draws(new Rng(42, 'a'), 20)).not.toEqual(draws(new Rng(42, 'b'), 20));
    expect(draws(new Rng(42, 'a'), 20)).not.toEqual(draws(new Rng(43, 'a'), 20));
    // A numeric seed and the same digits as a string are different seeds.
    expect(draws(new Rng(7), 5)).not.toEqual(draws(new Rng('7'), 5));
  });

  it('stays within its ranges', () => {
    const r = new Rng(1);
    for (let i = 0; i < 10_000; i++) {
      const x = r.next();
      expect(x >= 0 && x < 1).toBe(true);
      const k = r.int(7);
      expect(Number.isInteger(k) && k >= 0 && k < 7).toBe(true);
    }
    expect(() => r.pick([])).toThrow(RangeError);
    expect(() => r.weighted([0, 0])).toThrow(RangeError);
  });

  it('is roughly uniform: chi-square over 10 bins below the 0.1% critical value', () => {
    // Critical value of chi-square with 9 degrees of freedom at p = 0.001 is 27.88 (standard tables).
    const r = new Rng('uniform');
    const bins = new Array(10).fill(0);
    const n = 100_000;
    for (let i = 0; i < n; i++) bins[r.int(10)]++;
    const chi = bins.reduce((a, b) => a + (b - n / 10) ** 2 / (n / 10), 0);
    expect(chi).toBeLessThan(27.88);
  });

  it('draws weighted indices in proportion and shuffles into a permutation', () => {
    const r = new Rng(3);
    const counts = [0, 0, 0];
    for (let i = 0; i < 30_000; i++) counts[r.weighted([1, 2, 7])]++;
    expect(counts[0] / 30_000).toBeCloseTo(0.1, 1);
    expect(counts[2] / 30_000).toBeCloseTo(0.7, 1);
    const items = Array.from({ length: 50 }, (_, i) => i);
    const shuffled = r.shuffle([...items]);
    expect(shuffled).not.toEqual(items);
    expect([...shuffled].sort((a, b) => a - b)).toEqual(items);
  });

  it('hashes strings to 32-bit values that differ for near strings', () => {
    const hs = ['a', 'b', 'ab', 'ba', '', 'seed:1', 'seed:2'].map(hash32);
    expect(new Set(hs).size).toBe(hs.length);
    for (const h of hs) expect(Number.isInteger(h) && h >= 0 && h < 2 ** 32).toBe(true);
  });
});
