import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { readTable } from '../../src/load/readTable.js';
import { RowLedger } from '../../src/load/ledger.js';
import { InputError } from '../../src/errors.js';
import { tempDir, writeFile } from '../helpers/files.js';

async function read(name: string, content: string | Buffer, options = {}) {
  const dir = tempDir();
  const path = writeFile(dir, name, content);
  const ledger = new RowLedger(path);
  const rows: { fields: string[]; line: number }[] = [];
  let header: string[] = [];
  const info = await readTable(path, ledger, {
    header: (f) => { header = f; },
    row: (fields, line) => { rows.push({ fields, line }); },
  }, options);
  return { path, info, rows, header, ledger, accounting: ledger.finish() };
}

describe('readTable', () => {
  it('reads TSV with LF and CRLF line ends and a BOM', async () => {
    const r = await read('a.tsv', '\uFEFFconcept_id\tterm\r\nC1\tHeart\r\nC2\tLung\r\n');
    expect(r.header).toEqual(['concept_id', 'term']);
    expect(r.rows.map((x) => x.fields)).toEqual([['C1', 'Heart'], ['C2', 'Lung']]);
    expect(r.rows.map((x) => x.line)).toEqual([2, 3]);
    expect(r.accounting).toMatchObject({ read: 2, used: 2, rejected: 0 });
  });

  it('sniffs the delimiter when the extension does not say', async () => {
    const r = await read('a.txt', 'concept_id,term\nC1,Heart\n');
    expect(r.info.delimiter).toBe(',');
    expect(r.rows[0].fields).toEqual(['C1', 'Heart']);
  });

  it('reads gzip by its magic bytes and hashes the stored bytes', async () => {
    const r = await read('a.tsv.gz', 'concept_id\tterm\nC1\tHeart\n');
    expect(r.info.compressed).toBe(true);
    expect(r.rows).toHaveLength(1);
    expect(r.info.sha256).toBe(createHash('sha256').update(readFileSync(r.path)).digest('hex'));
  });

  it('parses RFC 4180 quoting in CSV, including embedded delimiters, quotes and newlines', async () => {
    const r = await read('a.csv', 'concept_id,term\nC1,"Fracture, femur"\nC2,"He said ""ouch"""\nC3,"two\nlines"\nC4,plain\n');
    expect(r.rows.map((x) => x.fields[1])).toEqual(['Fracture, femur', 'He said "ouch"', 'two\nlines', 'plain']);
    expect(r.rows.map((x) => x.line)).toEqual([2, 3, 4, 6]);
  });

  it('treats quotes inside TSV fields as literal characters', async () => {
    const r = await read('a.tsv', 'concept_id\tterm\nC1\t5" dressing\nC2\t"Pink" lady\nC3\t"quoted"\n');
    expect(r.rows.map((x) => x.fields[1])).toEqual(['5" dressing', '"Pink" lady', 'quoted']);
  });

  it('rejects rows with the wrong number of fields, naming line and column', async () => {
    const r = await read('a.tsv', 'concept_id\tterm\tcategory\nC1\tHeart\nC2\tLung\tbody\textra\nC3\tLiver\tbody\n');
    expect(r.rows.map((x) => x.fields[0])).toEqual(['C3']);
    expect(r.ledger.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([
      ['field_count', 2, 3],
      ['field_count', 3, 4],
    ]);
    expect(r.accounting).toMatchObject({ read: 3, used: 1, rejected: 2 });
  });

  it('rejects an unclosed quote and reads the following lines again as rows', async () => {
    const r = await read('a.csv', 'concept_id,term\nC1,"Heart\nC2,Lung\nC3,Liver\n');
    expect(r.ledger.diagnostics.map((d) => [d.code, d.line])).toEqual([['unbalanced_quote', 2]]);
    expect(r.rows.map((x) => [x.fields[0], x.line])).toEqual([['C2', 3], ['C3', 4]]);
    expect(r.accounting).toMatchObject({ read: 3, used: 2, rejected: 1 });
  });

  it('rejects NUL bytes and invalid UTF-8 per row with the column', async () => {
    const bytes = Buffer.concat([
      Buffer.from('concept_id\tterm\nC1\tok\nC2\tbad'),
      Buffer.from([0xff, 0xfe, 0x41]),
      Buffer.from('\nC3\tnul\u0000here\n'),
    ]);
    const r = await read('a.tsv', bytes);
    expect(r.ledger.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([
      ['invalid_utf8', 3, 2],
      ['nul_byte', 4, 2],
    ]);
    expect(r.accounting).toMatchObject({ read: 3, used: 1, rejected: 2 });
  });

  it('counts blank lines apart from rows', async () => {
    const r = await read('a.tsv', 'concept_id\tterm\n\nC1\tHeart\n\n\nC2\tLung');
    expect(r.rows.map((x) => x.line)).toEqual([3, 6]);
    expect(r.accounting).toMatchObject({ read: 2, used: 2, blankLines: 3 });
  });

  it('collects a # metadata block before the header when asked', async () => {
    const r = await read('a.sssom.tsv', '# curie_map:\n#   X: http://x/\nsubject_id\tobject_id\nA\tX:1\n', { metadata: true });
    expect(r.info.metadataLines).toEqual(['# curie_map:', '#   X: http://x/']);
    expect(r.header).toEqual(['subject_id', 'object_id']);
  });

  it('rejects an over-long field', async () => {
    const r = await read('a.tsv', `concept_id\tterm\nC1\t${'x'.repeat(70000)}\nC2\tok\n`);
    expect(r.ledger.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([['field_too_long', 2, 2]]);
    expect(r.accounting).toMatchObject({ read: 2, used: 1, rejected: 1 });
  });

  it.each([
    ['empty file', '', 'empty_file'],
    ['UTF-16 with BOM', Buffer.from('\uFEFFconcept_id\tterm\n', 'utf16le'), 'encoding'],
    ['UTF-16 without BOM', Buffer.from('concept_id\tterm\nC1\tHeart\n', 'utf16le'), 'encoding'],
    ['binary', Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919) % 256)), 'binary_file'],
  ])('refuses a whole file: %s', async (_name, content, code) => {
    await expect(read('a.tsv', content as string | Buffer)).rejects.toMatchObject({ code });
    await expect(read('a.tsv', content as string | Buffer)).rejects.toBeInstanceOf(InputError);
  });

  it('refuses a missing file and a folder', async () => {
    const ledger = new RowLedger('x');
    const sink = { header() {}, row() {} };
    await expect(readTable('/nonexistent/file.tsv', ledger, sink)).rejects.toMatchObject({ code: 'file_not_found' });
    await expect(readTable(tempDir(), ledger, sink)).rejects.toMatchObject({ code: 'not_a_file' });
  });

  it('reads a file larger than one chunk without losing rows at chunk boundaries', async () => {
    const n = 60000;
    const lines = ['concept_id\tterm'];
    for (let i = 0; i < n; i++) lines.push(`C${i}\tTerm number ${i} ü`);
    const r = await read('big.tsv', lines.join('\n') + '\n');
    expect(r.rows).toHaveLength(n);
    expect(r.rows[n - 1].fields).toEqual([`C${n - 1}`, `Term number ${n - 1} ü`]);
    expect(r.rows[12345].line).toBe(12347);
  });
});
