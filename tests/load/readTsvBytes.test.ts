/**
 * The byte reader against the string path: a release loaded from bytes (readTsvBytes +
 * ReleaseBuilder.rowBytes) must be the release the string path (readTable + ReleaseBuilder.row)
 * makes of the same file — every column, every diagnostic, the accounting — on tricky files and
 * on random ones (fast-check), with small blocks so that lines and UTF-8 sequences are cut
 * across blocks.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parse as parseCsvSync } from 'csv-parse/sync';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { readTsvBytes } from '../../src/load/readTsvBytes.js';
import { RowLedger } from '../../src/load/ledger.js';
import { loadRelease, termTextAt, termIdAt, conceptIndexOf, type Release } from '../../src/load/index.js';
import { tempDir, writeFile } from '../helpers/files.js';

/** Everything a release holds, in plain data, read the way consumers read it. */
function contents(r: Release) {
  // Single values first, before the lazy arrays exist.
  const textAt = Array.from({ length: r.termCount }, (_, t) => termTextAt(r, t));
  const idAt = Array.from({ length: r.termCount }, (_, t) => termIdAt(r, t));
  const indexOf = r.conceptIds.map((id) => conceptIndexOf(r, id));
  return {
    sha256: r.sha256,
    label: r.label,
    accounting: r.accounting,
    diagnostics: r.diagnostics,
    conceptCount: r.conceptCount,
    conceptIds: r.conceptIds,
    conceptIndex: [...r.conceptIndex.entries()],
    indexOf,
    conceptStatus: Array.from(r.conceptStatus),
    conceptCategory: Array.from(r.conceptCategory),
    conceptLine: Array.from(r.conceptLine),
    categories: r.categories,
    termCount: r.termCount,
    termConcept: Array.from(r.termConcept),
    termText: r.termText,
    textAt,
    termType: Array.from(r.termType),
    termTypes: r.termTypes,
    termId: r.termId,
    idAt,
    termLanguage: Array.from(r.termLanguage),
    languages: r.languages,
    termStatus: Array.from(r.termStatus),
    termLine: Array.from(r.termLine),
    conceptTermStart: Array.from(r.conceptTermStart),
    conceptTerms: Array.from(r.conceptTerms),
    hasColumn: r.hasColumn,
  };
}

/** Load with both paths; either both throw the same error or both give the same contents. */
async function bothPaths(path: string, byteOptions: { blockSize?: number; readSize?: number } = {}) {
  const load = async (options: Parameters<typeof loadRelease>[1]) => {
    try {
      return { release: await loadRelease(path, options) };
    } catch (err) {
      const e = err as { code?: string; message?: string; location?: unknown };
      return { error: { code: e.code, message: e.message, location: e.location } };
    }
  };
  const strings = await load({ reader: 'strings' });
  const bytes = await load({ reader: 'bytes', ...byteOptions });
  return {
    strings: strings.release ? contents(strings.release) : strings.error,
    bytes: bytes.release ? contents(bytes.release) : bytes.error,
    release: bytes.release,
  };
}

/** Block and read sizes: the defaults, then blocks so small that most lines cross a block end. */
const SIZES: [number | undefined, number | undefined][] = [[undefined, undefined], [1, 3], [2, 3], [3, 3], [5, 3], [7, 3], [16, 3], [61, 3]];

async function expectSame(name: string, content: string | Buffer, sizes = SIZES) {
  const path = writeFile(tempDir(), name, content);
  let release: Release | undefined;
  for (const [blockSize, readSize] of sizes) {
    const r = await bothPaths(path, { blockSize, readSize });
    expect(r.bytes, `block size ${blockSize}, read size ${readSize}`).toEqual(r.strings);
    release = r.release;
  }
  return release!;
}

const H = 'concept_id\tterm\tterm_type\tstatus\tcategory\tterm_id\tlanguage';

