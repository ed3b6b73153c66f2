/** The loaders: one per input kind, and `loadAny` for the CLI's `validate`. */
import { loadRelease } from './loadRelease.js';
import { loadMappings } from './loadMappings.js';
import { loadHierarchy } from './loadHierarchy.js';
import { loadHistory } from './loadHistory.js';
import type { ColumnRenames } from './columns.js';
import type { ProgressCallback } from './readTable.js';
import type { Loaded, TableKind } from './types.js';

export { loadRelease, loadMappings, loadHierarchy, loadHistory };
export * from './types.js';
export { termTextAt, termIdAt, termTextEquals, termTextComparer, conceptIndexOf, matchConceptIds } from './releaseBytes.js';

export const TABLE_KINDS: readonly TableKind[] = ['release', 'mapping', 'hierarchy', 'history'];

/** Load a file of the given kind; every kind's result carries accounting and diagnostics. */
export async function loadAny(kind: TableKind, path: string, columns?: ColumnRenames, onProgress?: ProgressCallback): Promise<Loaded> {
  switch (kind) {
    case 'release':
      return loadRelease(path, { columns, onProgress });
    case 'mapping':
      return loadMappings(path, { columns, onProgress });
    case 'hierarchy':
      return loadHierarchy(path, { columns, onProgress });
    case 'history':
      return loadHistory(path, { columns, onProgress });
  }
}
