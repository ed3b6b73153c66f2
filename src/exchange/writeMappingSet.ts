/**
 * writeMappingSet: write an (updated) mapping set as CSV/TSV, SSSOM TSV or a FHIR ConceptMap (R4).
 *
 * Each output row is an input mapping with its target after review. Written in the input's own
 * table format (CSV, TSV, SSSOM), a row keeps every cell as it was read, except the target and the
 * cells that describe it; so a set that went through `apply` with no decision comes out as it went
 * in, metadata block included (SSSOM: only `mapping_set_version` and `object_source_version` are
 * set). Written in another format, rows are built from the mapping's fields and kept columns.
 *
 * SSSOM (mapping-commons SSSOM TSV): a `#` YAML metadata block with curie_map, mapping_set_id,
 * license, mapping_set_version and object_source_version; then subject_id, subject_label,
 * predicate_id, object_id, object_label, mapping_justification and the other slots. Reviewed rows
 * get `mapping_justification` semapv:MappingReview and, when given, `reviewer_label` and
 * `comment` (the reviewer's note). A row whose target changed gets the new object_label and an
 * empty `confidence` (the old confidence was about the old target). Not formula-neutralised: SSSOM
 * and mapping tables are machine formats.
 *
 * FHIR ConceptMap: see fhirConceptMap.ts; group.targetVersion is the release label.
 */
import { stringify as stringifyCsv } from 'csv-stringify/sync';
import { parseDocument } from 'yaml';
import { UsageError } from '../errors.js';
import { MAPPING_COLUMNS, SSSOM_BUILTIN_PREFIXES } from '../load/loadMappings.js';
import type { Mapping, MappingRelation, MappingSet } from '../load/types.js';
import { conceptMapFromRows, type ConceptMapRow, type FhirMapInfo } from './fhirConceptMap.js';
import type { RawTable } from './rawTable.js';

export const OUTPUT_FORMATS = ['csv', 'tsv', 'sssom', 'fhir'] as const;
export type OutputFormat = (typeof OUTPUT_FORMATS)[number];

/** A reviewer's decision that keeps a mapping (retired mappings are not written). */
export interface RowReview {
  decision: 'accept' | 'keep' | 'remap';
  reviewer: string;
  note: string;
}

export interface OutputRow {
  mapping: Mapping;
  /** The target after review (the same as mapping.targetId unless accepted or remapped). */
  targetId: string;
  /** Preferred term of the new target in the new release, when the target changed ('' otherwise). */
  targetLabel: string;
  targetChanged: boolean;
  review?: RowReview;
}

export interface CuriePrefix {
  prefix: string;
  iri: string;
}

export interface WriteOptions {
  format: OutputFormat;
  /** Label of the release the set was checked against (SSSOM object_source_version, FHIR targetVersion). */
  release: string;
  /** SSSOM mapping_set_version and FHIR ConceptMap.version; default: the release label. */
  setVersion?: string;
  /** SSSOM mapping_set_id (and FHIR ConceptMap.url) when the input has none. */
  mappingSetId?: string;
  /** SSSOM license when the input has none. */
  license?: string;
  /** Prefixes for SSSOM when the input's ids are not CURIEs (e.g. a plain CSV set). */
  localPrefix?: CuriePrefix;
  targetPrefix?: CuriePrefix;
  /** FHIR group.source / group.target when the input does not say. */
  localSystem?: string;
  targetSystem?: string;
  /** FHIR ConceptMap.date (from --now); omitted when not given. */
  date?: string;
  /** The input's raw records (CSV, TSV, SSSOM input), to keep unchanged cells as they were. */
  raw?: RawTable;
}

const SKOS_PREDICATE: Record<MappingRelation, string> = {
  exact: 'skos:exactMatch',
  broad: 'skos:broadMatch',
  narrow: 'skos:narrowMatch',
  related: 'skos:relatedMatch',
};

export const REVIEW_JUSTIFICATION = 'semapv:MappingReview';
const UNSPECIFIED_JUSTIFICATION = 'semapv:UnspecifiedMatching';

const fold = (s: string) => s.trim().toLowerCase();

