/**
 * loadRelease: read a release table (one row per term) into the columnar `Release` form.
 *
 * Columns: concept_id and term (required); term_type, status, category, term_id, language,
 * term_status (optional). Concept-level values (status, category) given on several rows of a
 * concept must agree: the first stated value wins and each disagreeing row gets a warning.
 * Exact duplicate terms of one concept (same text and language) are rejected; a second
 * preferred term in one language is kept as a synonym with a warning.
 */
import { basename } from 'node:path';
import { RowLedger, quoteValue } from './ledger.js';
import { readTable } from './readTable.js';
import { resolveColumns, type ColumnRenames, type ColumnSpec } from './columns.js';
import { GrowableInt32, GrowableUint8, Interner, clean } from './growable.js';
import { ACTIVE, INACTIVE, PREFERRED, SYNONYM, type Release } from './types.js';

export const RELEASE_COLUMNS: readonly ColumnSpec[] = [
  { name: 'concept_id', required: true },
  { name: 'term', required: true },
  { name: 'term_type', required: false },
  { name: 'status', required: false },
  { name: 'category', required: false },
  { name: 'term_id', required: false },
  { name: 'language', required: false },
  { name: 'term_status', required: false },
];

export interface LoadReleaseOptions {
  label?: string;
  columns?: ColumnRenames;
}

const UNSTATED = 255;

/** Status words → ACTIVE/INACTIVE; undefined for a word we do not know. */
export function parseStatus(value: string): number | undefined {
  switch (value) {
    case 'active':
    case 'Active':
    case 'ACTIVE':
    case '1':
      return ACTIVE;
    case 'inactive':
    case 'retired':
    case 'deprecated':
    case 'obsolete':
    case '0':
      return INACTIVE;
  }
  switch (value.toLowerCase()) {
    case 'active':
    case 'current':
    case 'true':
      return ACTIVE;
    case 'inactive':
    case 'retired':
    case 'deprecated':
    case 'obsolete':
    case 'false':
      return INACTIVE;
  }
  return undefined;
}

/** Label of a release from its file name: `release-r1.tsv.gz` → `release-r1`. */
export function labelFromPath(path: string): string {
  return basename(path).replace(/\.gz$/i, '').replace(/\.(tsv|csv|tab|txt)$/i, '');
}

const STATUS_FIX = 'use active or inactive (retired, deprecated and obsolete are read as inactive)';

