/**
 * The CSV worklist. Parsed back with csv-parse (an RFC 4180 parser) to the same rows; formula
 * triggers neutralised as OWASP "CSV Injection" advises (cells beginning with = + - @ tab CR LF
 * get a leading single quote and are quoted); readWorklistCell undoes it exactly.
 */
import { describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { csvField, neutraliseCell, readWorklistCell, renderCsv, WORKLIST_COLUMNS } from '../../src/render/csv.js';
import { buildView } from '../../src/render/model.js';
import { hostileCheck, hostileDiff, ATTRIBUTE, FORMULA, MD_LINK, SCRIPT } from '../helpers/hostileReport.js';

function readBack(csv: string): string[][] {
  return parse(csv, { relax_column_count: false }) as string[][];
}

describe('renderCsv', () => {
  it('has the worklist header and one row per mapping needing action, by impact then local code', async () => {
    const report = await hostileCheck();
    const rows = readBack(renderCsv(report));
    expect(rows[0]).toEqual([...WORKLIST_COLUMNS]);
    const body = rows.slice(1).map((r) => Object.fromEntries(r.map((v, i) => [rows[0][i], readWorklistCell(v)])));
    expect(body.map((r) => r.local_code)).toEqual([FORMULA, '\tTAB', '\rCR', '+1']);
    expect(body.map((r) => r.verdict)).toEqual(['ambiguous', 'unknown_target', 'broken', 'broken']);
    const first = body[0];
    expect(first).toMatchObject({
      local_label: 'A | B\nC',
      target_id: 'P1',
      target_label: 'Diabetes mellitus',
      impact: '500',
      usage: '500',
      proposed_target: 'P1',
      proposed_label: 'Diabetes mellitus',
      proposed_score: '0.6',
      other_candidates: `P2 ${SCRIPT} (0.40, term_flow)`,
      decision: '',
      new_target: '',
      reviewer: '',
      note: '',
      old_release: report.releases.old.label,
      old_sha256: report.releases.old.sha256,
      new_sha256: report.releases.new.sha256,
      tool_version: 'termdrift 0.1.0',
    });
    expect(first.change_ids).toBe(report.changes.find((c) => c.kind === 'split')!.id);
    expect(body[3]).toMatchObject({ local_label: ATTRIBUTE, reasons: MD_LINK });
    expect(body[1].local_label).toBe("'quoted");
  });

  it('reads back to exactly the values of the view', async () => {
    const report = await hostileCheck();
    const view = buildView(report);
    const rows = readBack(renderCsv(report)).slice(1);
    expect(rows.map((r) => readWorklistCell(r[0]))).toEqual(view.actions.map((m) => m.local_code));
    expect(rows.map((r) => readWorklistCell(r[1]))).toEqual(view.actions.map((m) => m.local_label));
  });

  it('neutralises every cell a spreadsheet would run as a formula (OWASP CSV Injection)', async () => {
    const csv = renderCsv(await hostileCheck());
    for (const row of readBack(csv)) for (const cell of row) expect(/^[=+\-@\t\r\n]/.test(cell), JSON.stringify(cell)).toBe(false);
    // and the neutralised cells are quoted in the file itself
    expect(csv).toContain(`"'=HYPERLINK(""http://evil.example"",""x"")"`);
    expect(csv).toContain(`"'+1"`);
    expect(csv).toContain(`"'\tTAB"`);
    expect(csv).toContain(`"'\rCR"`);
  });

  it('uses CRLF between records (RFC 4180) and has no comment line', async () => {
    const csv = renderCsv(await hostileCheck());
    expect(csv.startsWith('local_code,')).toBe(true);
    expect(csv.endsWith('\r\n')).toBe(true);
    // every LF that ends a record follows a CR; the only bare LF is inside the quoted label "A | B\nC"
    expect(csv.replace(/\r\n/g, '').split('\n').length - 1).toBe(1);
  });

  it('follows --verdict, and a diff report gives the header only', async () => {
    const broken = readBack(renderCsv(await hostileCheck(), { verdicts: ['broken'] }));
    expect(broken.slice(1).map((r) => r[4])).toEqual(['broken', 'broken']);
    expect(readBack(renderCsv(await hostileDiff()))).toEqual([[...WORKLIST_COLUMNS]]);
  });

  it('is the same bytes twice', async () => {
    const report = await hostileCheck();
    expect(renderCsv(structuredClone(report))).toBe(renderCsv(report));
  });
});

describe('cell helpers', () => {
  it('neutralises the OWASP triggers and a leading quote, and reading undoes it', () => {
    // Triggers from OWASP "CSV Injection": = + - @ tab CR (LF added, as docs STANDARDS.md says).
    for (const s of ['=1+1', '+1', '-2', '@SUM(A1:A2)', '\tx', '\rx', '\nx', "'x", "'=1"]) {
      expect(neutraliseCell(s)).toBe(`'${s}`);
      expect(readWorklistCell(neutraliseCell(s))).toBe(s);
    }
    for (const s of ['LAB-0401', 'a=b', 'x-1', '', 'Sjögren']) {
      expect(neutraliseCell(s)).toBe(s);
      expect(readWorklistCell(neutraliseCell(s))).toBe(s);
    }
  });

  it('quotes as RFC 4180 says: comma, quote or line break, inner quotes doubled', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField('-2')).toBe(`"'-2"`);
  });
});
