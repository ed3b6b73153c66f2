/**
 * readWorklist: read back the reviewer's worklist (the CSV that `check --format csv` writes, see
 * src/render/csv.ts) with the decision columns filled in.
 *
 * Every cell goes through `readWorklistCell`, which undoes the formula neutralisation of the
 * writer. Columns are found by name, so a spreadsheet that reordered them or added its own is
 * fine; `local_code`, `target_id` and `decision` are required. A `decided_at` column, when a
 * reviewer adds one, gives the time of each decision for the audit log.
 *
 * Nothing is judged here beyond the table itself: a row the table reader rejects (wrong number of
 * fields, an unbalanced quote, …) becomes a problem; the decisions are checked by applyDecisions.
 */
import { RowLedger } from '../load/ledger.js';
import { readTable } from '../load/readTable.js';
import { resolveColumns, type ColumnSpec } from '../load/columns.js';
import type { RowAccounting } from '../load/types.js';
import { readWorklistCell } from '../render/csv.js';
import type { DecisionProblem } from './decisionError.js';

/** The decision words a reviewer writes in the `decision` column. */
export const DECISIONS = ['accept', 'keep', 'remap', 'retire'] as const;
export type Decision = (typeof DECISIONS)[number];

export const WORKLIST_READ_COLUMNS: readonly ColumnSpec[] = [
  { name: 'local_code', required: true },
  { name: 'target_id', required: true },
  { name: 'decision', required: true },
  { name: 'proposed_target', required: false },
  { name: 'new_target', required: false },
  { name: 'reviewer', required: false },
  { name: 'note', required: false },
  { name: 'local_label', required: false },
  { name: 'old_release', required: false },
  { name: 'old_sha256', required: false },
  { name: 'new_release', required: false },
  { name: 'new_sha256', required: false },
  { name: 'decided_at', required: false },
];
export type WorklistField = 'local_code' | 'target_id' | 'decision' | 'proposed_target' | 'new_target' | 'reviewer' | 'note' | 'local_label' | 'old_release' | 'old_sha256' | 'new_release' | 'new_sha256' | 'decided_at';

export interface WorklistRow {
  line: number;
  /** Cell values by our column name ('' when the column is absent or the cell empty), trimmed. */
  values: Record<WorklistField, string>;
}

export interface Worklist {
  path: string;
  sha256: string;
  accounting: RowAccounting;
  /** Our column name → 1-based column in the file (0 when absent), for messages. */
  columns: Record<WorklistField, number>;
  rows: WorklistRow[];
  /** Rows the table reader rejected, as decision problems. */
  problems: DecisionProblem[];
}

export async function readWorklist(path: string): Promise<Worklist> {
  const ledger = new RowLedger(path);
  let index: Record<string, number> = {};
  const rows: WorklistRow[] = [];
  const info = await readTable(path, ledger, {
    header(fields, line) {
      index = resolveColumns(path, fields, line, WORKLIST_READ_COLUMNS).index;
    },
    row(fields, line) {
      const values = {} as Record<WorklistField, string>;
      for (const spec of WORKLIST_READ_COLUMNS) {
        const i = index[spec.name];
        values[spec.name as WorklistField] = i >= 0 ? readWorklistCell((fields[i] ?? '').trim()).trim() : '';
      }
      rows.push({ line, values });
    },
  });
  const columns = {} as Record<WorklistField, number>;
  for (const spec of WORKLIST_READ_COLUMNS) columns[spec.name as WorklistField] = index[spec.name] + 1;
  const accounting = ledger.finish();
  const problems: DecisionProblem[] = ledger.diagnostics
    .filter((d) => d.rejected)
    .map((d) => ({ file: d.file, line: d.line, column: d.column, code: 'unreadable_row', message: `this worklist row cannot be read: ${d.message}`, fix: d.fix }));
  return { path, sha256: info.sha256, accounting, columns, rows, problems };
}