describe('readTsvBytes and the string path give the same release', () => {
  it('CRLF line ends and a UTF-8 byte order mark', async () => {
    const r = await expectSame('crlf.tsv', `\uFEFF${H}\r\nC1\tHeart attack\tpreferred\tactive\tdisorder\tT1\ten\r\nC1\tMI\tsynonym\tactive\tdisorder\tT2\ten\r\nC2\tLung\tpreferred\t\tbody\tT3\ten\r\n`);
    expect(r.termText).toEqual(['Heart attack', 'MI', 'Lung']);
    expect(r.termId).toEqual(['T1', 'T2', 'T3']);
    expect(r.diagnostics).toEqual([]);
  });

  it('multi-byte UTF-8 cut across blocks, and a last line without a line end', async () => {
    const r = await expectSame('utf8.tsv', `${H}\nÇ1\tHerzinfarkt äöü\tpreferred\tactive\tErkrankung\tT1\tde\nÇ1\t心筋梗塞\tsynonym\tactive\tErkrankung\tT2\tja\nÇ2\t🫀 emoji heart\tpreferred\tactive\tKörper\tT3\ten`);
    expect(r.conceptIds).toEqual(['Ç1', 'Ç2']);
    expect(r.termText).toEqual(['Herzinfarkt äöü', '心筋梗塞', '🫀 emoji heart']);
    expect(r.categories).toEqual(['Erkrankung', 'Körper']);
  });

  it('quoted fields in TSV, including a tab and a line break inside quotes, and an unclosed quote', async () => {
    const r = await expectSame('quoted.tsv', [
      H,
      'C1\t"Heart attack"\tpreferred\tactive\tdisorder\tT1\ten',
      'C1\t"with\ttab"\tsynonym\tactive\tdisorder\tT2\ten',
      'C1\t"two',
      'lines"\tsynonym\tactive\tdisorder\tT3\ten',
      'C2\t5" dressing\tpreferred\tactive\tdevice\tT4\ten',
      'C3\t"never closed\tpreferred\tactive\tdevice\tT5\ten',
      'C3\tafter the open quote\tsynonym\tactive\tdevice\tT6\ten',
      '',
    ].join('\n'));
    expect(r.termText).toContain('with\ttab');
    expect(r.termText).toContain('two\nlines');
    expect(r.termText).toContain('5" dressing');
  });

  it('invalid UTF-8 on one row, NUL on another, U+FFFD written out on a third', async () => {
    const r = await expectSame('bad.tsv', Buffer.concat([
      Buffer.from(`${H}\nC1\tgood ü\tpreferred\tactive\tdisorder\tT1\ten\nC2\tbad `),
      Buffer.from([0xc3, 0x28]),
      Buffer.from('\tpreferred\tactive\tdisorder\tT2\ten\nC3\tnul\u0000here\tpreferred\tactive\tdisorder\tT3\ten\nC4\treplacement \uFFFD\tpreferred\tactive\tdisorder\tT4\ten\nC5\tfine é\tpreferred\tactive\tdisorder\tT5\ten\n'),
    ]));
    expect(r.diagnostics.map((d) => [d.line, d.code, d.column])).toEqual([[3, 'invalid_utf8', 2], [4, 'nul_byte', 2], [5, 'invalid_utf8', 2]]);
    expect(r.conceptIds).toEqual(['C1', 'C5']);
  });

  it('wrong field counts, blank lines, a lone carriage return', async () => {
    const r = await expectSame('counts.tsv', `${H}\nC1\tHeart\tpreferred\tactive\tdisorder\tT1\nC2\tLung\tpreferred\tactive\tbody\tT2\ten\textra\n\n\r\nC3\tLiver\tpreferred\tactive\tbody\tT3\ten\n\r`);
    expect(r.diagnostics.map((d) => [d.line, d.code, d.column])).toEqual([[2, 'field_count', 7], [3, 'field_count', 8]]);
    expect(r.accounting).toMatchObject({ read: 3, used: 1, rejected: 2, blankLines: 3 });
  });

  it('duplicate terms, two preferred terms, conflicting status and category, bad values', async () => {
    const r = await expectSame('checks.tsv', [
      H,
      'C1\tHeart attack\tpreferred\tactive\tdisorder\tT1\ten',
      'C1\tHeart attack\tsynonym\tactive\tdisorder\tT2\ten', // duplicate
      'C1\tHeart attack\tsynonym\tactive\tdisorder\tT2b\tde', // other language: kept
      'C1\tCardiac infarction\tpreferred\tactive\tdisorder\tT3\ten', // second preferred
      'C1\tMI\tsynonym\tinactive\tfinding\tT4\ten', // conflicting status and category
      'C2\tLung\tpreferred\tmaybe\tbody\tT5\ten', // bad status
      'C2\tLung\tabbrev\tactive\tbody\tT6\ten', // new term type
      'C2\tLungs\tAbbrev\tRETIRED\tbody\tT7\ten',
      '  C3 \t  padded term \t preferred \t active \t body \t T8 \t en ', // padded values
      'C3\tnbsp\u00a0\tsynonym\tactive\tbody\tT9\t ', // language of one space
      '\tno concept\tsynonym\tactive\tbody\tT10\ten',
      'C4\t\tsynonym\tactive\tbody\tT11\ten',
      '',
    ].join('\n'));
    expect(r.diagnostics.map((d) => [d.line, d.code])).toEqual([
      [3, 'duplicate_row'], [5, 'two_preferred'], [6, 'conflicting_status'], [6, 'conflicting_category'],
      [7, 'bad_value'], [9, 'conflicting_status'], [12, 'empty_required'], [13, 'empty_required'],
    ]);
    expect(r.conceptIds).toEqual(['C1', 'C2', 'C3']);
    expect(r.termTypes).toEqual(['preferred', 'synonym', 'abbrev', 'Abbrev']);
    expect(r.termText[r.termText.length - 2]).toBe('padded term');
    expect(r.languages).toEqual(['en', 'de', '']);
  });

  it('a concept with many terms (the Map path of the duplicate check) and rows not grouped by concept', async () => {
    const rows = [H];
    for (let k = 0; k < 40; k++) rows.push(`C${k % 3}\tterm ${k % 25}\tsynonym\tactive\tbody\tT${k}\ten`);
    await expectSame('many.tsv', rows.join('\n') + '\n');
  });

  it('over-long fields, and a long line whose fields each fit', async () => {
    const wide = 'é'.repeat(40000); // 80,000 bytes but 40,000 characters: within the limit
    await expectSame('long.tsv', `${H}\nC1\t${'x'.repeat(70000)}\tpreferred\tactive\tbody\tT1\ten\nC2\t${wide}\tpreferred\tactive\t${'y'.repeat(30000)}\tT2\ten\nC3\tok\tpreferred\tactive\tbody\tT3\ten\n`, [[undefined, undefined], [1000, 4096], [65536, 7000]]);
  });

  it('gzip input, a CSV release (read by the string path throughout) and header errors', async () => {
    await expectSame('r.tsv.gz', `${H}\nC1\tHeart ü\tpreferred\tactive\tdisorder\tT1\ten\n`);
    await expectSame('r.csv', 'concept_id,term,term_type\nC1,"Fracture, femur",preferred\nC1,plain,synonym\n');
    await expectSame('r.txt', 'concept_id\tterm\nC1\tsniffed as TSV\n');
    await expectSame('empty.tsv', '');
    await expectSame('nohead.tsv', 'code\tterm\nC1\tx\n');
    await expectSame('bomonly.tsv', '\uFEFF');
  });
});