function writeRecords(rows: string[][], delimiter: string, eol: string): string {
  return stringifyCsv(rows, { delimiter, record_delimiter: eol === '\r\n' ? 'windows' : 'unix' });
}

/** Field index of a column by name (case-folded), -1 when absent. */
function columnIndex(header: string[], name: string): number {
  const f = fold(name);
  return header.findIndex((h) => fold(h) === f);
}

export function writeMappingSet(set: MappingSet, rows: OutputRow[], options: WriteOptions): string {
  switch (options.format) {
    case 'csv':
    case 'tsv':
      return writeTable(set, rows, options);
    case 'sssom':
      return writeSssom(set, rows, options);
    case 'fhir':
      return JSON.stringify(conceptMapFromRows(fhirRows(set, rows, options), { info: fhirInfo(set, options), targetVersion: options.release, date: options.date }), null, 2) + '\n';
  }
}

// ---------------------------------------------------------------------------
// CSV / TSV

function writeTable(set: MappingSet, rows: OutputRow[], options: WriteOptions): string {
  const delimiter = options.format === 'csv' ? ',' : '\t';
  const raw = options.raw;
  const sameFormat = raw && (set.format === options.format);
  if (sameFormat) {
    const header = raw.header;
    const target = columnIndex(header, 'target_id');
    const label = columnIndex(header, 'target_label');
    const out: string[][] = [header];
    for (const r of rows) {
      const fields = [...(raw.records.get(r.mapping.line) ?? [])];
      if (r.targetChanged) {
        fields[target] = r.targetId;
        if (label >= 0) fields[label] = r.targetLabel;
      }
      out.push(fields);
    }
    return writeRecords(out, delimiter, raw.eol);
  }
  // Another format in: our columns, then the kept ones.
  const known = MAPPING_COLUMNS.map((c) => c.name);
  const extras = extraNames(set).filter((n) => !known.includes(n));
  const header = [...known, ...extras.filter((n) => n !== 'target_label'), 'target_label'];
  const out: string[][] = [header];
  for (const r of rows) {
    const m = r.mapping;
    const values: Record<string, string> = { ...m.extra, local_code: m.localCode, local_label: m.localLabel, target_id: r.targetId, relation: m.relation, usage: String(m.usage), owner: m.owner };
    values.target_label = r.targetChanged ? r.targetLabel : (m.extra.target_label ?? m.extra.object_label ?? '');
    out.push(header.map((h) => values[h] ?? ''));
  }
  return writeRecords(out, delimiter, '\n');
}

/** Names of the kept columns, in first-seen order. */
function extraNames(set: MappingSet): string[] {
  const names: string[] = [];
  for (const m of set.mappings) for (const k of Object.keys(m.extra)) if (!names.includes(k)) names.push(k);
  return names;
}

// ---------------------------------------------------------------------------
// SSSOM

/** The metadata block's YAML text, without its `#` and common indentation. */
function metadataText(lines: string[]): string {
  const stripped = lines.map((l) => l.replace(/\r$/, '').slice(1));
  const indent = Math.min(...stripped.filter((l) => l.trim() !== '').map((l) => l.length - l.trimStart().length));
  return stripped.map((l) => l.slice(Number.isFinite(indent) ? indent : 0)).join('\n');
}

function hashBlock(yamlText: string): string {
  return yamlText.replace(/\n+$/, '').split('\n').map((l) => `#${l}`).join('\n') + '\n';
}

function splitCurie(id: string): { prefix: string; local: string } | null {
  const colon = id.indexOf(':');
  if (colon <= 0 || /^https?:/i.test(id)) return null;
  return { prefix: id.slice(0, colon), local: id.slice(colon + 1) };
}

function toCurie(id: string, prefix: CuriePrefix | undefined, what: string, flag: string): string {
  if (prefix) return id.startsWith(`${prefix.prefix}:`) ? id : `${prefix.prefix}:${id}`;
  throw new UsageError(`SSSOM needs CURIEs: the ${what} ${JSON.stringify(id)} has no declared prefix`, `give ${flag} PREFIX=IRI (e.g. ${flag} LOCAL=https://example.org/local-codes/)`);
}

