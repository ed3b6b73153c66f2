/**
 * Importer for the IANA Language Subtag Registry (BCP 47, RFC 5646 section 3.1): turns one
 * registry file into termdrift release tables.
 *
 * Two input forms carry the same records:
 *  - the registry's own record-jar text (`parseLanguageSubtagRegistry`);
 *  - the JSON of the npm package `language-subtag-registry` (`data/json/registry.json`
 *    plus `data/json/meta.json` for the File-Date), which ships no raw text
 *    (`parseLanguageSubtagRegistryJson`). `loadLanguageSubtagRegistry` picks the form.
 *
 * The JSON comes in two layouts. From 0.4 on, each array element is one field, its folded
 * lines already joined ("fields"). Before 0.4 the package's importer pushed every physical
 * line of a multi-valued field as its own element ("lines"), so a folded Description or
 * Comments field is split in pieces that look like repeated fields. For that layout we join
 * all Comments pieces into one comment, and join a Description piece onto the one before
 * it when that one cannot end a Description (`descriptionContinues`); `counts` says how
 * many pieces were joined. The layout is read from the package's package.json.
 *
 * Mapping (`languageSubtagsToRelease`):
 *  - concept_id = `type:subtag`, or `type:tag` for grandfathered and redundant records;
 *  - terms = the Description fields, the first preferred, the rest synonyms;
 *  - status = inactive when Deprecated is set; category = the record's Type;
 *  - history: a deprecated record with a Preferred-Value → `replaced_by` its target; a
 *    record that is not deprecated but has one (extlang records, whose Preferred-Value is
 *    the equivalent language subtag) → `same_as`; a deprecated record whose Comments say
 *    "see X, Y" → one `consider` row per record named (the publisher names the records its
 *    meaning went to and leaves the choice to the user, which is what OBO's `consider`
 *    says; "see also X" names a related record and writes no row);
 *  - hierarchy: Macrolanguage → the record is encompassed by that language;
 *  - publisher notes: for every deprecated record, its Deprecated date, Preferred-Value and
 *    Comments, with the ids named by comments of the form "see X, Y" / "see X and Y".
 *
 * Preferred-Value targets follow RFC 5646 section 3.1.7 (from our reading of it): for
 * language, script, region and variant records it is a subtag of the same type; for extlang
 * records a language subtag; for grandfathered and redundant records a whole tag, which we
 * resolve to a grandfathered/redundant record with that Tag, else (one subtag) a language,
 * else keep it as `tag:<value>` (a composite tag is no record of the registry) and count it.
 */
import { promises as fsp } from 'node:fs';
import { dirname, join } from 'node:path';
import { InputError } from '../errors.js';
import { parseRecordJar, type JarAccounting } from './recordJar.js';
import type { HierarchyRow, HistoryRow, ImportDiagnostic, ReleaseRow } from './types.js';

export { writeReleaseTables } from './writeTables.js';

/** The record types RFC 5646 section 3.1.3 defines. */
export const REGISTRY_TYPES = ['language', 'extlang', 'script', 'region', 'variant', 'grandfathered', 'redundant'] as const;
export type RegistryType = (typeof REGISTRY_TYPES)[number];

/** Types whose records are whole tags (field `Tag`) rather than subtags (field `Subtag`). */
const TAG_TYPES: ReadonlySet<string> = new Set(['grandfathered', 'redundant']);

/** Fields that may occur more than once in a record (RFC 5646 section 3.1.2). */
const MULTI_VALUED: ReadonlySet<string> = new Set(['description', 'prefix', 'comments']);

/** One registry record. Field values are as given (record-jar values unfolded). */
export interface LanguageSubtagRecord {
  type: string;
  /** Subtag records: the subtag. */
  subtag?: string;
  /** Grandfathered and redundant records: the whole tag. */
  tag?: string;
  descriptions: string[];
  added?: string;
  deprecated?: string;
  preferredValue?: string;
  macrolanguage?: string;
  scope?: string;
  suppressScript?: string;
  prefixes: string[];
  comments: string[];
  /** Every field as given, keyed by the field name as spelled in the input, in input order. */
  fields: Record<string, string[]>;
  /** Line of the record's first field (record-jar) or of its opening brace (JSON). */
  line: number;
}

