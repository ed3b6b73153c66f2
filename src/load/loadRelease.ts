/**
 * loadRelease: read a release table (one row per term) into the columnar `Release` form.
 *
 * Columns: concept_id and term (required); term_type, status, category, term_id, language,
 * term_status (optional). Concept-level values (status, category) given on several rows of a
 * concept must agree: the first stated value wins and each disagreeing row gets a warning.
 * Exact duplicate terms of one concept (same text and language) are rejected; a second
 * preferred term in one language is kept as a synonym with a warning.
 *
 * TSV is read as bytes (readTsvBytes.ts, releaseBuilder.ts): the release keeps the file's bytes
 * and per-term byte ranges, and `termText`, `termId` and `conceptIndex` are built only when a
 * consumer first reads them (releaseBytes.ts; `termTextAt` and friends read one value). CSV and
 * `reader: 'strings'` go through readTable's string path into the same storage.
 */
import { basename } from 'node:path';
import { RowLedger, quoteValue } from './ledger.js';
import { delimiterFromName, readTable, type ProgressCallback } from './readTable.js';
import { readTsvBytes } from './readTsvBytes.js';
import { ReleaseBuilder } from './releaseBuilder.js';
import { ReleaseBytes, attachReleaseBytes } from './releaseBytes.js';
import { applyCanonicalOrder } from './canonicalOrder.js';
import type { ColumnRenames } from './columns.js';
import { PREFERRED, SYNONYM, type Release } from './types.js';

export { RELEASE_COLUMNS, parseStatus } from './releaseBuilder.js';

export interface LoadReleaseOptions {
  label?: string;
  columns?: ColumnRenames;
  /**
   * `bytes` (default): the byte reader, with the string path for lines that are not plain
   * (a file named .csv is read by readTable all the same); `strings`: readTable's string path
   * for every line (the reference the tests compare with).
   */
  reader?: 'bytes' | 'strings';
  /** Block size of the byte reader in bytes (tests use small ones to cut lines across blocks). */
  blockSize?: number;
  /** Bytes per read of the byte reader. */
  readSize?: number;
  /** Files of at least this many bytes are hashed in a worker thread, their blocks in shared memory (default 64 MiB; tests use 0). */
  hashInThreadFrom?: number;
  /**
   * `file` (default): concepts and terms numbered in first-seen order; `canonical`: renumbered
   * after the row checks so that the order of the file's rows does not matter (canonicalOrder.ts;
   * the pipeline loads releases this way).
   */
  order?: 'file' | 'canonical';
  /** Bytes read so far of the file's size, at most once per MiB (readTable's onProgress). */
  onProgress?: ProgressCallback;
}

/** Label of a release from its file name: `release-r1.tsv.gz` → `release-r1`. */
export function labelFromPath(path: string): string {
  return basename(path).replace(/\.gz$/i, '').replace(/\.(tsv|csv|tab|txt)$/i, '');
}

export async function loadRelease(path: string, options: LoadReleaseOptions = {}): Promise<Release> {
  const ledger = new RowLedger(path);
  const blocks: Buffer[] = [];
  const builder = new ReleaseBuilder(path, ledger, options.columns, blocks);
  const info = options.reader === 'strings' || delimiterFromName(path) === ','
    ? await readTable(path, ledger, builder, { onProgress: options.onProgress })
    : await readTsvBytes(path, ledger, builder, { blocks, blockSize: options.blockSize, readSize: options.readSize, hashInThreadFrom: options.hashInThreadFrom, onProgress: options.onProgress });
  const b = builder.finish();
  const bytes = new ReleaseBytes({
    blocks, termBlock: b.termBlock, textStart: b.textStart, textEnd: b.textEnd, idStart: b.idStart, idEnd: b.idEnd,
    concepts: b.concepts, conceptIds: b.conceptIds,
  });
  const release = attachReleaseBytes({
    path,
    sha256: info.sha256,
    label: options.label ?? labelFromPath(path),
    accounting: { file: path, read: 0, used: 0, rejected: 0, blankLines: 0 },
    diagnostics: [],
    conceptCount: b.conceptCount,
    conceptIds: b.conceptIds,
    conceptStatus: b.conceptStatus,
    conceptCategory: b.conceptCategory,
    conceptLine: b.conceptLine,
    categories: b.categories,
    termCount: b.termCount,
    termConcept: b.termConcept,
    termType: b.termType,
    termTypes: b.termTypes,
    termLanguage: b.termLanguage,
    languages: b.languages,
    termStatus: b.termStatus,
    termLine: b.termLine,
    conceptTermStart: new Int32Array(b.conceptCount + 1),
    conceptTerms: new Int32Array(0),
    hasColumn: b.hasColumn,
  }, bytes);
  buildConceptTerms(release);
  const removed = checkConceptTerms(release, bytes, ledger, b.typeColumn, b.termColumn);
  if (removed > 0) compactTerms(release, bytes);
  if (options.order === 'canonical') applyCanonicalOrder(release, bytes, buildConceptTerms);
  release.accounting = ledger.finish();
  release.diagnostics = ledger.diagnostics;
  return release;
}

