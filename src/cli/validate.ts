/** `termdrift validate FILE --kind K`: check one input file and print every problem found. */
import { loadAny, TABLE_KINDS, type TableKind } from '../load/index.js';
import { parseColumnsOption } from '../load/columns.js';
import { RELEASE_COLUMNS } from '../load/loadRelease.js';
import { MAPPING_COLUMNS } from '../load/loadMappings.js';
import { HIERARCHY_COLUMNS } from '../load/loadHierarchy.js';
import { HISTORY_COLUMNS } from '../load/loadHistory.js';
import { TermdriftError, UsageError } from '../errors.js';
import { formatAccounting, formatDiagnostic } from '../render/diagnostics.js';
import { exitCodeFor, type ExitCode } from './exitCode.js';
import { SILENT, type Progress } from './progress.js';

export const COLUMNS_BY_KIND: Record<TableKind, readonly { name: string }[]> = {
  release: RELEASE_COLUMNS,
  mapping: MAPPING_COLUMNS,
  hierarchy: HIERARCHY_COLUMNS,
  history: HISTORY_COLUMNS,
};

export function parseKind(value: string): TableKind {
  if (!(TABLE_KINDS as readonly string[]).includes(value)) {
    throw new UsageError(`--kind must be one of ${TABLE_KINDS.join(', ')}; got "${value}"`, 'e.g. --kind release');
  }
  return value as TableKind;
}

export interface ValidateOptions {
  kind: string;
  columns?: string;
  format?: string;
}

export async function runValidate(file: string, opts: ValidateOptions, out: (s: string) => void, progress: Progress = SILENT): Promise<ExitCode> {
  const kind = parseKind(opts.kind);
  const columns = parseColumnsOption(opts.columns, COLUMNS_BY_KIND[kind].map((c) => c.name));
  let loaded;
  try {
    loaded = await loadAny(kind, file, columns, (read, size) => progress.file(file, read, size));
  } catch (err) {
    // With --format json a whole-file error is also printed as data (its stable code, where,
    // the fix) on standard output; the message on standard error and exit 2 are as always.
    if (opts.format === 'json' && err instanceof TermdriftError) {
      out(JSON.stringify({ file, kind, error: { code: err.code, message: err.message, location: err.location, fix: err.fix } }, null, 2));
    }
    throw err;
  }
  if (opts.format === 'json') {
    out(JSON.stringify({ file, kind, sha256: loaded.sha256, accounting: loaded.accounting, diagnostics: loaded.diagnostics }, null, 2));
  } else {
    for (const d of loaded.diagnostics) out(formatDiagnostic(d));
    const warnings = loaded.diagnostics.filter((d) => !d.rejected).length;
    out(formatAccounting(loaded.accounting) + (warnings ? `; ${warnings} warning${warnings === 1 ? '' : 's'}` : ''));
    out(loaded.accounting.rejected === 0 ? `${file}: valid ${kind} table` : `${file}: ${loaded.accounting.rejected} row${loaded.accounting.rejected === 1 ? '' : 's'} rejected; fix them and validate again`);
  }
  return exitCodeFor({ rejectedRows: loaded.accounting.rejected, strictRows: true });
}