// Building blocks for random release files: values that exercise every branch of rowBytes.
const idValue = fc.constantFrom('C1', 'C2', 'C3', 'Ç4', ' C1', 'C2 ', '');
const textValue = fc.oneof(
  fc.constantFrom('Heart', 'heart', 'Herz ü', '"quoted"', 'a "b" c', '', ' pad ', 'x\u00a0', 'rep\uFFFD', 'nul\u0000', '"open', 'close"', '心'),
  fc.string({ maxLength: 6 }).map((s) => s.replace(/[\t\n\r]/g, ' ')),
);
const typeValue = fc.constantFrom('preferred', 'synonym', '', 'Preferred', 'abbrev', ' synonym', 'PREFERRED', 'x');
const statusValue = fc.constantFrom('active', 'inactive', '', 'retired', 'maybe', 'Active', ' active', '0');
const categoryValue = fc.constantFrom('disorder', 'finding', '', 'Body', ' body');
const termIdValue = fc.constantFrom('T1', 'T2', '', ' T3', 'T4');
const languageValue = fc.constantFrom('en', 'de', '', ' ', 'fr');

const OPTIONAL = ['term_type', 'status', 'category', 'term_id', 'language', 'term_status'] as const;
const VALUE_OF: Record<string, fc.Arbitrary<string>> = {
  concept_id: idValue, term: textValue, term_type: typeValue, status: statusValue, term_status: statusValue,
  category: categoryValue, term_id: termIdValue, language: languageValue, note: fc.constantFrom('', 'n'),
};