export interface ParsedLanguageSubtagRegistry {
  /** The registry's File-Date (YYYY-MM-DD). */
  fileDate: string;
  records: LanguageSubtagRecord[];
  format: 'record-jar' | 'json';
  /** The file the records came from (as given to the parser). */
  file: string;
  /** Row-level problems; rejected records are not in `records`. */
  diagnostics: ImportDiagnostic[];
  /** records read (File-Date record excluded) = used + rejected. */
  accounting: {
    recordsRead: number;
    used: number;
    rejected: number;
    /** Record-jar input: how every physical line was read. */
    lines?: JarAccounting;
    /** JSON "lines" layout: pieces of folded Description fields joined onto the piece before them. */
    descriptionPiecesJoined?: number;
    /** JSON "lines" layout: pieces of Comments joined into one comment. */
    commentPiecesJoined?: number;
  };
  /** JSON input: the layout it was read with. */
  jsonLayout?: JsonLayout;
}

/** How the JSON of `language-subtag-registry` holds multi-valued fields (see the file header). */
export type JsonLayout = 'fields' | 'lines';

/** The publisher's own account of one deprecated record. */
export interface PublisherNote {
  /** Concept id of the deprecated record. */
  id: string;
  /** The Deprecated date. */
  deprecated: string;
  /** Preferred-Value as given, or null. */
  preferredValue: string | null;
  /** Concept id the Preferred-Value resolves to, or null when there is none. */
  preferredId: string | null;
  /** The Comments fields as given. */
  comments: string[];
  /** Concept ids named by comments of the form "see X, Y", "see X and Y", "see X, Y, or Z". */
  seeAlso: string[];
  /** Tag named by a comment "Preferred tag is X" (used by deprecated variants), or null. */
  preferredTag: string | null;
}

export interface LanguageSubtagRelease {
  fileDate: string;
  release: ReleaseRow[];
  history: HistoryRow[];
  hierarchy: HierarchyRow[];
  notes: PublisherNote[];
  diagnostics: ImportDiagnostic[];
  counts: Record<string, number>;
}

// ---------------------------------------------------------------------------------------
// Parsing

type FieldBag = Map<string, { name: string; values: string[] }>;

interface Builder {
  file: string;
  diagnostics: ImportDiagnostic[];
  seen: Map<string, number>;
  records: LanguageSubtagRecord[];
  rejected: number;
}

function reject(b: Builder, line: number, code: ImportDiagnostic['code'], message: string, fix: string): void {
  b.rejected++;
  b.diagnostics.push({ file: b.file, line, column: 1, severity: 'error', code, message, fix, rejected: true });
}

function warn(b: Builder, line: number, code: ImportDiagnostic['code'], message: string, fix: string): void {
  b.diagnostics.push({ file: b.file, line, column: 1, severity: 'warning', code, message, fix, rejected: false });
}

