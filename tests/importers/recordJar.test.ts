/**
 * The record-jar reader, checked against the grammar of RFC 5646 section 3.1.1 (records
 * separated by "%%", `field-name field-sep field-body`, continuation lines beginning with
 * white space) on small texts built here.
 */
import { describe, expect, it } from 'vitest';
import { parseRecordJar } from '../../src/importers/recordJar.js';

function accountedFor(acc: ReturnType<typeof parseRecordJar>['accounting']): number {
  return acc.fieldLines + acc.continuationLines + acc.separatorLines + acc.blankLines + acc.rejectedLines;
}

describe('parseRecordJar', () => {
  it('splits records at %% and keeps fields in order, repeated names included', () => {
    const text = 'File-Date: 2020-01-01\n%%\nType: language\nSubtag: xx\nDescription: One\nDescription: Two\n%%\nType: region\nSubtag: QQ\nDescription: Three\n';
    const r = parseRecordJar(text, { file: 'reg.txt' });
    expect(r.records.map((rec) => rec.line)).toEqual([1, 3, 8]);
    expect(r.records[1].fields.map((f) => [f.name, f.value])).toEqual([
      ['Type', 'language'],
      ['Subtag', 'xx'],
      ['Description', 'One'],
      ['Description', 'Two'],
    ]);
    expect(r.diagnostics).toEqual([]);
    expect(r.accounting).toEqual({ lines: 10, fieldLines: 8, continuationLines: 0, separatorLines: 2, blankLines: 0, rejectedLines: 0 });
  });

  it('unfolds continuation lines (leading space or tab) into one value joined by single spaces', () => {
    // RFC 5646 3.1.1: field-body = *([[*SP CRLF] 1*SP] 1*CHARS) — folding white space separates runs of CHARS.
    const text = 'Type: variant\nSubtag: abcd\nComments: The first part   \n   of a long comment\n\tand a tab-indented end\nDescription: x\n';
    const r = parseRecordJar(text);
    const comments = r.records[0].fields.find((f) => f.name === 'Comments');
    expect(comments?.value).toBe('The first part of a long comment and a tab-indented end');
    expect(r.accounting.continuationLines).toBe(2);
  });

  it('accepts CRLF, CR and LF line ends, white space around the colon, and a byte-order mark', () => {
    const text = '\ufeffType : script\r\nSubtag:Abcd\rDescription:   Some script\n';
    const r = parseRecordJar(text);
    expect(r.records[0].fields.map((f) => [f.name, f.value])).toEqual([
      ['Type', 'script'],
      ['Subtag', 'Abcd'],
      ['Description', 'Some script'],
    ]);
    expect(r.accounting.lines).toBe(3);
  });

  it('rejects a line that is no field, naming file, line and column, and goes on', () => {
    const text = 'Type: language\nthis line has no colon\nSubtag: xx\nBad_Name: value\nDescription: Kept\n';
    const r = parseRecordJar(text, { file: 'broken.txt' });
    expect(r.diagnostics.map((d) => [d.file, d.line, d.column, d.code, d.rejected])).toEqual([
      ['broken.txt', 2, 23, 'bad_value', true],
      ['broken.txt', 4, 1, 'bad_value', true],
    ]);
    expect(r.records[0].fields.map((f) => f.name)).toEqual(['Type', 'Subtag', 'Description']);
    expect(r.accounting.rejectedLines).toBe(2);
    expect(accountedFor(r.accounting)).toBe(r.accounting.lines);
  });

  it('rejects a continuation line that has no field before it in its record', () => {
    const text = 'Type: language\n%%\n  dangling continuation\nType: region\n';
    const r = parseRecordJar(text);
    expect(r.diagnostics).toHaveLength(1);
    expect(r.diagnostics[0]).toMatchObject({ line: 3, column: 1, code: 'bad_value' });
    expect(r.records).toHaveLength(2);
  });

  it('counts blank lines, and treats repeated or trailing %% as empty separators', () => {
    const text = 'A: 1\n\n%%\n%%\nB: 2\n%%\n';
    const r = parseRecordJar(text);
    expect(r.records.map((rec) => rec.fields[0].name)).toEqual(['A', 'B']);
    expect(r.accounting).toEqual({ lines: 6, fieldLines: 2, continuationLines: 0, separatorLines: 3, blankLines: 1, rejectedLines: 0 });
  });
});