/** Fill the compressed-sparse-row index concept → terms (terms keep file order). */
export function buildConceptTerms(r: Release): void {
  const n = r.termCount;
  const concept = r.termConcept;
  const start = new Int32Array(r.conceptCount + 1);
  const list = new Int32Array(n);
  let grouped = true;
  for (let t = 0; t < n; t++) {
    const c = concept[t];
    start[c + 1]++;
    if (t > 0 && c < concept[t - 1]) grouped = false;
  }
  for (let c = 0; c < r.conceptCount; c++) start[c + 1] += start[c];
  if (grouped) {
    // Rows grouped by concept (the usual layout): the terms are already in concept order.
    for (let t = 0; t < n; t++) list[t] = t;
  } else {
    const fill = start.slice(0, r.conceptCount);
    for (let t = 0; t < n; t++) list[fill[concept[t]]++] = t;
  }
  r.conceptTermStart = start;
  r.conceptTerms = list;
}

const REMOVED = -1;

/**
 * Per concept: reject duplicate terms, demote extra preferred terms. Marks rejected terms by
 * setting their concept to REMOVED; returns how many were removed.
 */
function checkConceptTerms(r: Release, bytes: ReleaseBytes, ledger: RowLedger, typeColumn: number, termColumn: number): number {
  let removed = 0;
  const { conceptTermStart: start, conceptTerms: list, termLanguage, termType, termLine, termConcept } = r;
  const { textStart, textEnd } = bytes;
  for (let c = 0; c < r.conceptCount; c++) {
    const a = start[c];
    const b = start[c + 1];
    if (b - a < 2) continue;
    let preferredByLang: Map<number, number> | null = null;
    let firstPreferred = -1;
    let seen: Map<string, number> | null = null;
    for (let k = a; k < b; k++) {
      const t = list[k];
      // Duplicate: same text and language as an earlier term of this concept.
      let dup = -1;
      if (b - a <= 16) {
        const len = textEnd[t] - textStart[t];
        const lang = termLanguage[t];
        for (let j = a; j < k; j++) {
          const u = list[j];
          if (textEnd[u] - textStart[u] === len && termLanguage[u] === lang && termConcept[u] !== REMOVED && bytes.sameText(u, bytes, t)) { dup = u; break; }
        }
      } else {
        seen ??= new Map();
        const key = `${termLanguage[t]}\u0001${bytes.text(t)}`;
        const u = seen.get(key);
        if (u !== undefined) dup = u;
        else seen.set(key, t);
      }
      if (dup >= 0) {
        ledger.reject(termLine[t], termColumn, 'duplicate_row', `duplicate of line ${termLine[dup]}: concept ${quoteValue(r.conceptIds[c])} already has the term ${quoteValue(bytes.text(t))}`, 'remove the duplicate row');
        termConcept[t] = REMOVED;
        removed++;
        continue;
      }
      if (termType[t] === PREFERRED) {
        const lang = termLanguage[t];
        if (firstPreferred === -1 && preferredByLang === null) { firstPreferred = t; continue; }
        preferredByLang ??= new Map([[termLanguage[firstPreferred], firstPreferred]]);
        const prev = preferredByLang.get(lang);
        if (prev === undefined) preferredByLang.set(lang, t);
        else {
          ledger.warn(termLine[t], typeColumn, 'two_preferred', `concept ${quoteValue(r.conceptIds[c])} already has the preferred term ${quoteValue(bytes.text(prev))} (line ${termLine[prev]})${lang >= 0 ? ` in language ${r.languages[lang]}` : ''}; this one is read as a synonym`, 'mark one term per concept and language as preferred');
          termType[t] = SYNONYM;
        }
      }
    }
  }
  return removed;
}

/** Drop terms marked REMOVED and rebuild the index. */
function compactTerms(r: Release, bytes: ReleaseBytes): void {
  const concept = r.termConcept;
  bytes.compactTerms((t) => concept[t] !== REMOVED);
  let n = 0;
  for (let t = 0; t < r.termCount; t++) {
    if (concept[t] === REMOVED) continue;
    r.termConcept[n] = r.termConcept[t];
    r.termType[n] = r.termType[t];
    r.termLanguage[n] = r.termLanguage[t];
    r.termStatus[n] = r.termStatus[t];
    r.termLine[n] = r.termLine[t];
    n++;
  }
  r.termCount = n;
  r.termConcept = r.termConcept.slice(0, n);
  r.termType = r.termType.slice(0, n);
  r.termLanguage = r.termLanguage.slice(0, n);
  r.termStatus = r.termStatus.slice(0, n);
  r.termLine = r.termLine.slice(0, n);
  buildConceptTerms(r);
}
