/**
 * The storage behind a loaded release: lazy termText / termId / conceptIndex, single-value
 * readers, byte comparison across releases, and copies made by spreading a release.
 */
import { describe, expect, it } from 'vitest';
import { loadRelease, termTextAt, termIdAt, termTextEquals, conceptIndexOf, matchConceptIds, type Release } from '../../src/load/index.js';
import { tempDir, tsv, writeFile } from '../helpers/files.js';

const H = ['concept_id', 'term', 'term_type', 'term_id'];

async function load(rows: string[][], name = 'r.tsv', reader: 'bytes' | 'strings' = 'bytes'): Promise<Release> {
  return loadRelease(writeFile(tempDir(), name, tsv([H, ...rows])), { reader });
}

describe('lazy release properties', () => {
  it('reads single terms, then the full arrays, with the same values', async () => {
    const r = await load([['C1', 'Heart', 'preferred', 'T1'], ['C1', 'Heart', 'synonym', 'T9'], ['C1', 'Cœur', 'synonym', ''], ['C2', 'Lung', 'preferred', 'T3']]);
    // The duplicate (line 3) is dropped; the byte ranges of the terms after it move down with it.
    expect([0, 1, 2].map((t) => termTextAt(r, t))).toEqual(['Heart', 'Cœur', 'Lung']);
    expect([0, 1, 2].map((t) => termIdAt(r, t))).toEqual(['T1', '', 'T3']);
    expect(r.termText).toEqual(['Heart', 'Cœur', 'Lung']);
    expect(r.termId).toEqual(['T1', '', 'T3']);
    expect(r.termText).toBe(r.termText); // built once, then cached
    expect([...r.conceptIndex]).toEqual([['C1', 0], ['C2', 1]]);
    expect(Object.keys(r)).toEqual(expect.arrayContaining(['termText', 'termId', 'conceptIndex']));
  });

  it('an assigned array replaces the lazy one for every reader', async () => {
    const r = await load([['C1', 'Heart', 'preferred', 'T1'], ['C2', 'Lung', 'preferred', 'T2']]);
    const other = await load([['C1', 'Heart', 'preferred', 'T1'], ['C2', 'Lung', 'preferred', 'T2']]);
    expect(termTextEquals(r, 1, other, 1)).toBe(true);
    r.termText = ['Herz', 'Lunge'];
    r.termId = ['X1', 'X2'];
    expect(termTextAt(r, 1)).toBe('Lunge');
    expect(termIdAt(r, 0)).toBe('X1');
    expect(termTextEquals(r, 1, other, 1)).toBe(false);
    r.conceptIndex = new Map([['Z', 0]]);
    expect(conceptIndexOf(r, 'Z')).toBe(0);
    expect(conceptIndexOf(r, 'C1')).toBe(-1);
  });

  it('a release copied by spreading reads its own arrays, not the original bytes', async () => {
    const r = await load([['C1', 'Heart', 'preferred', 'T1'], ['C2', 'Lung', 'preferred', 'T2']]);
    const copy: Release = { ...r, termText: ['Lung'], termId: ['T2'], termCount: 1, conceptIds: ['C2'], conceptIndex: new Map([['C2', 0]]), conceptCount: 1 };
    expect(termTextAt(copy, 0)).toBe('Lung');
    expect(termIdAt(copy, 0)).toBe('T2');
    expect(conceptIndexOf(copy, 'C2')).toBe(0);
    expect(termTextEquals(copy, 0, r, 1)).toBe(true);
    expect(Array.from(matchConceptIds(copy, r))).toEqual([1]);
    expect(Array.from(matchConceptIds(r, copy))).toEqual([-1, 0]);
  });
});

