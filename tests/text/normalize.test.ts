/**
 * Tests of src/text/normalize.ts. Porter stems come from the published
 * examples; the folding rules are checked on cases that clinical terminology
 * work treats as the same term or as different terms (marked "common
 * practice"), and by property tests against a plain regular-expression
 * statement of the documented rules (an oracle for the hand-tuned loop).
 */

import fc from 'fast-check';
import { stemmer } from 'stemmer';
import { describe, expect, it } from 'vitest';
import {
  MATCH_LEVELS,
  STOP_WORDS,
  foldTerm,
  lexicalKey,
  normalizeAt,
  stemToken,
  tokenize,
  type MatchLevel,
} from '../../src/text/normalize.js';

/**
 * The folding rules of foldTerm's documentation, written as regular
 * expressions over the whole string with no fast path.
 */
function foldOracle(s: string): string {
  const t = s
    .normalize('NFKC')
    .toLowerCase()
    .replace(/ß/g, 'ss')
    .replace(/ς/g, 'σ')
    .normalize('NFD')
    .replace(/[\u0300-\u036f\u1ab0-\u1aff\u1dc0-\u1dff\u20d0-\u20ff\ufe20-\ufe2f]/g, '')
    .normalize('NFC');
  return t
    .replace(/(?<=[\p{L}\p{M}])['\u2019](?=[\p{L}\p{M}])/gu, '')
    .replace(
      // 1: a run of signs after a word character, not followed by one (the
      // lookahead-backreference makes the run atomic); 2: a kept decimal
      // point; otherwise any other character is a separator.
      /(?<=[\p{L}\p{N}\p{M}])(?=([+\-\u2010\u2011\u2212]+))\1(?![\p{L}\p{N}\p{M}])|((?<=^|\p{N}|[^\p{L}\p{N}\p{M}])\.(?=\p{N}))|[^\p{L}\p{N}\p{M}]/gu,
      (m: string, sign: string | undefined, dot: string | undefined) =>
        sign !== undefined ? m.replace(/[\u2010\u2011\u2212]/g, '-') : dot !== undefined ? '.' : ' ',
    )
    .replace(/ +/g, ' ')
    .trim();
}

const termLike = fc.string({
  unit: fc.constantFrom(
    'a', 'B', 'e', 'é', 'e\u0301', 'ß', 'Σ', 'ς', 'İ', 'ﬁ', 'Ａ', '²', '½', '㎎', 'क', 'ि', '😀', '\uD800',
    '0', '5', '.', ',', '+', '-', '\u2212', '\u2010', '\u2011', "'", '’', 'ʼ', ' ', '  ', '\t', '/', '(', ')',
  ),
  maxLength: 40,
});
const anyString = fc.oneof(termLike, fc.string({ unit: 'binary', maxLength: 40 }), fc.string({ maxLength: 40 }));
const RUNS = { numRuns: 3000 };

describe('foldTerm', () => {
  it('folds differences of case and punctuation only to the same string', () => {
    expect(foldTerm('Fracture of femur')).toBe('fracture of femur');
    expect(foldTerm('FRACTURE OF FEMUR')).toBe('fracture of femur');
    expect(foldTerm('Fracture, of femur.')).toBe('fracture of femur');
    expect(foldTerm('  Fracture   of\tfemur  ')).toBe('fracture of femur');
    expect(foldTerm('Fracture (of) femur')).toBe(foldTerm('fracture of femur'));
    expect(foldTerm('non-Hodgkin lymphoma')).toBe(foldTerm('Non Hodgkin lymphoma'));
  });

  it('applies NFKC: full-width letters, ligatures, unit symbols, superscripts', () => {
    expect(foldTerm('ＨＩＶ')).toBe('hiv'); // U+FF28 U+FF29 U+FF36
    expect(foldTerm('ﬁbrosis')).toBe('fibrosis'); // U+FB01 "ﬁ" ligature
    expect(foldTerm('5 ㎎')).toBe('5 mg'); // U+338E SQUARE MG
    expect(foldTerm('m²')).toBe('m2');
  });

  it('strips diacritics, composed or decomposed', () => {
    expect(foldTerm('Ménière disease')).toBe('meniere disease');
    expect(foldTerm('Me\u0301nie\u0300re disease')).toBe('meniere disease');
    expect(foldTerm('Sjögren syndrome')).toBe('sjogren syndrome');
    expect(foldTerm('Guillain–Barré')).toBe('guillain barre');
  });

  it('case-folds ß, final sigma and the dotted capital I', () => {
    expect(foldTerm('Straße')).toBe(foldTerm('STRASSE'));
    expect(foldTerm('ΟΔΟΣ')).toBe(foldTerm('οδος'));
    expect(foldTerm('İ')).toBe('i');
  });

  it('keeps the marks of scripts outside the Latin/Greek/Cyrillic diacritic blocks', () => {
    // Devanagari vowel sign I (U+093F) spells the word; it must not become a space.
    expect(foldTerm('हिन्दी')).toBe('हिन्दी');
  });

  it('drops an apostrophe inside a word', () => {
    expect(foldTerm("Crohn's disease")).toBe('crohns disease');
    expect(foldTerm('Crohn’s disease')).toBe('crohns disease');
  });

  // Common practice: these pairs name different things and must stay apart.
  it('keeps HIV-1 and HIV-2 apart', () => {
    expect(foldTerm('HIV-1')).toBe('hiv 1');
    expect(foldTerm('HIV-1')).not.toBe(foldTerm('HIV-2'));
  });

  it('keeps decimal points: 0.5 mg is not 5 mg, nor is .5 mg', () => {
    expect(foldTerm('0.5 mg')).toBe('0.5 mg');
    expect(foldTerm('0.5 mg')).not.toBe(foldTerm('5 mg'));
    expect(foldTerm('.5 mg')).not.toBe(foldTerm('5 mg'));
    expect(foldTerm('Fig.5')).toBe('fig 5'); // a dot after a letter is punctuation
  });

  it('keeps a trailing sign: Rh+, Rh- and Rh stay apart', () => {
    expect(foldTerm('Rh+')).toBe('rh+');
    expect(foldTerm('Rh−')).toBe('rh-'); // U+2212 MINUS SIGN written as "-"
    expect(new Set([foldTerm('Rh+'), foldTerm('Rh-'), foldTerm('Rh')]).size).toBe(3);
    expect(foldTerm('ER+/PR- carcinoma')).toBe('er+ pr- carcinoma');
  });

  it('keeps Type 1 and type 2 diabetes apart', () => {
    expect(foldTerm('Type 1 diabetes')).not.toBe(foldTerm('type 2 diabetes'));
  });

  it('returns the empty string for punctuation only', () => {
    expect(foldTerm('')).toBe('');
    expect(foldTerm(' - / () ')).toBe('');
  });

  it('agrees with a regular-expression statement of the rules', () => {
    fc.assert(
      fc.property(anyString, (s) => foldTerm(s) === foldOracle(s)),
      RUNS,
    );
  });

  it('is idempotent and yields single-spaced, trimmed output of kept characters', () => {
    fc.assert(
      fc.property(anyString, (s) => {
        const f = foldTerm(s);
        return (
          foldTerm(f) === f &&
          !f.startsWith(' ') &&
          !f.endsWith(' ') &&
          !f.includes('  ') &&
          /^[\p{L}\p{M}\p{N}.+\- ]*$/u.test(f)
        );
      }),
      RUNS,
    );
  });
});

describe('tokenize', () => {
  it('splits a folded string on spaces', () => {
    expect(tokenize('fracture of femur')).toEqual(['fracture', 'of', 'femur']);
    expect(tokenize('')).toEqual([]);
  });
});

describe('stemToken', () => {
  // snowballstem.org, "The Porter stemming algorithm": examples of the 1980
  // paper (step-level examples whose step result is also the full stem, then
  // full stems).
  it.each([
    ['caresses', 'caress'],
    ['ponies', 'poni'],
    ['cats', 'cat'],
    ['plastered', 'plaster'],
    ['motoring', 'motor'],
    ['hopping', 'hop'],
    ['filing', 'file'],
    ['relational', 'relat'],
    ['generalizations', 'gener'],
    ['abandoned', 'abandon'],
    ['abbreviated', 'abbrevi'],
  ])('%s → %s', (word, stem) => {
    expect(stemToken(word)).toBe(stem);
    expect(stemToken(word)).toBe(stem); // second call is served by the cache
  });

  it('returns the same as the stemmer package, cached or not', () => {
    const word = fc.string({ unit: fc.constantFrom(...'abcdefgilmnorstuyz'), minLength: 1, maxLength: 14 });
    fc.assert(
      fc.property(word, (w) => stemToken(w) === stemmer(w) && stemToken(w) === stemmer(w)),
      { numRuns: 2000 },
    );
  });

  it('leaves tokens with digits, signs or other scripts unchanged', () => {
    expect(stemToken('0.5')).toBe('0.5');
    expect(stemToken('rh+')).toBe('rh+');
    expect(stemToken('types1')).toBe('types1');
    expect(stemToken('νόσος')).toBe('νόσος');
  });
});

describe('STOP_WORDS', () => {
  it('keeps words that carry meaning in clinical terms', () => {
    // Common practice: negation and co-occurrence words change the concept;
    // "a" is a designation in "Hepatitis A", "Vitamin A".
    for (const w of ['a', 'or', 'with', 'without', 'no', 'not', 'non', 'from']) {
      expect(STOP_WORDS.has(w)).toBe(false);
    }
    for (const w of ['the', 'of', 'and', 'in']) expect(STOP_WORDS.has(w)).toBe(true);
  });
});

describe('lexicalKey', () => {
  it('ignores word order, inflection and stop words', () => {
    expect(lexicalKey('Fractures of femur')).toBe('femur fractur');
    expect(lexicalKey('Fractures of femur')).toBe(lexicalKey('femur fracture'));
    expect(lexicalKey('Fracture of the femur')).toBe(lexicalKey('Femur fractured'));
    expect(lexicalKey("Crohn's disease")).toBe(lexicalKey('Crohn disease'));
  });

  it('removes duplicate stems', () => {
    expect(lexicalKey('fracture fractures femur')).toBe('femur fractur');
  });

  // Common practice: each of these pairs names two different concepts.
  it.each([
    ['HIV-1 infection', 'HIV-2 infection'],
    ['0.5 mg', '5 mg'],
    ['.5 mg', '5 mg'],
    ['Type 1 diabetes', 'type 2 diabetes'],
    ['Hepatitis A', 'Hepatitis'],
    ['Pneumonia without effusion', 'Pneumonia with effusion'],
    ['Pneumonia with effusion', 'Pneumonia effusion'],
    ['Rh+', 'Rh-'],
    ['Rh-', 'Rh'],
    ['tibia or fibula', 'tibia and fibula'],
  ])('keeps %s and %s apart', (a, b) => {
    expect(lexicalKey(a)).not.toBe(lexicalKey(b));
  });

  it('keys a term made only of stop words by its folded form', () => {
    expect(lexicalKey('The')).toBe('the');
    expect(lexicalKey('Of the')).toBe('of the');
    expect(lexicalKey('')).toBe('');
    expect(lexicalKey(' ; ')).toBe('');
  });

  it('is invariant under shuffling the words and changing case, when a word is not a stop word', () => {
    // A term of stop words only is keyed by its folded form, word order included (the test above).
    const word = fc.string({ unit: fc.constantFrom(...'abcdefimnorstu'), minLength: 1, maxLength: 10 });
    fc.assert(
      fc.property(fc.array(word, { minLength: 1, maxLength: 8 }), fc.integer(), (words, seed) => {
        fc.pre(words.some((w) => !STOP_WORDS.has(w)));
        const shuffled = [...words];
        let x = seed;
        for (let i = shuffled.length - 1; i > 0; i--) {
          x = (Math.imul(x, 1103515245) + 12345) | 0;
          const j = Math.abs(x) % (i + 1);
          [shuffled[i], shuffled[j]] = [shuffled[j], shuffled[i]];
        }
        return lexicalKey(words.join(' ')) === lexicalKey(shuffled.join('  ').toUpperCase());
      }),
      { numRuns: 1000 },
    );
  });
});

describe('normalizeAt', () => {
  it('lists the levels strictest first', () => {
    expect(MATCH_LEVELS).toEqual(['term_id', 'exact', 'folded', 'lexical']);
  });

  it('applies the transformation of each level', () => {
    const s = 'Fractures of Fémur';
    expect(normalizeAt('term_id', 'T-0042 ')).toBe('T-0042 ');
    expect(normalizeAt('exact', s)).toBe(s);
    expect(normalizeAt('exact', 'Fe\u0301mur')).toBe('Fémur'); // canonical equivalence only
    expect(normalizeAt('exact', 'ＨＩＶ')).toBe('ＨＩＶ'); // compatibility forms are not folded
    expect(normalizeAt('folded', s)).toBe('fractures of femur');
    expect(normalizeAt('lexical', s)).toBe('femur fractur');
  });

  it('rejects an unknown level with the list of levels', () => {
    expect(() => normalizeAt('fuzzy' as MatchLevel, 'x')).toThrow(/term_id, exact, folded, lexical/);
  });
});