function writeSssom(set: MappingSet, rows: OutputRow[], options: WriteOptions): string {
  const version = options.setVersion ?? options.release;
  const needReviewer = rows.some((r) => r.review && r.review.reviewer);
  const needComment = rows.some((r) => r.review && r.review.note);
  if (set.format === 'sssom' && options.raw) {
    const raw = options.raw;
    const doc = parseDocument(metadataText(raw.metadataLines));
    doc.set('mapping_set_version', version);
    doc.set('object_source_version', options.release);
    const header = [...raw.header];
    if (needReviewer && columnIndex(header, 'reviewer_label') < 0) header.push('reviewer_label');
    if (needComment && columnIndex(header, 'comment') < 0) header.push('comment');
    const col = (n: string) => columnIndex(header, n);
    const [objectId, objectLabel, justification, confidence, reviewer, comment, osv] = ['object_id', 'object_label', 'mapping_justification', 'confidence', 'reviewer_label', 'comment', 'object_source_version'].map(col);
    const out: string[][] = [header];
    for (const r of rows) {
      const fields = [...(raw.records.get(r.mapping.line) ?? [])];
      while (fields.length < header.length) fields.push('');
      if (r.targetChanged) {
        fields[objectId] = r.targetId;
        if (objectLabel >= 0) fields[objectLabel] = r.targetLabel;
        if (confidence >= 0) fields[confidence] = '';
      }
      if (osv >= 0) fields[osv] = options.release;
      if (r.review) {
        if (justification >= 0) fields[justification] = REVIEW_JUSTIFICATION;
        if (reviewer >= 0 && r.review.reviewer) fields[reviewer] = r.review.reviewer;
        if (comment >= 0 && r.review.note) fields[comment] = r.review.note;
      }
      out.push(fields);
    }
    return hashBlock(doc.toString({ lineWidth: 0 })) + writeRecords(out, '\t', '\n');
  }

  // From a plain table or a ConceptMap: build the metadata and the rows.
  const setId = options.mappingSetId ?? (set.metadata?.fhir as FhirMapInfo | undefined)?.url;
  if (!setId || !/^[a-z][a-z0-9+.-]*:/i.test(setId)) throw new UsageError('SSSOM needs a mapping_set_id (an absolute URI) and the input has none', 'give --set-id URI, e.g. --set-id https://example.org/mappings/local-to-terminology');
  if (!options.license) throw new UsageError('SSSOM needs a license for the mapping set and the input has none', 'give --license URI, e.g. --license https://creativecommons.org/publicdomain/zero/1.0/');
  const curieMap: Record<string, string> = {};
  for (const p of [options.localPrefix, options.targetPrefix]) if (p) curieMap[p.prefix] = p.iri;
  const known = new Set(MAPPING_COLUMNS.map((c) => c.name));
  const skip = new Set(['target_label', 'comment', 'source_system', 'source_version', 'target_system']);
  const extensions = extraNames(set).filter((n) => !known.has(n) && !skip.has(n));
  if (set.mappings.some((m) => m.usage !== 1)) extensions.unshift('usage');
  if (set.mappings.some((m) => m.owner)) extensions.push('owner');
  const slots = [...new Set(extensions)].map((n) => n.replace(/[^A-Za-z0-9_]/g, '_'));
  const header = ['subject_id', 'subject_label', 'predicate_id', 'object_id', 'object_label', 'mapping_justification', 'reviewer_label', 'comment', ...slots].filter((h) => (h !== 'reviewer_label' || needReviewer) && (h !== 'comment' || needComment || set.mappings.some((m) => m.extra.comment)));
  const meta: Record<string, unknown> = {
    curie_map: curieMap,
    mapping_set_id: setId,
    mapping_set_version: version,
    license: options.license,
    object_source_version: options.release,
  };
  if (slots.length) meta.extension_definitions = slots.map((s) => ({ slot_name: s, property: `${setId}#${s}`, type_hint: s === 'usage' ? 'xsd:integer' : 'xsd:string' }));
  const out: string[][] = [header];
  for (const r of rows) {
    const m = r.mapping;
    const subject = toCurie(m.localCode, options.localPrefix, 'local code', '--local-prefix');
    const object = toCurie(r.targetId, options.targetPrefix, 'target', '--target-prefix');
    for (const id of [subject, object]) {
      const c = splitCurie(id);
      if (c && !(c.prefix in curieMap) && !SSSOM_BUILTIN_PREFIXES.includes(c.prefix)) throw new UsageError(`the prefix "${c.prefix}" of ${JSON.stringify(id)} is not declared`, 'give it with --local-prefix or --target-prefix PREFIX=IRI');
    }
    const values: Record<string, string> = {
      subject_id: subject,
      subject_label: m.localLabel,
      predicate_id: SKOS_PREDICATE[m.relation],
      object_id: object,
      object_label: r.targetChanged ? r.targetLabel : (m.extra.target_label ?? ''),
      mapping_justification: r.review ? REVIEW_JUSTIFICATION : UNSPECIFIED_JUSTIFICATION,
      reviewer_label: r.review?.reviewer ?? '',
      comment: r.review?.note || (r.targetChanged ? '' : (m.extra.comment ?? '')),
      usage: String(m.usage),
      owner: m.owner,
    };
    extensions.forEach((n, i) => {
      if (!(slots[i] in values)) values[slots[i]] = m.extra[n] ?? '';
    });
    out.push(header.map((h) => values[h] ?? ''));
  }
  const doc = parseDocument('');
  doc.contents = doc.createNode(meta) as typeof doc.contents;
  return hashBlock(doc.toString({ lineWidth: 0 })) + writeRecords(out, '\t', '\n');
}