describe('finding concepts and comparing terms across releases', () => {
  it('pairs concepts by id bytes, with and without byte storage on either side', async () => {
    const rows = [['B', 'b', '', ''], ['Ä', 'ä', '', ''], ['A', 'a', '', ''], ['C', 'c', '', '']];
    const a = await load(rows);
    const b = await load([['C', 'c', '', ''], ['A', 'a', '', ''], ['D', 'd', '', ''], ['Ä', 'ä', '', '']]);
    expect(Array.from(matchConceptIds(a, b))).toEqual([-1, 3, 1, 0]);
    const plain: Release = { ...b };
    expect(Array.from(matchConceptIds(a, plain))).toEqual([-1, 3, 1, 0]);
    expect(conceptIndexOf(a, 'Ä')).toBe(1);
    expect(conceptIndexOf(a, 'A\u0308')).toBe(-1); // another spelling of Ä (combining diaeresis) is another id
    expect(conceptIndexOf(a, '')).toBe(-1);
    expect(termTextEquals(a, 1, b, 3)).toBe(true);
    expect(termTextEquals(a, 1, plain, 3)).toBe(true);
    expect(termTextEquals(a, 0, b, 0)).toBe(false);
  });

  it('finds every concept of a large release through the table (growth and rehashing)', async () => {
    const rows: string[][] = [];
    for (let k = 0; k < 5000; k++) rows.push([`ID${(k * 7919) % 5000}`, `t${k}`, '', '']);
    const r = await load(rows);
    expect(r.conceptCount).toBe(5000);
    for (let c = 0; c < r.conceptCount; c += 97) expect(conceptIndexOf(r, r.conceptIds[c])).toBe(c);
    expect(conceptIndexOf(r, 'ID5000')).toBe(-1);
    const s = await load(rows, 'r.tsv', 'strings');
    expect(Array.from(matchConceptIds(r, s))).toEqual(Array.from({ length: 5000 }, (_, c) => c));
  });

  it('pairs concepts the same way whether ids came in order (merge, binary search) or not (hash table)', async () => {
    const id = (k: number) => `K${String(k).padStart(5, '0')}`;
    const sortedRows: string[][] = [];
    for (let k = 0; k < 3000; k += 2) sortedRows.push([id(k), `t${k}`, '', '']);
    // In order for 2,000 concepts, then one out of order: the table is built part way through.
    const lateRows = sortedRows.slice(0, 1000).concat([[id(1), 't1', '', '']], sortedRows.slice(1000));
    const threeRows: string[][] = [];
    for (let k = 0; k < 3005; k += 3) threeRows.push([id(k), `s${k}`, '', '']);
    const mixedRows: string[][] = [];
    for (let k = 0; k < 3000; k += 3) mixedRows.push([id((k * 7) % 3000), `m${k}`, '', '']);
    const releases = [await load(sortedRows), await load(threeRows), await load(lateRows), await load(mixedRows), await load(mixedRows, 'm.tsv', 'strings')];
    for (const a of releases) {
      for (const b of releases) {
        const expected = a.conceptIds.map((x) => b.conceptIds.indexOf(x));
        expect(Array.from(matchConceptIds(a, b))).toEqual(expected);
      }
      for (let k = 0; k < 3010; k += 7) expect(conceptIndexOf(a, id(k))).toBe(a.conceptIds.indexOf(id(k)));
    }
  });
});


