/**
 * writeReleaseTables: write an importer's tables as the TSV files termdrift reads
 * (`release.tsv`, `history.tsv`, and `hierarchy.tsv` when there is a hierarchy).
 *
 * UTF-8, LF line ends, one header row. A field may not hold a tab or a line break: each tab,
 * CR, LF (or CR LF pair) is replaced by one space and counted. A field that begins with a
 * double quote would be read as a quoted field by termdrift's TSV reader, so such a field is
 * written in RFC 4180 quotes (inner quotes doubled) and counted; quotes elsewhere in a field
 * are literal characters and are written as they are.
 */
import { promises as fsp } from 'node:fs';
import { join } from 'node:path';
import type { HierarchyRow, HistoryRow, ReleaseRow, ReleaseTables, WrittenTables } from './types.js';

export const RELEASE_HEADER = ['concept_id', 'term', 'term_type', 'status', 'category', 'term_id', 'language'] as const;
export const HIERARCHY_HEADER = ['concept_id', 'parent_id'] as const;
export const HISTORY_HEADER = ['old_id', 'new_id', 'relation'] as const;

const CONTROL = /\r\n|[\t\r\n]/g;
const HAS_CONTROL = /[\t\r\n]/;

/** Running tally of what cleaning changed. */
export interface FieldTally {
  replacedControlChars: number;
  quotedFields: number;
}

/** Make one value safe for a TSV field, counting what was changed. */
export function tsvField(value: string | undefined, tally: FieldTally): string {
  if (value === undefined || value === '') return '';
  let v = value;
  if (HAS_CONTROL.test(v)) {
    v = v.replace(CONTROL, () => {
      tally.replacedControlChars++;
      return ' ';
    });
  }
  if (v.charCodeAt(0) === 34 /* " */) {
    tally.quotedFields++;
    v = `"${v.replace(/"/g, '""')}"`;
  }
  return v;
}

/** Render rows under a header as TSV text (header line included, LF after every line). */
export function renderTsv<R extends object>(header: readonly (keyof R & string)[], rows: readonly R[], tally: FieldTally): string {
  const parts: string[] = [header.join('\t'), '\n'];
  for (const row of rows) {
    const rec = row as Record<string, string | undefined>;
    for (let i = 0; i < header.length; i++) {
      if (i > 0) parts.push('\t');
      parts.push(tsvField(rec[header[i]], tally));
    }
    parts.push('\n');
  }
  return parts.join('');
}

/**
 * Write `release.tsv` and `history.tsv` (always, an empty history has its header only) and
 * `hierarchy.tsv` (when `tables.hierarchy` is given) into `dir`, creating it if needed.
 */
export async function writeReleaseTables(dir: string, tables: ReleaseTables): Promise<WrittenTables> {
  await fsp.mkdir(dir, { recursive: true });
  const tally: FieldTally = { replacedControlChars: 0, quotedFields: 0 };
  const files: string[] = [];

  const releasePath = join(dir, 'release.tsv');
  await fsp.writeFile(releasePath, renderTsv<ReleaseRow>(RELEASE_HEADER, tables.release, tally), 'utf8');
  files.push(releasePath);

  const history = tables.history ?? [];
  const historyPath = join(dir, 'history.tsv');
  await fsp.writeFile(historyPath, renderTsv<HistoryRow>(HISTORY_HEADER, history, tally), 'utf8');
  files.push(historyPath);

  if (tables.hierarchy !== undefined) {
    const hierarchyPath = join(dir, 'hierarchy.tsv');
    await fsp.writeFile(hierarchyPath, renderTsv<HierarchyRow>(HIERARCHY_HEADER, tables.hierarchy, tally), 'utf8');
    files.push(hierarchyPath);
  }

  return {
    files,
    counts: {
      releaseRows: tables.release.length,
      hierarchyRows: tables.hierarchy?.length ?? 0,
      historyRows: history.length,
      replacedControlChars: tally.replacedControlChars,
      quotedFields: tally.quotedFields,
    },
  };
}
