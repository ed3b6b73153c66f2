/**
 * loadMappings: read an institution's mapping set (local code → concept).
 *
 * Plain CSV/TSV: local_code, local_label, target_id, and optional relation
 * (exact|broad|narrow|related, default exact), usage (records using the code, default 1), owner.
 * SSSOM TSV (a `#`-prefixed YAML metadata block, then subject_id, subject_label, predicate_id,
 * object_id, …) is recognised by its metadata block or its header; subject_id → local_code,
 * subject_label → local_label, object_id → target_id, predicate_id → relation. Columns beyond
 * the known ones are kept on each mapping so the set can be written back as it came.
 * FHIR ConceptMap JSON is read by exchange/fhirConceptMap.ts into the same MappingSet form.
 */
import { parse as parseYaml } from 'yaml';
import { RowLedger, quoteValue } from './ledger.js';
import { readTable, type ProgressCallback } from './readTable.js';
import { resolveColumns, type ColumnRenames, type ColumnSpec } from './columns.js';
import { clean } from './growable.js';
import { InputError } from '../errors.js';
import type { Mapping, MappingRelation, MappingSet } from './types.js';
import { readConceptMap } from '../exchange/fhirConceptMap.js';

export const MAPPING_COLUMNS: readonly ColumnSpec[] = [
  { name: 'local_code', required: true },
  { name: 'local_label', required: false },
  { name: 'target_id', required: true },
  { name: 'relation', required: false },
  { name: 'usage', required: false },
  { name: 'owner', required: false },
];

/** SSSOM slot → our column. */
const SSSOM_COLUMNS: Record<string, string> = {
  local_code: 'subject_id',
  local_label: 'subject_label',
  target_id: 'object_id',
  relation: 'predicate_id',
  usage: 'usage',
  owner: 'author_id',
};

/** SSSOM's built-in prefixes need no curie_map entry (SSSOM spec, "curie_map"). */
export const SSSOM_BUILTIN_PREFIXES = ['owl', 'rdf', 'rdfs', 'semapv', 'skos', 'sssom', 'xsd', 'linkml'];

/** Predicates (SKOS, OWL) and plain words → our relation. */
export function parseRelation(value: string): MappingRelation | undefined {
  switch (value.trim().toLowerCase()) {
    case '':
    case 'exact':
    case 'skos:exactmatch':
    case 'owl:equivalentclass':
    case 'equivalent':
    case 'equal':
      return 'exact';
    case 'broad':
    case 'skos:broadmatch':
    case 'wider':
    case 'subsumes':
      return 'broad';
    case 'narrow':
    case 'skos:narrowmatch':
    case 'narrower':
    case 'specializes':
      return 'narrow';
    case 'related':
    case 'close':
    case 'skos:closematch':
    case 'skos:relatedmatch':
    case 'relatedto':
    case 'inexact':
      return 'related';
  }
  return undefined;
}

export interface LoadMappingsOptions {
  columns?: ColumnRenames;
  /** Bytes read so far of the file's size (readTable's onProgress). */
  onProgress?: ProgressCallback;
}

/** Parse a `#`-prefixed YAML block (SSSOM): strip the `#` and the common indentation. */
export function parseMetadataBlock(path: string, lines: string[]): Record<string, unknown> {
  const stripped = lines.map((l) => l.slice(1));
  const indent = Math.min(...stripped.filter((l) => l.trim() !== '').map((l) => l.length - l.trimStart().length));
  const text = stripped.map((l) => l.slice(Number.isFinite(indent) ? indent : 0)).join('\n');
  try {
    const doc = parseYaml(text) as unknown;
    if (doc === null || doc === undefined) return {};
    if (typeof doc !== 'object' || Array.isArray(doc)) throw new Error('the block is not a YAML mapping of keys to values');
    return doc as Record<string, unknown>;
  } catch (err) {
    const e = err as { message: string; linePos?: { line: number; col: number }[] };
    throw new InputError('bad_metadata', `the SSSOM metadata block is not valid YAML: ${e.message.split('\n')[0]}`, {
      location: { file: path, line: e.linePos?.[0]?.line ?? 1, column: (e.linePos?.[0]?.col ?? 0) + 1 },
      fix: 'every metadata line starts with # and the text after it is YAML',
    });
  }
}