export async function loadRelease(path: string, options: LoadReleaseOptions = {}): Promise<Release> {
  const ledger = new RowLedger(path);
  const conceptIds: string[] = [];
  const conceptIndex = new Map<string, number>();
  const conceptStatus = new GrowableUint8(1 << 14);
  const conceptCategory = new GrowableInt32(1 << 14);
  const conceptLine = new GrowableInt32(1 << 14);
  const categories = new Interner();
  const termTypes = new Interner(['preferred', 'synonym']);
  const languages = new Interner();

  const termConcept = new GrowableInt32(1 << 16);
  const termText: string[] = [];
  const termType = new GrowableUint8(1 << 16);
  const termId: string[] = [];
  const termLanguage = new GrowableInt32(1 << 16);
  const termStatus = new GrowableUint8(1 << 16);
  const termLine = new GrowableInt32(1 << 16);

  let ci = -1, ti = -1, tti = -1, si = -1, cati = -1, tidi = -1, li = -1, tsi = -1;
  const has = { term_type: false, status: false, category: false, term_id: false, language: false, term_status: false };
  let lastId = '';
  let lastC = -1;

  const sink = {
    header(fields: string[], line: number) {
      const r = resolveColumns(path, fields, line, RELEASE_COLUMNS, options.columns);
      ({ concept_id: ci, term: ti, term_type: tti, status: si, category: cati, term_id: tidi, language: li, term_status: tsi } = r.index as Record<string, number>);
      has.term_type = tti >= 0; has.status = si >= 0; has.category = cati >= 0;
      has.term_id = tidi >= 0; has.language = li >= 0; has.term_status = tsi >= 0;
    },
    row(f: string[], line: number) {
      const id = clean(f[ci]);
      if (id === '') {
        ledger.reject(line, ci + 1, 'empty_required', 'concept_id is empty', 'give every row its concept identifier');
        return;
      }
      const text = clean(f[ti]);
      if (text === '') {
        ledger.reject(line, ti + 1, 'empty_required', `term is empty for concept ${quoteValue(id)}`, 'give the term text, or remove the row');
        return;
      }
      let type = SYNONYM;
      if (tti >= 0) {
        const t = clean(f[tti]);
        if (t === 'preferred') type = PREFERRED;
        else if (t === '' || t === 'synonym') type = SYNONYM;
        else {
          const low = t.toLowerCase();
          type = low === 'preferred' ? PREFERRED : low === 'synonym' ? SYNONYM : termTypes.id(t);
          if (type > 250) {
            ledger.reject(line, tti + 1, 'bad_value', `too many distinct term_type values (${quoteValue(t)} is the 251st)`, 'use preferred or synonym');
            return;
          }
        }
      }
      let status = UNSTATED;
      if (si >= 0) {
        const s = clean(f[si]);
        if (s !== '') {
          const parsed = parseStatus(s);
          if (parsed === undefined) {
            ledger.reject(line, si + 1, 'bad_value', `unknown status ${quoteValue(s)}`, STATUS_FIX);
            return;
          }
          status = parsed;
        }
      }
      let tStatus = ACTIVE;
      if (tsi >= 0) {
        const s = clean(f[tsi]);
        if (s !== '') {
          const parsed = parseStatus(s);
          if (parsed === undefined) {
            ledger.reject(line, tsi + 1, 'bad_value', `unknown term_status ${quoteValue(s)}`, STATUS_FIX);
            return;
          }
          tStatus = parsed;
        }
      }
      let category = -1;
      if (cati >= 0) {
        const c = clean(f[cati]);
        if (c !== '') category = categories.id(c);
      }
      let c: number;
      if (id === lastId) c = lastC;
      else {
        const found = conceptIndex.get(id);
        if (found === undefined) {
          c = conceptIds.length;
          conceptIds.push(id);
          conceptIndex.set(id, c);
          conceptStatus.push(status);
          conceptCategory.push(category);
          conceptLine.push(line);
        } else c = found;
        lastId = id;
        lastC = c;
      }
      // Concept-level values must agree across the concept's rows.
      if (status !== UNSTATED) {
        const had = conceptStatus.data[c];
        if (had === UNSTATED) conceptStatus.data[c] = status;
        else if (had !== status) {
          ledger.warn(line, si + 1, 'conflicting_status', `concept ${quoteValue(id)} is ${status === ACTIVE ? 'active' : 'inactive'} here but ${had === ACTIVE ? 'active' : 'inactive'} on line ${conceptLine.data[c]}; the first value is kept`, 'give one status per concept');
        }
      }
      if (category !== -1) {
        const had = conceptCategory.data[c];
        if (had === -1) conceptCategory.data[c] = category;
        else if (had !== category) {
          ledger.warn(line, cati + 1, 'conflicting_category', `concept ${quoteValue(id)} has category ${quoteValue(categories.values[category])} here but ${quoteValue(categories.values[had])} earlier (line ${conceptLine.data[c]}); the first value is kept`, 'give one category per concept');
        }
      }
      termConcept.push(c);
      termText.push(text);
      termType.push(type);
      termId.push(tidi >= 0 ? clean(f[tidi]) : '');
      termLanguage.push(li >= 0 ? (f[li] === '' ? -1 : languages.id(clean(f[li]))) : -1);
      termStatus.push(tStatus);
      termLine.push(line);
    },
  };

  const info = await readTable(path, ledger, sink);
  const conceptCount = conceptIds.length;
  const statusArr = conceptStatus.finish();
  for (let c = 0; c < conceptCount; c++) if (statusArr[c] === UNSTATED) statusArr[c] = ACTIVE;

  const release: Release = {
    path,
    sha256: info.sha256,
    label: options.label ?? labelFromPath(path),
    accounting: { file: path, read: 0, used: 0, rejected: 0, blankLines: 0 },
    diagnostics: [],
    conceptCount,
    conceptIds,
    conceptIndex,
    conceptStatus: statusArr,
    conceptCategory: conceptCategory.finish(),
    conceptLine: conceptLine.finish(),
    categories: categories.values,
    termCount: termText.length,
    termConcept: termConcept.finish(),
    termText,
    termType: termType.finish(),
    termTypes: termTypes.values,
    termId,
    termLanguage: termLanguage.finish(),
    languages: languages.values,
    termStatus: termStatus.finish(),
    termLine: termLine.finish(),
    conceptTermStart: new Int32Array(conceptCount + 1),
    conceptTerms: new Int32Array(0),
    hasColumn: has,
  };
  buildConceptTerms(release);
  const removed = checkConceptTerms(release, ledger, tti + 1, ti + 1);
  if (removed > 0) compactTerms(release);
  release.accounting = ledger.finish();
  release.diagnostics = ledger.diagnostics;
  return release;
}