// ---------------------------------------------------------------------------
// FHIR ConceptMap

function fhirInfo(set: MappingSet, options: WriteOptions): FhirMapInfo {
  const version = options.setVersion ?? options.release;
  const fromFhir = set.metadata?.fhir as FhirMapInfo | undefined;
  if (fromFhir) {
    const { id, url, name, title, status, publisher, description, source, target } = fromFhir;
    return { id, url: options.mappingSetId ?? url, version, name, title, status, publisher, description, source, target };
  }
  const meta = set.metadata ?? {};
  const s = (k: string) => (typeof meta[k] === 'string' ? (meta[k] as string) : undefined);
  return { url: options.mappingSetId ?? s('mapping_set_id'), version, title: s('mapping_set_title'), description: s('mapping_set_description') };
}

function fhirRows(set: MappingSet, rows: OutputRow[], options: WriteOptions): ConceptMapRow[] {
  const curieMap = set.curieMap ?? {};
  const system = (id: string, given: string | undefined, kept: string | undefined, flag: string, what: string): { system: string; code: string } => {
    if (given) return { system: given, code: id };
    if (kept) return { system: kept, code: id };
    const c = set.format === 'sssom' ? splitCurie(id) : null;
    if (c && curieMap[c.prefix]) return { system: curieMap[c.prefix], code: c.local };
    throw new UsageError(`a FHIR ConceptMap names the code system of every code, and the system of the ${what} ${JSON.stringify(id)} is not known`, `give ${flag} URI (e.g. ${flag} https://example.org/CodeSystem/local-codes)`);
  };
  return rows.map((r) => {
    const m = r.mapping;
    const src = system(m.localCode, options.localSystem, m.extra.source_system || undefined, '--local-system', 'local code');
    const tgt = system(r.targetId, options.targetSystem, m.extra.target_system || undefined, '--target-system', 'target');
    const keptComment = r.targetChanged ? '' : (m.extra.comment ?? '');
    return {
      localCode: src.code,
      localLabel: m.localLabel,
      targetId: tgt.code,
      targetLabel: r.targetChanged ? r.targetLabel : (m.extra.target_label ?? m.extra.object_label ?? ''),
      relation: m.relation,
      comment: r.review?.note || keptComment,
      sourceSystem: src.system,
      sourceVersion: m.extra.source_version ?? '',
      targetSystem: tgt.system,
    };
  });
}
