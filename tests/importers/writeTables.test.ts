/**
 * Writing importer tables: tabs and line breaks never reach a field, a leading double quote
 * is written in RFC 4180 quotes (RFC 4180 section 2, rules 5–7), and termdrift's own loaders
 * read back exactly what was meant.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { renderTsv, tsvField, writeReleaseTables, type FieldTally } from '../../src/importers/writeTables.js';
import type { ReleaseRow } from '../../src/importers/types.js';
import { loadHistory, loadRelease } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';

const tally = (): FieldTally => ({ replacedControlChars: 0, quotedFields: 0 });

describe('tsvField', () => {
  it('replaces each tab, CR, LF and CR LF pair by one space and counts them', () => {
    const t = tally();
    expect(tsvField('a\tb\nc\r\nd\re', t)).toBe('a b c d e');
    expect(t.replacedControlChars).toBe(4);
    expect(t.quotedFields).toBe(0);
  });

  it('quotes a field that begins with a double quote, doubling inner quotes', () => {
    const t = tally();
    expect(tsvField('"Academic" variant', t)).toBe('"""Academic"" variant"');
    expect(tsvField('say "hi"', t)).toBe('say "hi"');
    expect(t.quotedFields).toBe(1);
  });

  it('writes nothing for absent or empty values', () => {
    const t = tally();
    expect(tsvField(undefined, t)).toBe('');
    expect(tsvField('', t)).toBe('');
  });
});

describe('writeReleaseTables', () => {
  const rows: ReleaseRow[] = [
    { concept_id: 'X:1', term: 'plain', term_type: 'preferred', status: 'active', category: 'c' },
    { concept_id: 'X:1', term: 'with\ttab and\nbreak', term_type: 'synonym', status: 'active', category: 'c' },
    { concept_id: 'X:2', term: '"quoted" start', term_type: 'preferred', status: 'inactive', category: 'c', language: 'en' },
    { concept_id: 'X:3', term: 'ends with "quote"', term_type: 'preferred', status: 'active', category: 'c', term_id: 'T3' },
  ];

  it('writes release.tsv and history.tsv that load back with every row and no diagnostics', async () => {
    const dir = tempDir();
    const w = await writeReleaseTables(dir, { release: rows, history: [{ old_id: 'X:2', new_id: 'X:1', relation: 'replaced_by' }] });
    expect(w.files).toEqual([join(dir, 'release.tsv'), join(dir, 'history.tsv')]);
    expect(w.counts).toEqual({ releaseRows: 4, hierarchyRows: 0, historyRows: 1, replacedControlChars: 2, quotedFields: 1 });
    const text = readFileSync(join(dir, 'release.tsv'), 'utf8');
    expect(text.split('\n')[0]).toBe('concept_id\tterm\tterm_type\tstatus\tcategory\tterm_id\tlanguage');
    expect(text.split('\n')).toHaveLength(6); // header, 4 rows, final LF

    const r = await loadRelease(join(dir, 'release.tsv'));
    expect(r.diagnostics).toEqual([]);
    expect(r.accounting).toMatchObject({ read: 4, used: 4, rejected: 0 });
    expect(r.termText).toEqual(['plain', 'with tab and break', '"quoted" start', 'ends with "quote"']);
    expect(Array.from(r.conceptStatus)).toEqual([0, 1, 0]);
    expect(r.termId[3]).toBe('T3');
    expect(r.languages[r.termLanguage[2]]).toBe('en');
    const h = await loadHistory(join(dir, 'history.tsv'));
    expect(h.diagnostics).toEqual([]);
    expect(h.accounting.used).toBe(1);
  });

  it('writes an empty history as its header alone, and hierarchy.tsv only when given', async () => {
    const dir = tempDir();
    const w = await writeReleaseTables(dir, { release: rows.slice(0, 1), hierarchy: [] });
    expect(w.files.map((f) => f.slice(dir.length + 1))).toEqual(['release.tsv', 'history.tsv', 'hierarchy.tsv']);
    expect(readFileSync(join(dir, 'history.tsv'), 'utf8')).toBe('old_id\tnew_id\trelation\n');
    expect(readFileSync(join(dir, 'hierarchy.tsv'), 'utf8')).toBe('concept_id\tparent_id\n');
  });

  it('renders rows under any header in the header order', () => {
    expect(renderTsv(['parent_id', 'concept_id'], [{ concept_id: 'a', parent_id: 'b' }], tally())).toBe('parent_id\tconcept_id\nb\ta\n');
  });
});
