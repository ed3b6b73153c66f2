/**
 * Text for row-level diagnostics and row accounting, shared by `validate` and every report.
 * Form: `file:line:column: error code: message` then `  fix: …` on the next line.
 */
import type { Diagnostic, RowAccounting } from '../load/types.js';

export function formatDiagnostic(d: Diagnostic): string {
  const what = d.rejected ? 'rejected' : 'warning';
  return `${d.file}:${d.line}:${d.column}: ${what} (${d.code}): ${d.message}\n  fix: ${d.fix}`;
}

export function formatAccounting(a: RowAccounting): string {
  const blank = a.blankLines ? `; ${a.blankLines} blank line${a.blankLines === 1 ? '' : 's'} skipped` : '';
  return `${a.file}: ${a.read} row${a.read === 1 ? '' : 's'} read = ${a.used} used + ${a.rejected} rejected${blank}`;
}
