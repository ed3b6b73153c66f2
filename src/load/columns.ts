/**
 * Header resolution: find our column names in a table's header, honouring `--columns`.
 *
 * `--columns ours=theirs,...` says under which header name the file carries one of our
 * columns (e.g. `concept_id=CODE,term=STR`). Names are compared after trimming and case
 * folding. Problems with the header are whole-file errors (InputError, exit 2).
 */
import { InputError, UsageError } from '../errors.js';

export interface ColumnSpec {
  name: string;
  required: boolean;
}

/** Header renames: our column name → the file's header name. */
export type ColumnRenames = Record<string, string>;

/** Parse `ours=theirs,ours2=theirs2`; throws UsageError on malformed text or unknown names. */
export function parseColumnsOption(text: string | undefined, known: readonly string[]): ColumnRenames {
  const renames: ColumnRenames = {};
  if (!text) return renames;
  for (const part of text.split(',')) {
    const eq = part.indexOf('=');
    const ours = part.slice(0, eq).trim();
    const theirs = part.slice(eq + 1).trim();
    if (eq <= 0 || !ours || !theirs) {
      throw new UsageError(`--columns: "${part}" is not of the form ours=theirs`, 'write e.g. --columns concept_id=CODE,term=STR');
    }
    if (!known.includes(ours)) {
      throw new UsageError(`--columns: "${ours}" is not a column termdrift reads here`, `use one of: ${known.join(', ')}`);
    }
    renames[ours] = theirs;
  }
  return renames;
}

export interface ResolvedColumns {
  /** Our column name → field index, -1 when absent. */
  index: Record<string, number>;
  /** Header fields not claimed by any of our columns: name and index. */
  extra: { name: string; index: number }[];
}

const fold = (s: string) => s.trim().toLowerCase();

/** Map header fields to our columns. */
export function resolveColumns(file: string, header: string[], line: number, specs: readonly ColumnSpec[], renames: ColumnRenames = {}): ResolvedColumns {
  const seen = new Map<string, number>();
  header.forEach((h, i) => {
    const key = fold(h);
    if (key === '') {
      throw new InputError('header_empty_column', `column ${i + 1} of the header has no name`, {
        location: { file, line, column: i + 1 },
        fix: 'name every column in the header row',
      });
    }
    if (seen.has(key)) {
      throw new InputError('header_duplicate_column', `the header names "${h}" twice (columns ${seen.get(key)! + 1} and ${i + 1})`, {
        location: { file, line, column: i + 1 },
        fix: 'give each column a distinct name',
      });
    }
    seen.set(key, i);
  });
  const index: Record<string, number> = {};
  const claimed = new Set<number>();
  for (const spec of specs) {
    const wanted = renames[spec.name] ?? spec.name;
    const at = seen.get(fold(wanted));
    if (at === undefined) {
      if (spec.required) {
        throw new InputError('header_missing_column', `the header has no column "${wanted}"${renames[spec.name] ? ` (given for ${spec.name} by --columns)` : ''}; it has: ${header.join(', ')}`, {
          location: { file, line, column: 1 },
          fix: renames[spec.name] ? 'check the --columns option' : `rename the column to ${spec.name}, or pass --columns ${spec.name}=YOURNAME`,
        });
      }
      index[spec.name] = -1;
    } else {
      index[spec.name] = at;
      claimed.add(at);
    }
  }
  const extra = header.map((name, i) => ({ name, index: i })).filter((c) => !claimed.has(c.index));
  return { index, extra };
}
