/**
 * The term_id level of alignTerms (align/alignTerms.ts): the publisher's term identifiers link a
 * term across releases whatever its text, found through the ids' bytes when both releases keep
 * them, else through strings; the links must be the same either way. And the frontier: which
 * concepts are unchanged when the two releases number their values differently.
 */
import { describe, expect, it } from 'vitest';
import { alignTerms } from '../../src/align/alignTerms.js';
import { loadRelease, termTextAt, type Release } from '../../src/load/index.js';
import { tempDir, tsv, writeFile } from '../helpers/files.js';

const H = ['concept_id', 'term', 'term_type', 'term_id'];
const load = (rows: string[][], name: string) => loadRelease(writeFile(tempDir(), name, tsv([H, ...rows])), { order: 'canonical' });

/** The links as (old text, new text, level), sorted. */
function links(a: Release, b: Release): string[] {
  return alignTerms(a, b).links.map((l) => `${termTextAt(a, l.oldTerm)} → ${termTextAt(b, l.newTerm)} (${l.level})`).sort();
}

describe('alignTerms by term_id', () => {
  it('links a renamed term by its id, with or without byte storage on either side', async () => {
    const old = await load([
      ['C1', 'Heart attack', 'preferred', 'T1'],
      ['C1', 'Cardiac infarct', 'synonym', 'T2'],
      ['C2', 'Stroke', 'preferred', 'T3'],
      ['C2', 'Brain attack', 'synonym', ''],
      ['C3', 'Kidney stone', 'preferred', 'T9'],
    ], 'old.tsv');
    const next = await load([
      ['C1', 'Myocardial infarction', 'preferred', 'T1'],
      ['C2', 'Stroke', 'preferred', 'T3'],
      ['C2', 'Cardiac infarction', 'synonym', 'T2'],
      ['C2', 'Cerebrovascular accident', 'synonym', ''],
      ['C3', 'Renal calculus', 'preferred', 'T8'],
      ['C4', 'Nephrolith', 'preferred', 'T9'],
    ], 'new.tsv');
    const want = [
      'Cardiac infarct → Cardiac infarction (term_id)',
      'Heart attack → Myocardial infarction (term_id)',
      'Kidney stone → Nephrolith (term_id)',
      'Stroke → Stroke (term_id)',
    ];
    expect(links(old, next)).toEqual(want);
    // A copy made by spreading has no byte storage: the string path.
    expect(links({ ...old }, next)).toEqual(want);
    expect(links(old, { ...next })).toEqual(want);
    expect(links({ ...old }, { ...next })).toEqual(want);
  });

  it('two ids with the same hash are two ids', async () => {
    // 'C1000439599' and 'C1000622382' have the same 32-bit FNV-1a hash (tests/load/hierarchyGraph.test.ts).
    const old = await load([['C1', 'a', 'preferred', 'C1000439599']], 'old.tsv');
    const next = await load([['C2', 'x', 'preferred', 'C1000622382']], 'new.tsv');
    expect(links(old, next)).toEqual([]);
    expect(links({ ...old }, next)).toEqual([]);
  });

  it('of two new terms with one id, the later one is offered; empty ids never match', async () => {
    const old = await load([['C1', 'a', 'preferred', 'T1'], ['C1', 'b', 'synonym', '']], 'old.tsv');
    const next = await load([['C2', 'x', 'preferred', 'T1'], ['C3', 'y', 'preferred', 'T1'], ['C4', 'z', 'preferred', '']], 'new.tsv');
    expect(links(old, next)).toEqual(['a → y (term_id)']);
    expect(links({ ...old }, { ...next })).toEqual(['a → y (term_id)']);
  });
});

describe('the unchanged concepts (the frontier left out)', () => {
  const H2 = ['concept_id', 'term', 'term_type', 'category', 'language'];
  const load2 = (rows: string[][], name: string) => loadRelease(writeFile(tempDir(), name, tsv([H2, ...rows])), { order: 'canonical' });

  it('compares categories, term types and languages by value, whatever their order in each release', async () => {
    // The new release lists its values in another order (categories, types and languages are
    // numbered as first seen), so equal values have other indexes in the two releases.
    const old = await load2([
      ['C1', 'Anemia', 'preferred', 'disorder', 'en'],
      ['C1', 'Anaemia', 'synonym', 'disorder', 'en-GB'],
      ['C2', 'Hemoglobin', 'preferred', 'substance', 'en'],
      ['C3', 'Biopsy', 'preferred', 'procedure', 'en'],
      ['C4', 'Fever', 'preferred', 'finding', 'en'],
      ['C4', 'Pyrexia', 'synonym', 'finding', ''],
      ['C5', 'Cough', 'preferred', 'finding', 'en'],
      ['C6', 'Rash', 'preferred', 'finding', 'en'],
      ['C6', 'Exanthem', 'synonym', 'finding', 'en'],
      ['C7', 'Nausea', 'preferred', 'finding', 'en-GB'],
    ], 'old.tsv');
    const next = await load2([
      ['C7', 'Nausea', 'preferred', 'finding', 'en-GB'],
      ['C3', 'Biopsy', 'preferred', 'procedure', 'en'],
      ['C2', 'Hemoglobin', 'preferred', 'substance', 'en-GB'], // language changed
      ['C1', 'Anemia', 'preferred', 'disorder', 'en'],
      ['C1', 'Anaemia', 'synonym', 'disorder', 'en-GB'],
      ['C4', 'Fever', 'preferred', 'finding', 'en'],
      ['C4', 'Pyrexia', 'synonym', 'finding', 'en'], // no language before
      ['C5', 'Cough', 'preferred', 'disorder', 'en'], // category changed
      ['C6', 'Rash', 'preferred', 'finding', 'en'],
      ['C6', 'Exanthem', 'abbreviation', 'finding', 'en'], // term type changed
    ], 'new.tsv');
    expect(old.categories).not.toEqual(next.categories);
    expect(old.languages).not.toEqual(next.languages);
    const a = alignTerms(old, next);
    const ids = (r: Release, cs: readonly number[]) => cs.map((c) => r.conceptIds[c]).sort();
    expect(ids(old, a.oldFrontier)).toEqual(['C2', 'C4', 'C5', 'C6']);
    expect(ids(next, a.newFrontier)).toEqual(['C2', 'C4', 'C5', 'C6']);
    expect(a.unchangedConcepts).toBe(3);
  });
});
