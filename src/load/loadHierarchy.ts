/**
 * loadHierarchy: read `concept_id,parent_id` rows into child → parents lists.
 * Empty values and duplicate edges are rejected rows; a self-loop is rejected too (a concept
 * cannot be its own parent). Longer cycles are found later, where the hierarchy is walked.
 */
import { RowLedger, quoteValue } from './ledger.js';
import { delimiterFromName, readTable, type ProgressCallback } from './readTable.js';
import { readTsvBytes, type ByteTableSink } from './readTsvBytes.js';
import { resolveColumns, type ColumnRenames } from './columns.js';
import { clean } from './growable.js';
import type { Hierarchy } from './types.js';

export const HIERARCHY_COLUMNS = [
  { name: 'concept_id', required: true },
  { name: 'parent_id', required: true },
] as const;

export async function loadHierarchy(path: string, options: { columns?: ColumnRenames; onProgress?: ProgressCallback } = {}): Promise<Hierarchy> {
  const ledger = new RowLedger(path);
  const parents = new Map<string, string[]>();
  const firstLines = new Map<string, number[]>();
  let ci = -1;
  let pi = -1;
  let edgeCount = 0;
  const row = (child: string, parent: string, line: number): void => {
    if (child === '') return void ledger.reject(line, ci + 1, 'empty_required', 'concept_id is empty', 'give the child concept');
    if (parent === '') return void ledger.reject(line, pi + 1, 'empty_required', `parent_id is empty for ${quoteValue(child)}`, 'give the parent concept, or drop the row for a top concept');
    if (child === parent) return void ledger.reject(line, pi + 1, 'bad_value', `${quoteValue(child)} is given as its own parent`, 'remove the self-loop');
    // A child has few parents: a duplicate is found in its own short list, no key per edge.
    const list = parents.get(child);
    if (list) {
      const lines = firstLines.get(child)!;
      const at = list.indexOf(parent);
      if (at !== -1) return void ledger.reject(line, 1, 'duplicate_row', `duplicate of line ${lines[at]}: ${quoteValue(child)} → ${quoteValue(parent)}`, 'remove the duplicate row');
      list.push(parent);
      lines.push(line);
    } else {
      parents.set(child, [parent]);
      firstLines.set(child, [line]);
    }
    edgeCount++;
  };
  const sink: ByteTableSink = {
    header(fields, line) {
      const r = resolveColumns(path, fields, line, HIERARCHY_COLUMNS, options.columns);
      ci = r.index.concept_id;
      pi = r.index.parent_id;
    },
    row(f, line) {
      row(clean(f[ci]), clean(f[pi]), line);
    },
    // Plain TSV records (readTsvBytes): the two fields decoded straight from the bytes, no
    // string per field of the line; the same checks as `row`.
    rowBytes(buf, _block, start, end, line, ascii) {
      const enc = ascii ? 'latin1' : 'utf8';
      row(clean(buf.toString(enc, start[ci], end[ci])), clean(buf.toString(enc, start[pi], end[pi])), line);
    },
  };
  const info = delimiterFromName(path) === ','
    ? await readTable(path, ledger, sink, { onProgress: options.onProgress })
    : await readTsvBytes(path, ledger, sink, { blocks: [], onProgress: options.onProgress });
  return { path, sha256: info.sha256, accounting: ledger.finish(), diagnostics: ledger.diagnostics, parents, edgeCount };
}