/** Fill the compressed-sparse-row index concept → terms (terms keep file order). */
export function buildConceptTerms(r: Release): void {
  const start = new Int32Array(r.conceptCount + 1);
  for (let t = 0; t < r.termCount; t++) start[r.termConcept[t] + 1]++;
  for (let c = 0; c < r.conceptCount; c++) start[c + 1] += start[c];
  const fill = start.slice(0, r.conceptCount);
  const list = new Int32Array(r.termCount);
  for (let t = 0; t < r.termCount; t++) list[fill[r.termConcept[t]]++] = t;
  r.conceptTermStart = start;
  r.conceptTerms = list;
}

const REMOVED = -1;

/**
 * Per concept: reject duplicate terms, demote extra preferred terms. Marks rejected terms by
 * setting their concept to REMOVED; returns how many were removed.
 */
function checkConceptTerms(r: Release, ledger: RowLedger, typeColumn: number, termColumn: number): number {
  let removed = 0;
  const { conceptTermStart: start, conceptTerms: list, termText, termLanguage, termType, termLine } = r;
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
      if (b - a <= 8) {
        for (let j = a; j < k; j++) {
          const u = list[j];
          if (r.termConcept[u] !== REMOVED && termText[u] === termText[t] && termLanguage[u] === termLanguage[t]) { dup = u; break; }
        }
      } else {
        seen ??= new Map();
        const key = `${termLanguage[t]}\u0001${termText[t]}`;
        const u = seen.get(key);
        if (u !== undefined) dup = u;
        else seen.set(key, t);
      }
      if (dup >= 0) {
        ledger.reject(termLine[t], termColumn, 'duplicate_row', `duplicate of line ${termLine[dup]}: concept ${quoteValue(r.conceptIds[c])} already has the term ${quoteValue(termText[t])}`, 'remove the duplicate row');
        r.termConcept[t] = REMOVED;
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
          ledger.warn(termLine[t], typeColumn, 'two_preferred', `concept ${quoteValue(r.conceptIds[c])} already has the preferred term ${quoteValue(termText[prev])} (line ${termLine[prev]})${lang >= 0 ? ` in language ${r.languages[lang]}` : ''}; this one is read as a synonym`, 'mark one term per concept and language as preferred');
          termType[t] = SYNONYM;
        }
      }
    }
  }
  return removed;
}

/** Drop terms marked REMOVED and rebuild the index. */
function compactTerms(r: Release): void {
  let n = 0;
  for (let t = 0; t < r.termCount; t++) {
    if (r.termConcept[t] === REMOVED) continue;
    r.termConcept[n] = r.termConcept[t];
    r.termText[n] = r.termText[t];
    r.termType[n] = r.termType[t];
    r.termId[n] = r.termId[t];
    r.termLanguage[n] = r.termLanguage[t];
    r.termStatus[n] = r.termStatus[t];
    r.termLine[n] = r.termLine[t];
    n++;
  }
  r.termCount = n;
  r.termConcept = r.termConcept.slice(0, n);
  r.termText.length = n;
  r.termType = r.termType.slice(0, n);
  r.termId.length = n;
  r.termLanguage = r.termLanguage.slice(0, n);
  r.termStatus = r.termStatus.slice(0, n);
  r.termLine = r.termLine.slice(0, n);
  buildConceptTerms(r);
}