/** A random release file: a header of some columns in some order, rows, and line-level damage. */
const releaseFile = fc
  .tuple(fc.subarray([...OPTIONAL, 'note']), fc.boolean())
  .chain(([optional, shuffle]) => {
    const columns = ['concept_id', 'term', ...optional];
    if (shuffle) columns.reverse();
    const row = fc.tuple(...columns.map((c) => VALUE_OF[c])).map((f) => f.join('\t'));
    const line = fc.oneof(
      { weight: 8, arbitrary: row },
      { weight: 1, arbitrary: row.map((l) => l + '\textra') },
      { weight: 1, arbitrary: row.map((l) => l.slice(0, l.lastIndexOf('\t') < 0 ? 0 : l.lastIndexOf('\t'))) },
      { weight: 1, arbitrary: fc.constantFrom('', '\r', '"', 'C9\t"multi', 'line"') },
    );
    return fc.record({
      header: fc.constant(columns.join('\t')),
      lines: fc.array(line, { maxLength: 25 }),
      crlf: fc.boolean(),
      bom: fc.boolean(),
      finalNewline: fc.boolean(),
      damage: fc.array(fc.tuple(fc.nat(), fc.constantFrom([0xff], [0xc3], [0xe2, 0x82], [0x00], [0xed, 0xa0, 0x80])), { maxLength: 2 }),
    });
  })
  .map(({ header, lines, crlf, bom, finalNewline, damage }) => {
    const eol = crlf ? '\r\n' : '\n';
    let text = (bom ? '\uFEFF' : '') + [header, ...lines].join(eol) + (finalNewline ? eol : '');
    let bytes = Buffer.from(text, 'utf8');
    for (const [at, inserted] of damage) {
      const k = bytes.length === 0 ? 0 : at % bytes.length;
      bytes = Buffer.concat([bytes.subarray(0, k), Buffer.from(inserted), bytes.subarray(k)]);
    }
    text = '';
    return bytes;
  });

describe('readTsvBytes on random release files', () => {
  it('gives the string path\'s release for any file and any block size (fast-check)', async () => {
    const dir = tempDir();
    let n = 0;
    await fc.assert(
      fc.asyncProperty(releaseFile, fc.integer({ min: 1, max: 40 }), fc.integer({ min: 1, max: 9 }), async (bytes, blockSize, readSize) => {
        const path = writeFile(dir, `p${n++}.tsv`, bytes);
        const r = await bothPaths(path, { blockSize, readSize });
        expect(r.bytes).toEqual(r.strings);
      }),
      { numRuns: 300 },
    );
  });
});