/** Validate one record's fields and add it; rejected records get a diagnostic. */
function addRecord(b: Builder, bag: FieldBag, line: number): void {
  const one = (key: string): string | undefined => {
    const f = bag.get(key);
    if (f === undefined) return undefined;
    if (f.values.length > 1 && !MULTI_VALUED.has(key)) {
      warn(b, line, 'bad_value', `record has ${f.values.length} "${f.name}" fields; the first, ${JSON.stringify(f.values[0])}, is kept`, `give "${f.name}" once per record`);
    }
    const v = f.values[0].trim();
    return v === '' ? undefined : v;
  };
  const many = (key: string): string[] => (bag.get(key)?.values ?? []).map((v) => v.trim()).filter((v) => v !== '');

  const type = one('type');
  if (type === undefined) {
    reject(b, line, 'empty_required', 'record has no Type field', 'give every record a "Type:" field (language, extlang, script, region, variant, grandfathered or redundant)');
    return;
  }
  const isTag = TAG_TYPES.has(type);
  const key = isTag ? one('tag') : one('subtag');
  if (key === undefined) {
    const field = isTag ? 'Tag' : 'Subtag';
    reject(b, line, 'empty_required', `${type} record has no ${field} field`, `give the record a "${field}:" field`);
    return;
  }
  const descriptions = many('description');
  if (descriptions.length === 0) {
    reject(b, line, 'empty_required', `record ${type}:${key} has no Description`, 'give the record at least one "Description:" field');
    return;
  }
  if (!(REGISTRY_TYPES as readonly string[]).includes(type)) {
    warn(b, line, 'bad_value', `record ${type}:${key} has Type ${JSON.stringify(type)}, which RFC 5646 does not define; it is kept with that category`, `use one of: ${REGISTRY_TYPES.join(', ')}`);
  }
  const id = `${type}:${key}`;
  const earlier = b.seen.get(id.toLowerCase());
  if (earlier !== undefined) {
    reject(b, line, 'duplicate_row', `record ${id} repeats the record on line ${earlier}`, 'remove one of the two records');
    return;
  }
  b.seen.set(id.toLowerCase(), line);

  const fields: Record<string, string[]> = {};
  for (const f of bag.values()) fields[f.name] = [...f.values];
  const rec: LanguageSubtagRecord = { type, descriptions, prefixes: many('prefix'), comments: many('comments'), fields, line };
  if (isTag) rec.tag = key;
  else rec.subtag = key;
  const optional: [keyof LanguageSubtagRecord, string][] = [
    ['added', 'added'],
    ['deprecated', 'deprecated'],
    ['preferredValue', 'preferred-value'],
    ['macrolanguage', 'macrolanguage'],
    ['scope', 'scope'],
    ['suppressScript', 'suppress-script'],
  ];
  for (const [prop, name] of optional) {
    const v = one(name);
    if (v !== undefined) (rec as unknown as Record<string, string>)[prop] = v;
  }
  b.records.push(rec);
}

function addField(bag: FieldBag, name: string, value: string): void {
  const key = name.toLowerCase();
  const had = bag.get(key);
  if (had) had.values.push(value);
  else bag.set(key, { name, values: [value] });
}

/**
 * Parse the registry's record-jar text (RFC 5646 section 3.1.1). The first record must hold
 * File-Date (section 3.1.2); every later record is one subtag or tag.
 * Throws InputError for a file with no records or no File-Date; record-level problems are
 * returned as diagnostics.
 */
export function parseLanguageSubtagRegistry(text: string, options: { file?: string } = {}): ParsedLanguageSubtagRegistry {
  const file = options.file ?? '<text>';
  const jar = parseRecordJar(text, { file });
  if (jar.records.length === 0) {
    throw new InputError('empty_file', 'the registry has no records', { location: { file }, fix: 'give the IANA Language Subtag Registry file (record-jar text, records separated by "%%")' });
  }
  const head = jar.records[0];
  const dateField = head.fields.find((f) => f.name.toLowerCase() === 'file-date');
  if (dateField === undefined) {
    throw new InputError('bad_metadata', 'the first record has no File-Date field', {
      location: { file, line: head.line, column: 1 },
      fix: 'the registry must begin with a record "File-Date: YYYY-MM-DD" (RFC 5646 section 3.1.2)',
    });
  }
  const b: Builder = { file, diagnostics: [...jar.diagnostics], seen: new Map(), records: [], rejected: 0 };
  for (let i = 1; i < jar.records.length; i++) {
    const r = jar.records[i];
    const bag: FieldBag = new Map();
    for (const f of r.fields) addField(bag, f.name, f.value);
    addRecord(b, bag, r.line);
  }
  const recordsRead = jar.records.length - 1;
  return {
    fileDate: dateField.value.trim(),
    records: b.records,
    format: 'record-jar',
    file,
    diagnostics: b.diagnostics,
    accounting: { recordsRead, used: b.records.length, rejected: b.rejected, lines: jar.accounting },
  };
}

/**
 * Line (1-based) on which each element of a top-level JSON array begins, found by a scan that
 * tracks strings and nesting. Used only to name lines in diagnostics.
 */