export async function loadMappings(path: string, options: LoadMappingsOptions = {}): Promise<MappingSet> {
  // A .json file is a FHIR ConceptMap (R4; exchange/fhirConceptMap.ts).
  if (/\.json$/i.test(path)) return readConceptMap(path);
  const ledger = new RowLedger(path);
  const mappings: Mapping[] = [];
  let header: string[] = [];
  let sssom = false;
  let idx: Record<string, number> = {};
  let extra: { name: string; index: number }[] = [];
  let curieMap: Record<string, string> | undefined;
  let metadata: Record<string, unknown> | undefined;
  const seen = new Map<string, number>();

  const checkCurie = (value: string, line: number, column: number): boolean => {
    if (!sssom || !curieMap) return true;
    const colon = value.indexOf(':');
    if (colon <= 0 || /^https?:/i.test(value)) return true;
    const prefix = value.slice(0, colon);
    if (SSSOM_BUILTIN_PREFIXES.includes(prefix) || prefix in curieMap) return true;
    ledger.reject(line, column, 'unknown_prefix', `the prefix ${quoteValue(prefix)} of ${quoteValue(value)} is not declared in the curie_map`, `add ${prefix}: <IRI> to the curie_map of the metadata block`);
    return false;
  };

  const info = await readTable(path, ledger, {
    header(fields, line, metadataLines) {
      header = fields;
      if (metadataLines.length > 0) {
        metadata = parseMetadataBlock(path, metadataLines);
        const cm = metadata.curie_map;
        if (cm !== undefined && (typeof cm !== 'object' || cm === null || Array.isArray(cm))) {
          throw new InputError('bad_metadata', 'curie_map in the SSSOM metadata is not a mapping of prefixes to IRIs', { location: { file: path, line: 1 }, fix: 'write curie_map: {PREFIX: IRI, …}' });
        }
        curieMap = (cm ?? {}) as Record<string, string>;
      }
      const lower = fields.map((f) => f.toLowerCase());
      sssom = lower.includes('subject_id') && lower.includes('object_id') && !lower.includes('local_code');
      // SSSOM has no slot for usage or an owning team, so these come from extension slots
      // (declared in extension_definitions): `usage` (what termdrift's SSSOM export writes) or
      // else `usage_count`; the owner is author_id, else an `owner` slot (what the export writes:
      // author_id takes CURIEs, not department names).
      const sssomRenames: Record<string, string> = { ...SSSOM_COLUMNS };
      if (!lower.includes('usage') && lower.includes('usage_count')) sssomRenames.usage = 'usage_count';
      if (!lower.includes('author_id') && lower.includes('owner')) sssomRenames.owner = 'owner';
      const renames = sssom ? { ...sssomRenames, ...options.columns } : options.columns;
      const r = resolveColumns(path, fields, line, MAPPING_COLUMNS, renames);
      idx = r.index;
      extra = r.extra;
    },
    row(f, line) {
      const localCode = clean(f[idx.local_code]);
      const targetId = clean(f[idx.target_id]);
      if (localCode === '') return void ledger.reject(line, idx.local_code + 1, 'empty_required', `${sssom ? 'subject_id' : 'local_code'} is empty`, 'give the local code');
      if (targetId === '') return void ledger.reject(line, idx.target_id + 1, 'empty_required', `${sssom ? 'object_id' : 'target_id'} is empty for ${quoteValue(localCode)}`, 'give the target concept, or remove the row');
      if (targetId === 'sssom:NoTermFound') return void ledger.reject(line, idx.target_id + 1, 'bad_value', `${quoteValue(localCode)} maps to sssom:NoTermFound: there is no target to check`, 'keep unmapped codes in a separate list');
      if (!checkCurie(targetId, line, idx.target_id + 1)) return;
      let relation: MappingRelation = 'exact';
      if (idx.relation >= 0) {
        const given = clean(f[idx.relation]);
        const parsed = parseRelation(given);
        if (parsed === undefined) return void ledger.reject(line, idx.relation + 1, 'bad_value', `unknown relation ${quoteValue(given)}`, 'use exact, broad, narrow or related (or a SKOS mapping predicate in SSSOM)');
        relation = parsed;
      }
      const extraValues: Record<string, string> = {};
      for (const e of extra) extraValues[e.name] = f[e.index];
      if (sssom && (extraValues.predicate_modifier ?? '').trim() === 'Not') {
        return void ledger.reject(line, 1, 'bad_value', `${quoteValue(localCode)} is a negated mapping (predicate_modifier Not)`, 'negated mappings state what a code is not; they are not re-scored');
      }
      let usage = 1;
      if (idx.usage >= 0) {
        const u = clean(f[idx.usage]);
        if (u !== '') {
          const n = Number(u.replace(/[_,](?=\d{3}\b)/g, ''));
          if (!Number.isFinite(n) || n < 0 || !Number.isInteger(n)) {
            ledger.warn(line, idx.usage + 1, 'bad_value', `usage ${quoteValue(u)} is not a whole number ≥ 0; 1 is used`, 'give the number of records that use the local code');
          } else usage = n;
        }
      }
      const key = `${localCode}\u0001${targetId}`;
      const first = seen.get(key);
      if (first !== undefined) return void ledger.reject(line, idx.target_id + 1, 'duplicate_row', `duplicate of line ${first}: ${quoteValue(localCode)} → ${quoteValue(targetId)}`, 'remove the duplicate row');
      seen.set(key, line);
      mappings.push({
        localCode,
        localLabel: idx.local_label >= 0 ? clean(f[idx.local_label]) : '',
        targetId,
        relation,
        usage,
        owner: idx.owner >= 0 ? clean(f[idx.owner]) : '',
        line,
        extra: extraValues,
      });
    },
  }, { metadata: true, onProgress: options.onProgress });
  return {
    path,
    sha256: info.sha256,
    accounting: ledger.finish(),
    diagnostics: ledger.diagnostics,
    format: sssom ? 'sssom' : info.delimiter === ',' ? 'csv' : 'tsv',
    mappings,
    header,
    metadata,
    curieMap,
  };
}
