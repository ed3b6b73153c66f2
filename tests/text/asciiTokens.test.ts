/**
 * AsciiTokens reads foldTerm's tokens from bytes for plain ASCII terms; it must agree with
 * foldTerm (text/normalize.ts) on every string it accepts, and refuse the ones it cannot read.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { AsciiTokens } from '../../src/text/asciiTokens.js';
import { foldTerm } from '../../src/text/normalize.js';

function tokensOf(text: string): string[] | null {
  const seen: string[] = [];
  const t = new AsciiTokens((token) => {
    seen.push(token);
    return seen.length - 1;
  });
  const buf = Buffer.from(text, 'utf8');
  const n = t.tokens(buf, 0, buf.length);
  if (n < 0) return null;
  return Array.from(t.out.subarray(0, n), (v) => seen[v]);
}

const folded = (text: string) => (foldTerm(text) === '' ? [] : foldTerm(text).split(' '));

describe('AsciiTokens', () => {
  it('worked cases: commas, brackets, slashes and case are separators and folding; the context characters are refused', () => {
    expect(tokensOf('Structure of lateral adrenal gland, segment 5')).toEqual(['structure', 'of', 'lateral', 'adrenal', 'gland', 'segment', '5']);
    expect(tokensOf('  Ear (structure)/LEFT;  ')).toEqual(['ear', 'structure', 'left']);
    expect(tokensOf('')).toEqual([]);
    expect(tokensOf(' , ')).toEqual([]);
    for (const refused of ['0.5 mg', 'Rh+', 'HIV-1', "Crohn's disease", 'Ménière', 'naïve']) expect(tokensOf(refused)).toBeNull();
  });

  it('repeated tokens resolve once and keep their value', () => {
    const calls: string[] = [];
    const t = new AsciiTokens((token) => (calls.push(token), calls.length));
    const buf = Buffer.from('Lung lung LUNG, heart');
    expect(Array.from(t.out.subarray(0, t.tokens(buf, 0, buf.length)))).toEqual([1, 1, 1, 2]);
    expect(calls).toEqual(['lung', 'heart']);
    expect(t.size).toBe(2);
  });

  it('equals foldTerm split on spaces for every string it accepts (fast-check, 3,000 strings)', () => {
    const alphabet = fc.constantFrom(...'aZ09 ,()/:;_.+-\'"\u00e9\u00df\uff21\t'.split(''), 'ab', 'Cd', 'xyz');
    fc.assert(
      fc.property(fc.array(alphabet, { maxLength: 30 }).map((a) => a.join('')), (text) => {
        const got = tokensOf(text);
        const plain = /^[\x00-\x7f]*$/.test(text) && !/[.+\-']/.test(text);
        expect(got === null).toBe(!plain);
        if (got !== null) expect(got).toEqual(folded(text));
      }),
      { numRuns: 3000, seed: 20261202 },
    );
  });

  it('grows past its first table and arena sizes without losing a token', () => {
    const t = new AsciiTokens((token) => Number(token.slice(1)));
    for (let k = 0; k < 20_000; k++) {
      const buf = Buffer.from(`W${k} w${k}`);
      expect(Array.from(t.out.subarray(0, t.tokens(buf, 0, buf.length)))).toEqual([k, k]);
    }
    expect(t.size).toBe(20_000);
  });
});