export function topLevelElementLines(text: string): number[] {
  const lines: number[] = [];
  let line = 1;
  let depth = 0;
  let inString = false;
  let expectElement = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) line++;
    if (inString) {
      if (c === 92 /* \ */) {
        if (text.charCodeAt(i + 1) === 10) line++;
        i++;
      } else if (c === 34) inString = false;
      continue;
    }
    if (c === 32 || c === 9 || c === 10 || c === 13) continue;
    if (depth === 1 && expectElement && c !== 93 /* ] */) {
      lines.push(line);
      expectElement = false;
    }
    if (c === 34) inString = true;
    else if (c === 91 /* [ */ || c === 123 /* { */) {
      depth++;
      if (depth === 1 && c === 91) expectElement = true;
    } else if (c === 93 || c === 125) depth--;
    else if (c === 44 /* , */ && depth === 1) expectElement = true;
  }
  return lines;
}

function parseJson(text: string, file: string): unknown {
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new InputError('bad_json', `not valid JSON: ${(e as Error).message}`, { location: { file }, fix: 'give the registry.json of the language-subtag-registry package, unmodified' });
  }
}

/**
 * Parse the JSON form shipped by the npm package `language-subtag-registry`: an array of
 * records whose values are strings or arrays of strings (`registry.json`), and
 * `{"File-Date": ...}` (`meta.json`).
 */
export function parseLanguageSubtagRegistryJson(
  registryJson: string,
  metaJson: string,
  options: { file?: string; metaFile?: string; layout?: JsonLayout } = {},
): ParsedLanguageSubtagRegistry {
  const file = options.file ?? '<registry.json>';
  const layout = options.layout ?? 'fields';
  let descriptionPiecesJoined = 0;
  let commentPiecesJoined = 0;
  const metaFile = options.metaFile ?? '<meta.json>';
  const meta = parseJson(metaJson, metaFile) as Record<string, unknown> | null;
  const fileDate = meta !== null && typeof meta === 'object' ? meta['File-Date'] : undefined;
  if (typeof fileDate !== 'string' || fileDate.trim() === '') {
    throw new InputError('bad_metadata', 'meta.json has no "File-Date" string', { location: { file: metaFile }, fix: 'give the meta.json shipped beside registry.json' });
  }
  const data = parseJson(registryJson, file);
  if (!Array.isArray(data)) {
    throw new InputError('bad_json', 'registry.json is not a JSON array of records', { location: { file, line: 1, column: 1 }, fix: 'give data/json/registry.json of the language-subtag-registry package' });
  }
  if (data.length === 0) {
    throw new InputError('empty_file', 'registry.json holds no records', { location: { file }, fix: 'give data/json/registry.json of the language-subtag-registry package' });
  }
  const lines = topLevelElementLines(registryJson);
  const b: Builder = { file, diagnostics: [], seen: new Map(), records: [], rejected: 0 };
  data.forEach((item: unknown, index: number) => {
    const line = lines[index] ?? 0;
    if (item === null || typeof item !== 'object' || Array.isArray(item)) {
      reject(b, line, 'bad_value', `element ${index + 1} of the array is not an object`, 'every element must be one record object');
      return;
    }
    const bag: FieldBag = new Map();
    for (const [name, value] of Object.entries(item as Record<string, unknown>)) {
      if (typeof value === 'string') addField(bag, name, value);
      else if (Array.isArray(value) && value.every((v) => typeof v === 'string')) {
        let values = value as string[];
        if (layout === 'lines' && values.length > 1) {
          const key = name.toLowerCase();
          if (key === 'comments') {
            values = [values.join(' ')];
            commentPiecesJoined += value.length - 1;
          } else if (key === 'description') {
            values = joinFoldedDescriptions(values);
            descriptionPiecesJoined += value.length - values.length;
          }
        }
        for (const v of values) addField(bag, name, v);
      } else {
        warn(b, line, 'bad_value', `field "${name}" of element ${index + 1} is neither a string nor an array of strings; it is left out`, 'give field values as strings or arrays of strings');
      }
    }
    addRecord(b, bag, line);
  });
  return {
    fileDate: fileDate.trim(),
    records: b.records,
    format: 'json',
    file,
    diagnostics: b.diagnostics,
    accounting: { recordsRead: data.length, used: b.records.length, rejected: b.rejected, descriptionPiecesJoined, commentPiecesJoined },
    jsonLayout: layout,
  };
}

