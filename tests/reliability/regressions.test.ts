/**
 * Inputs that once broke a reader, kept as files in tests/reliability/regressions/ with what
 * each must now give (EXPECTED.tsv: rows read, rejected rows as code@line, and what failed before
 * the fix). Each also keeps the invariants of inputCheck.ts (no crash, exact accounting, the
 * byte reader and the string path alike). A file the fuzz test saves (FUZZ_SAVE=1) fails here
 * until its expectation is written into the table.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parse as parseCsvSync } from 'csv-parse/sync';
import type { TableKind } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';
import { checkInput } from './inputCheck.js';

const DIR = resolve('tests/reliability/regressions');
const TABLE = (parseCsvSync(readFileSync(join(DIR, 'EXPECTED.tsv')), { delimiter: '\t', columns: true, quote: false }) as Record<string, string>[]);

describe('regression files', () => {
  it('every file has its expectation in EXPECTED.tsv', () => {
    const files = readdirSync(DIR).filter((f) => f !== 'EXPECTED.tsv').sort();
    expect(files).toEqual(TABLE.map((r) => r.file).sort());
  });

  it.each(TABLE.map((r) => [r.file, r] as const))('%s', async (file, r) => {
    const outcome = await checkInput(tempDir('termdrift-regression-'), file, r.kind as TableKind, readFileSync(join(DIR, file)));
    expect('loaded' in outcome, JSON.stringify(outcome)).toBe(true);
    if (!('loaded' in outcome)) return;
    expect(outcome.loaded.accounting.read).toBe(Number(r.read));
    expect(outcome.loaded.diagnostics.filter((d) => d.rejected).map((d) => `${d.code}@${d.line}`).join(' ')).toBe(r.rejected);
  });
});