describe('concept lookups after the canonical reorder', () => {
  const ids = (r: Release) => Array.from({ length: r.conceptCount }, (_, c) => r.conceptIds[c]);

  it('a file sorted by concept whose terms are not: every id is still found', async () => {
    const r = await loadRelease(writeFile(tempDir(), 'r.tsv', tsv([H, ['C1', 'b', 'synonym', 'T2'], ['C1', 'a', 'preferred', 'T1'], ['C2', 'c', 'preferred', 'T3']])), { order: 'canonical' });
    expect(ids(r)).toEqual(['C1', 'C2']);
    expect(termTextAt(r, 0)).toBe('a');
    expect(['C1', 'C2', 'C3'].map((id) => conceptIndexOf(r, id))).toEqual([0, 1, -1]);
  });

  it('terms out of order within sorted concepts are put in the order a full renumbering gives', async () => {
    // Concepts in id order with their terms together: only the terms within concepts are sorted
    // (canonicalOrder.ts, sortWithinConcepts). The same rows with the concepts reversed take the
    // full renumbering; every column must come out the same. Over 16 terms a concept, the merge sort.
    const columns = (r: Release) => ({
      ids: ids(r), start: Array.from(r.conceptTermStart), terms: Array.from(r.conceptTerms), concept: Array.from(r.termConcept), text: r.termText, id: r.termId,
      type: Array.from(r.termType), line: Array.from(r.termLine), status: Array.from(r.termStatus), language: Array.from(r.termLanguage),
    });
    const TYPE = ['preferred', 'synonym', 'abbreviation'];
    for (let seed = 1; seed <= 30; seed++) {
      let x = seed;
      const next = (n: number) => ((x = (Math.imul(x, 1103515245) + 12345) >>> 0) % n);
      const groups: string[][][] = [];
      for (let c = 0; c < 6; c++) {
        const count = c === 5 ? 20 : 1 + next(4);
        // Distinct texts, one preferred term; the rows shuffled, so the preferred term is seldom first.
        const rows = Array.from({ length: count }, (_, k) => [`C${c}`, `t${next(5)}${k}`, k === 0 ? 'preferred' : TYPE[1 + next(2)], next(2) ? `T${next(9)}` : '']);
        for (let k = count - 1; k > 0; k--) {
          const j = next(k + 1);
          [rows[k], rows[j]] = [rows[j], rows[k]];
        }
        groups.push(rows);
      }
      const rowsA = groups.flat();
      const rowsB = [...groups].reverse().flat();
      const sorted = await loadRelease(writeFile(tempDir(), 'a.tsv', tsv([H, ...rowsA])), { order: 'canonical' });
      const reversed = await loadRelease(writeFile(tempDir(), 'b.tsv', tsv([H, ...rowsB])), { order: 'canonical' });
      const a = columns(sorted);
      const b = columns(reversed);
      // Lines differ by layout: compare the rows each line points at instead.
      expect({ ...a, line: undefined }).toEqual({ ...b, line: undefined });
      expect(a.line.map((l) => rowsA[l - 2].join('\t'))).toEqual(b.line.map((l) => rowsB[l - 2].join('\t')));
    }
  });

  it('a file in no order: every id is found, and concepts pair across releases', async () => {
    const rows = [['C3', 'c', 'preferred', 'T3'], ['C1', 'a', 'preferred', 'T1'], ['C2', 'b', 'preferred', 'T2']];
    const r = await loadRelease(writeFile(tempDir(), 'r.tsv', tsv([H, ...rows])), { order: 'canonical' });
    const s = await loadRelease(writeFile(tempDir(), 's.tsv', tsv([H, ...[...rows].sort()])), { order: 'canonical' });
    expect(ids(r)).toEqual(['C1', 'C2', 'C3']);
    expect(['C1', 'C2', 'C3', 'C4'].map((id) => conceptIndexOf(r, id))).toEqual([0, 1, 2, -1]);
    expect([...matchConceptIds(r, s)]).toEqual([0, 1, 2]);
  });

  it('ids whose UTF-16 order differs from their byte order (a character above U+FFFF)', async () => {
    // Byte order: U+FF01 (EF BC 81) before U+1F600 (F0 9F 98 80); UTF-16 order: the surrogate
    // D83D before FF01. The file is in byte order, the canonical order is UTF-16's.
    const a = 'C\uFF01';
    const b = 'C\u{1F600}';
    const r = await loadRelease(writeFile(tempDir(), 'r.tsv', tsv([H, [a, 'x', 'preferred', 'T1'], [b, 'y', 'preferred', 'T2']])), { order: 'canonical' });
    expect(ids(r)).toEqual([b, a]);
    expect([conceptIndexOf(r, a), conceptIndexOf(r, b), conceptIndexOf(r, 'C')]).toEqual([1, 0, -1]);
  });
});
