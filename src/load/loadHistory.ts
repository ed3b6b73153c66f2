/**
 * loadHistory: read a history table (`old_id,new_id,relation`) published with a new release.
 * Relation words are folded to the trade's forms: replaced_by, consider, same_as; other
 * values are kept as given (lower case). A self-loop is rejected; cycles (A→B→A) are kept as
 * data and reported by the change classifier, which is where they matter.
 */
import { RowLedger, quoteValue } from './ledger.js';
import { readTable, type ProgressCallback } from './readTable.js';
import { resolveColumns, type ColumnRenames } from './columns.js';
import { clean } from './growable.js';
import type { HistoryRow, HistoryTable } from './types.js';

export const HISTORY_COLUMNS = [
  { name: 'old_id', required: true },
  { name: 'new_id', required: true },
  { name: 'relation', required: false },
] as const;

/** Fold common spellings of history relations to one word. */
export function normalizeRelation(value: string): string {
  const v = value.trim().toLowerCase().replace(/[\s-]+/g, '_');
  switch (v) {
    case '':
    case 'replaced_by':
    case 'replacedby':
    case 'is_replaced_by':
    case 'isreplacedby':
    case 'replaced':
      return 'replaced_by';
    case 'same_as':
    case 'sameas':
    case 'alt_id':
    case 'merged_into':
      return 'same_as';
    case 'consider':
    case 'possibly_equivalent_to':
    case 'maybe':
      return 'consider';
    default:
      return v;
  }
}

export async function loadHistory(path: string, options: { columns?: ColumnRenames; onProgress?: ProgressCallback } = {}): Promise<HistoryTable> {
  const ledger = new RowLedger(path);
  const rows: HistoryRow[] = [];
  const byOld = new Map<string, HistoryRow[]>();
  const seen = new Map<string, number>();
  let oi = -1, ni = -1, ri = -1;
  const info = await readTable(path, ledger, {
    header(fields, line) {
      const r = resolveColumns(path, fields, line, HISTORY_COLUMNS, options.columns);
      oi = r.index.old_id; ni = r.index.new_id; ri = r.index.relation;
    },
    row(f, line) {
      const oldId = clean(f[oi]);
      const newId = clean(f[ni]);
      if (oldId === '') return void ledger.reject(line, oi + 1, 'empty_required', 'old_id is empty', 'give the retired identifier');
      if (newId === '') return void ledger.reject(line, ni + 1, 'empty_required', `new_id is empty for ${quoteValue(oldId)}`, 'give the successor, or drop the row');
      if (oldId === newId) return void ledger.reject(line, ni + 1, 'bad_value', `${quoteValue(oldId)} is given as its own successor`, 'remove the self-loop');
      const relation = normalizeRelation(ri >= 0 ? f[ri] : '');
      const key = `${oldId}\u0001${newId}\u0001${relation}`;
      const first = seen.get(key);
      if (first !== undefined) return void ledger.reject(line, 1, 'duplicate_row', `duplicate of line ${first}`, 'remove the duplicate row');
      seen.set(key, line);
      const row = { oldId, newId, relation, line };
      rows.push(row);
      const list = byOld.get(oldId);
      if (list) list.push(row);
      else byOld.set(oldId, [row]);
    },
  }, { onProgress: options.onProgress });
  return { path, sha256: info.sha256, accounting: ledger.finish(), diagnostics: ledger.diagnostics, rows, byOld };
}