/** Words a Description does not end with; a piece ending in one continues on the next. */
const CONTINUING_WORDS: ReadonlySet<string> = new Set(['a', 'an', 'and', 'as', 'at', 'by', 'de', 'del', 'des', 'du', 'for', 'from', 'in', 'la', 'le', 'of', 'on', 'or', 'the', 'to', 'with', 'y']);

const count = (s: string, re: RegExp) => (s.match(re) ?? []).length;

/**
 * True when Description piece `prev` cannot end a Description, so `next` is the rest of the
 * same folded field: `prev` leaves a bracket or double quote open, ends in a comma or hyphen,
 * or ends in a function word; or both pieces are comma-separated lists (a list of names
 * folded across lines). Checked in tests against the 0.4 JSON, whose values are unfolded.
 */
export function descriptionContinues(prev: string, next: string): boolean {
  if (count(prev, /[([]/g) > count(prev, /[)\]]/g)) return true;
  if (count(prev, /"/g) % 2 === 1) return true;
  if (/[,\-\u2013]$/.test(prev)) return true;
  const last = prev.slice(prev.lastIndexOf(' ') + 1);
  if (CONTINUING_WORDS.has(last)) return true;
  return prev.includes(', ') && next.includes(', ');
}

/** Join the pieces of folded Descriptions ("lines" layout). */
export function joinFoldedDescriptions(pieces: readonly string[]): string[] {
  const out: string[] = [];
  for (const piece of pieces) {
    if (out.length > 0 && descriptionContinues(out[out.length - 1], piece)) out[out.length - 1] = `${out[out.length - 1]} ${piece}`;
    else out.push(piece);
  }
  return out;
}

/**
 * Layout of a registry.json from the package.json of the package holding it
 * (`<pkg>/data/json/registry.json`): "lines" for language-subtag-registry before 0.4.
 */
export async function jsonLayoutOf(registryPath: string): Promise<JsonLayout> {
  const pkgPath = join(dirname(registryPath), '..', '..', 'package.json');
  let pkg: { name?: unknown; version?: unknown };
  try {
    pkg = JSON.parse(await fsp.readFile(pkgPath, 'utf8'));
  } catch {
    return 'fields';
  }
  if (pkg.name !== 'language-subtag-registry' || typeof pkg.version !== 'string') return 'fields';
  const [major, minor] = pkg.version.split('.').map(Number);
  return major === 0 && minor < 4 ? 'lines' : 'fields';
}

async function statOf(path: string) {
  try {
    return await fsp.stat(path);
  } catch {
    return null;
  }
}

async function readText(path: string): Promise<string> {
  try {
    return await fsp.readFile(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError('file_not_found', `no such file: ${path}`, { location: { file: path }, fix: 'check the path' });
    throw new InputError('file_unreadable', `cannot read ${path}: ${(e as Error).message}`, { location: { file: path }, fix: 'check the file permissions' });
  }
}

/**
 * Read a registry from `input`: the record-jar text file, a `registry.json` (with `meta.json`
 * beside it), or a folder holding either (an installed `language-subtag-registry` package,
 * its `data/json` folder, or a folder with the text file `language-subtag-registry`).
 */
export async function loadLanguageSubtagRegistry(input: string): Promise<ParsedLanguageSubtagRegistry> {
  if ((await statOf(input))?.isDirectory()) {
    const candidates = [join(input, 'data', 'json', 'registry.json'), join(input, 'registry.json'), join(input, 'language-subtag-registry')];
    for (const candidate of candidates) {
      if ((await statOf(candidate))?.isFile()) return loadLanguageSubtagRegistry(candidate);
    }
    throw new InputError('file_not_found', `found no registry in folder ${input}`, {
      location: { file: input },
      fix: 'give the registry text file, a registry.json, or the folder of the language-subtag-registry package',
    });
  }
  const text = await readText(input);
  const firstChar = text.trimStart().charAt(0);
  if (firstChar === '[' || firstChar === '{') {
    const metaPath = join(dirname(input), 'meta.json');
    const meta = await readText(metaPath);
    return parseLanguageSubtagRegistryJson(text, meta, { file: input, metaFile: metaPath, layout: await jsonLayoutOf(input) });
  }
  return parseLanguageSubtagRegistry(text, { file: input });
}

// ---------------------------------------------------------------------------------------
// Mapping to release tables

/** Concept id of a record: `type:subtag` or `type:tag`. */
export function conceptIdOf(rec: Pick<LanguageSubtagRecord, 'type' | 'subtag' | 'tag'>): string {
  return `${rec.type}:${rec.subtag ?? rec.tag}`;
}

const SEE_ITEM = /^([A-Za-z0-9]{1,8}(?:-[A-Za-z0-9]{1,8})*)(?:\s+for\s+\S.*)?$/;

/**
 * Codes named by a comment of the form "see X, Y", "see X and Y", "see X, Y, and Z",
 * "see X, Y, or Z" or "see X for A or Y for B"; null when the comment is not of that form
 * (including "see also X", which names a related record, not a successor).
 */
export function parseSeeComment(comment: string): string[] | null {
  const m = /^see\s+(.+?)\.?$/i.exec(comment.trim());
  if (m === null || /^also\b/i.test(m[1])) return null;
  const items = m[1].split(/\s*,\s*(?:(?:and|or)\s+)?|\s+(?:and|or)\s+/i);
  const codes: string[] = [];
  for (const item of items) {
    const im = SEE_ITEM.exec(item.trim());
    if (im === null) return null;
    codes.push(im[1]);
  }
  return codes.length > 0 ? codes : null;
}

/** Tag named by a comment "Preferred tag is X", or null. */
export function parsePreferredTagComment(comment: string): string | null {
  const m = /^preferred tag is\s+([A-Za-z0-9]{1,8}(?:-[A-Za-z0-9]{1,8})*)\.?$/i.exec(comment.trim());
  return m === null ? null : m[1];
}

/** Looks up concept ids by code, case-insensitively (BCP 47 subtags are case-insensitive). */
class IdIndex {
  private readonly byId = new Map<string, string>();
  constructor(records: readonly LanguageSubtagRecord[]) {
    for (const r of records) this.byId.set(conceptIdOf(r).toLowerCase(), conceptIdOf(r));
  }
  /** The id of the record of `type` with this code, if there is one. */
  get(type: string, code: string): string | undefined {
    return this.byId.get(`${type}:${code}`.toLowerCase());
  }
  /** First type in `types` that has a record with this code. */
  find(code: string, types: readonly string[]): string | undefined {
    for (const t of types) {
      const id = this.get(t, code);
      if (id !== undefined) return id;
    }
    return undefined;
  }
}

/** Where a Preferred-Value points, and whether that is a record of this registry. */
function resolvePreferredValue(rec: LanguageSubtagRecord, ids: IdIndex): { id: string; kind: 'record' | 'missing' | 'composite' } {
  const pv = rec.preferredValue!;
  const sameType = rec.type === 'language' || rec.type === 'script' || rec.type === 'region' || rec.type === 'variant';
  if (sameType) {
    const id = ids.get(rec.type, pv);
    return id !== undefined ? { id, kind: 'record' } : { id: `${rec.type}:${pv}`, kind: 'missing' };
  }
  if (rec.type === 'extlang') {
    const id = ids.get('language', pv);
    return id !== undefined ? { id, kind: 'record' } : { id: `language:${pv}`, kind: 'missing' };
  }
  const asTag = ids.find(pv, ['grandfathered', 'redundant']);
  if (asTag !== undefined) return { id: asTag, kind: 'record' };
  if (!pv.includes('-')) {
    const id = ids.get('language', pv);
    return id !== undefined ? { id, kind: 'record' } : { id: `language:${pv}`, kind: 'missing' };
  }
  return { id: `tag:${pv}`, kind: 'composite' };
}

/** Types to try, in order, for a code named in a comment of a record of `type`. */
function seeTypes(type: string): string[] {
  const order = [type, 'language', ...REGISTRY_TYPES];
  return [...new Set(order)];
}

/** Map parsed registry records to termdrift's tables (see the file header for the mapping). */
export function languageSubtagsToRelease(parsed: ParsedLanguageSubtagRegistry): LanguageSubtagRelease {
  const ids = new IdIndex(parsed.records);
  const release: ReleaseRow[] = [];
  const history: HistoryRow[] = [];
  const hierarchy: HierarchyRow[] = [];
  const notes: PublisherNote[] = [];
  const diagnostics: ImportDiagnostic[] = [];
  const counts: Record<string, number> = {
    records: parsed.records.length,
    recordsRejected: parsed.accounting.rejected,
    conceptsActive: 0,
    conceptsInactive: 0,
    preferredTerms: 0,
    synonyms: 0,
    duplicateDescriptionsDropped: 0,
    historyReplacedBy: 0,
    historySameAs: 0,
    historyConsider: 0,
    historyTargetsComposite: 0,
    historyTargetsMissing: 0,
    hierarchyEdges: 0,
    hierarchyParentsMissing: 0,
    publisherNotes: 0,
    notesWithSeeList: 0,
    seeCodesUnresolved: 0,
  };
  for (const t of REGISTRY_TYPES) counts[`type.${t}`] = 0;

  for (const rec of parsed.records) {
    const id = conceptIdOf(rec);
    const status = rec.deprecated !== undefined ? 'inactive' : 'active';
    counts[`type.${rec.type}`] = (counts[`type.${rec.type}`] ?? 0) + 1;
    counts[status === 'active' ? 'conceptsActive' : 'conceptsInactive']++;

    const seenTerms = new Set<string>();
    for (const d of rec.descriptions) {
      if (seenTerms.has(d)) {
        counts.duplicateDescriptionsDropped++;
        diagnostics.push({ file: parsed.file, line: rec.line, column: 1, severity: 'warning', code: 'duplicate_row', message: `record ${id} repeats the Description ${JSON.stringify(d)}; written once`, fix: 'give each Description once', rejected: false });
        continue;
      }
      const preferred = seenTerms.size === 0;
      seenTerms.add(d);
      release.push({ concept_id: id, term: d, term_type: preferred ? 'preferred' : 'synonym', status, category: rec.type });
      counts[preferred ? 'preferredTerms' : 'synonyms']++;
    }

    let preferredId: string | null = null;
    if (rec.preferredValue !== undefined) {
      const target = resolvePreferredValue(rec, ids);
      preferredId = target.id;
      if (target.kind === 'composite') counts.historyTargetsComposite++;
      if (target.kind === 'missing') {
        counts.historyTargetsMissing++;
        diagnostics.push({ file: parsed.file, line: rec.line, column: 1, severity: 'warning', code: 'bad_value', message: `record ${id} has Preferred-Value ${JSON.stringify(rec.preferredValue)}, which is no record of this registry; the history row points to ${target.id}`, fix: 'check the Preferred-Value', rejected: false });
      }
      const relation = rec.deprecated !== undefined ? 'replaced_by' : 'same_as';
      history.push({ old_id: id, new_id: target.id, relation });
      counts[relation === 'replaced_by' ? 'historyReplacedBy' : 'historySameAs']++;
    }

    if (rec.macrolanguage !== undefined) {
      const parent = ids.get('language', rec.macrolanguage);
      if (parent === undefined) counts.hierarchyParentsMissing++;
      hierarchy.push({ concept_id: id, parent_id: parent ?? `language:${rec.macrolanguage}` });
      counts.hierarchyEdges++;
    }

    if (rec.deprecated !== undefined) {
      const seeAlso: string[] = [];
      let preferredTag: string | null = null;
      let hadList = false;
      for (const c of rec.comments) {
        const codes = parseSeeComment(c);
        if (codes !== null) {
          hadList = true;
          for (const code of codes) {
            const found = ids.find(code, seeTypes(rec.type));
            if (found === undefined) counts.seeCodesUnresolved++;
            const sid = found ?? `${rec.type}:${code}`;
            if (!seeAlso.includes(sid)) seeAlso.push(sid);
          }
        }
        preferredTag ??= parsePreferredTagComment(c);
      }
      if (hadList) counts.notesWithSeeList++;
      for (const sid of seeAlso) {
        history.push({ old_id: id, new_id: sid, relation: 'consider' });
        counts.historyConsider++;
      }
      notes.push({ id, deprecated: rec.deprecated, preferredValue: rec.preferredValue ?? null, preferredId, comments: [...rec.comments], seeAlso, preferredTag });
      counts.publisherNotes++;
    }
  }
  return { fileDate: parsed.fileDate, release, history, hierarchy, notes, diagnostics, counts };
}