describe('readTsvBytes against outside references', () => {
  it('splits plain TSV records as csv-parse does', async () => {
    // Reference: csv-parse (adaltas/node-csv) with a tab delimiter and quoting off, the
    // library the string path uses for quoted records.
    const rows = [H];
    for (let k = 0; k < 200; k++) rows.push(`K${k >> 2}\tterm ${k} ${'x'.repeat(k % 17)} é\t${k % 4 ? 'synonym' : 'preferred'}\tactive\tcat${k % 3}\tT${k}\t${k % 2 ? 'en' : 'de'}`);
    const text = rows.join('\n') + '\n';
    const path = writeFile(tempDir(), 'ref.tsv', text);
    const r = await loadRelease(path, { blockSize: 37, readSize: 11 });
    const records = parseCsvSync(text, { delimiter: '\t', quote: false, from_line: 2 }) as string[][];
    expect(r.conceptIds).toEqual([...new Set(records.map((f) => f[0]))]);
    expect(r.termText).toEqual(records.map((f) => f[1]));
    expect(r.termId).toEqual(records.map((f) => f[5]));
    expect(r.categories).toEqual([...new Set(records.map((f) => f[4]))]);
  });

  it('rejects exactly the rows that a fatal UTF-8 decoder refuses', async () => {
    // Ill-formed sequences as listed in the Unicode Standard, ch. 3.9, Table 3-7 (well-formed
    // UTF-8 byte sequences; from memory): overlong C0 80, a surrogate ED A0 80, a truncated
    // E2 82, a code point above U+10FFFF F4 90 80 80, a lone continuation byte 80, F8 88 80 80 80.
    // Reference decoder: WHATWG Encoding Standard UTF-8 decoder (TextDecoder with fatal: true).
    const bad = [[0xc0, 0x80], [0xed, 0xa0, 0x80], [0xe2, 0x82], [0xf4, 0x90, 0x80, 0x80], [0x80], [0xf8, 0x88, 0x80, 0x80, 0x80]];
    const good = [[0xc3, 0xa9], [0xe2, 0x82, 0xac], [0xf0, 0x9f, 0xab, 0x80], [0xf4, 0x8f, 0xbf, 0xbf]];
    const parts = [Buffer.from('concept_id\tterm\n')];
    const samples = [...bad, ...good];
    samples.forEach((seq, k) => parts.push(Buffer.from(`C${k}\tv `), Buffer.from(seq), Buffer.from(' w\n')));
    const path = writeFile(tempDir(), 'utf8.tsv', Buffer.concat(parts));
    const r = await loadRelease(path, { blockSize: 5, readSize: 2 });
    const fatal = new TextDecoder('utf-8', { fatal: true });
    const refused = samples.map((seq) => {
      try {
        fatal.decode(Uint8Array.from(seq));
        return false;
      } catch {
        return true;
      }
    });
    expect(r.diagnostics.filter((d) => d.code === 'invalid_utf8').map((d) => d.line)).toEqual(samples.map((_, k) => k + 2).filter((_, k) => refused[k]));
    expect(refused.filter(Boolean)).toHaveLength(bad.length);
    expect(r.termText).toEqual(good.map((seq) => `v ${Buffer.from(seq).toString('utf8')} w`));
  });
});

describe('readTsvBytes hashing', () => {
  it('gives the SHA-256 of the stored bytes, hashed on the main thread or in a worker thread over shared blocks', async () => {
    const rows = ['concept_id\tterm'];
    for (let k = 0; k < 3000; k++) rows.push(`C${k}\tterm ${k} é`);
    const path = writeFile(tempDir(), 'h.tsv', rows.join('\n') + '\n');
    const expected = createHash('sha256').update(readFileSync(path)).digest('hex');
    for (const hashInThreadFrom of [0, Infinity]) {
      for (const blockSize of [undefined, 1000]) {
        const blocks: Buffer[] = [];
        let records = 0;
        const info = await readTsvBytes(path, new RowLedger(path), { header() {}, row() { records++; }, rowBytes() { records++; } }, { blocks, blockSize, readSize: 777, hashInThreadFrom });
        expect(info.sha256).toBe(expected);
        expect(records).toBe(3000);
        expect(blocks[0].buffer instanceof SharedArrayBuffer).toBe(hashInThreadFrom === 0);
      }
    }
    // A whole-file error while the worker runs still ends it (the test would not finish otherwise).
    const bad = writeFile(tempDir(), 'bad.tsv', '');
    await expect(readTsvBytes(bad, new RowLedger(bad), { header() {}, row() {}, rowBytes() {} }, { blocks: [], hashInThreadFrom: 0 })).rejects.toMatchObject({ code: 'empty_file' });
  });
});
