/**
 * The audit log of `apply`: a CSV with one row per decision applied (AUDIT_COLUMNS), RFC 4180 with
 * CRLF line ends like the worklist, cells neutralised against spreadsheet formulas like the worklist
 * (it is read by people in spreadsheets). An existing log with the same header is appended to,
 * so one file can hold the decisions of every review cycle; the file is rewritten atomically.
 */
import { existsSync, readFileSync } from 'node:fs';
import { InputError } from '../errors.js';
import { csvField } from '../render/csv.js';
import { writeAtomic } from '../state/atomicWrite.js';
import { AUDIT_COLUMNS, type AuditRow } from './applyDecisions.js';

export const AUDIT_HEADER = AUDIT_COLUMNS.join(',');

export function auditCsvRows(rows: AuditRow[]): string {
  return rows.map((r) => AUDIT_COLUMNS.map((c) => csvField(r[c])).join(',') + '\r\n').join('');
}

/** The text of the log after appending `rows` to `existing` (the file's text, or undefined when new). */
export function appendAudit(path: string, existing: string | undefined, rows: AuditRow[]): string {
  if (existing === undefined || existing.length === 0) return `${AUDIT_HEADER}\r\n${auditCsvRows(rows)}`;
  const text = existing.charCodeAt(0) === 0xfeff ? existing.slice(1) : existing;
  const first = text.split(/\r?\n/, 1)[0];
  if (first !== AUDIT_HEADER) {
    throw new InputError('header_missing_column', `the audit log exists and its header is not termdrift's (${AUDIT_HEADER})`, {
      location: { file: path, line: 1, column: 1 },
      fix: 'give --audit a new file, or the audit log an earlier apply wrote',
    });
  }
  const sep = text.endsWith('\n') ? '' : '\r\n';
  return `${text}${sep}${auditCsvRows(rows)}`;
}

/** Check that the log can be appended to (before anything is written). */
export function readAuditLog(path: string): string | undefined {
  if (!existsSync(path)) return undefined;
  const text = readFileSync(path, 'utf8');
  appendAudit(path, text, []);
  return text;
}

export function writeAuditLog(path: string, existing: string | undefined, rows: AuditRow[]): void {
  writeAtomic(path, appendAudit(path, existing, rows), 0o644);
}
