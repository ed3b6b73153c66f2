/**
 * HL7 FHIR ConceptMap (R4) as a mapping set: `readConceptMap` turns one into a MappingSet
 * (format 'fhir'), `conceptMapFromRows` writes mappings back as one, and `checkConceptMapR4`
 * checks a ConceptMap's structure (the output of the writer is always checked before it is
 * returned).
 *
 * Reading: every `group.element.target` is one row: `element.code` → local_code, `element.display`
 * → local_label, `target.code` → target_id, `target.equivalence` → relation (equivalent, equal →
 * exact; wider, subsumes → broad; narrower, specializes → narrow; relatedto, inexact → related).
 * `unmatched` and `disjoint` state that there is no mapping: such rows are rejected with the reason,
 * as is an element without a target or a code. The R5 `relationship` codes are read too
 * (the official R4 → R5 table, see /work/shared/STANDARDS.md). The JSON is parsed with momoa so
 * that a syntax error, and every rejected row, carries its line and column.
 *
 * Each mapping keeps its group's systems and the target's display and comment as extra columns
 * (`source_system`, `source_version`, `target_system`, `target_label`, `comment`), so a set read
 * from a ConceptMap can be written back as one or as a table.
 *
 * Element names, cardinalities and codes follow the FHIR R4 (4.0.1) ConceptMap resource; the tests
 * check them against HL7's own StructureDefinition, JSON Schema and example ConceptMaps.
 */
import { readFileSync, statSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { parse as parseJson, type AnyNode, type ObjectNode } from '@humanwhocodes/momoa';
import { InputError } from '../errors.js';
import { quoteValue } from '../load/ledger.js';
import { checkTextBytes } from '../load/readTable.js';
import type { Diagnostic, Mapping, MappingRelation, MappingSet, RowAccounting, RowProblem } from '../load/types.js';

/** R4 ConceptMapEquivalence codes (http://hl7.org/fhir/concept-map-equivalence). */
export const R4_EQUIVALENCES = ['relatedto', 'equivalent', 'equal', 'wider', 'subsumes', 'narrower', 'specializes', 'inexact', 'unmatched', 'disjoint'] as const;
export type R4Equivalence = (typeof R4_EQUIVALENCES)[number];

/** Equivalence → our relation; null: the row states that there is no mapping. */
export const EQUIVALENCE_TO_RELATION: Record<R4Equivalence, MappingRelation | null> = {
  equivalent: 'exact',
  equal: 'exact',
  wider: 'broad',
  subsumes: 'broad',
  narrower: 'narrow',
  specializes: 'narrow',
  relatedto: 'related',
  inexact: 'related',
  unmatched: null,
  disjoint: null,
};

/** R5 ConceptMapRelationship codes read as their R4 counterparts (official R4 → R5 table, reversed). */
export const R5_RELATIONSHIP_TO_RELATION: Record<string, MappingRelation | null> = {
  'related-to': 'related',
  equivalent: 'exact',
  'source-is-narrower-than-target': 'broad',
  'source-is-broader-than-target': 'narrow',
  'not-related-to': null,
};

/** Our relation → the equivalence written on export. */
export const RELATION_TO_EQUIVALENCE: Record<MappingRelation, R4Equivalence> = {
  exact: 'equivalent',
  broad: 'wider',
  narrow: 'narrower',
  related: 'relatedto',
};

/** Equivalences whose target must carry a comment (R4 invariant cmd-1). */
export const COMMENT_REQUIRED: readonly R4Equivalence[] = ['narrower', 'inexact'];

/** ConceptMap.status (R4 PublicationStatus). */
export const PUBLICATION_STATUS = ['draft', 'active', 'retired', 'unknown'] as const;

/** ConceptMap.group.unmapped.mode (R4 ConceptMapGroupUnmappedMode). */
export const UNMAPPED_MODES = ['provided', 'fixed', 'other-map'] as const;

/** Columns of a mapping set read from a ConceptMap (ours first, then the kept extras). */
export const FHIR_HEADER = ['local_code', 'local_label', 'target_id', 'relation', 'target_label', 'comment', 'source_system', 'source_version', 'target_system'];

/** Set-level fields of the ConceptMap kept on `MappingSet.metadata.fhir` for writing back. */
export interface FhirMapInfo {
  id?: string;
  url?: string;
  version?: string;
  name?: string;
  title?: string;
  status?: string;
  publisher?: string;
  description?: string;
  source?: string;
  target?: string;
}

const SET_FIELDS = ['id', 'url', 'version', 'name', 'title', 'status', 'publisher', 'description'] as const;

/**
 * Row accounting for JSON: one row per target (or target-less element). Unlike the table ledger,
 * several rows may share a line (a ConceptMap written on one line), so rows are counted, not lines.
 */
class TargetLedger {
  read = 0;
  rejected = 0;
  readonly diagnostics: Diagnostic[] = [];
  constructor(readonly file: string) {}
  reject(line: number, column: number, code: RowProblem, message: string, fix: string): void {
    this.rejected++;
    this.diagnostics.push({ file: this.file, line, column, severity: 'error', code, message, fix, rejected: true });
  }
  finish(): RowAccounting {
    this.diagnostics.sort((a, b) => a.line - b.line || a.column - b.column);
    return { file: this.file, read: this.read, used: this.read - this.rejected, rejected: this.rejected, blankLines: 0 };
  }
}

/** Line and column (1-based) of a node. */
function at(node: AnyNode): { line: number; column: number } {
  return { line: node.loc.start.line, column: node.loc.start.column };
}

/** The members of an object node by name (the first of a duplicated name; duplicates are reported). */
function members(node: ObjectNode, path: string, file: string): Map<string, AnyNode> {
  const out = new Map<string, AnyNode>();
  for (const m of node.members) {
    const name = m.name.type === 'String' ? m.name.value : m.name.name;
    if (out.has(name)) {
      throw new InputError('bad_json', `${path} names "${name}" twice`, { location: { file, ...at(m.name) }, fix: 'JSON objects in FHIR carry each property once' });
    }
    out.set(name, m.value);
  }
  return out;
}

function str(node: AnyNode | undefined): string | undefined {
  return node && node.type === 'String' ? node.value : undefined;
}

/** Parse JSON text; a syntax error becomes an InputError at its line and column. */
export function parseJsonWithLocations(file: string, text: string): AnyNode {
  try {
    return parseJson(text, { mode: 'json' }).body;
  } catch (err) {
    const e = err as Error & { line?: number; column?: number };
    const message = e.message.replace(/\s*\(\d+:\d+\)\s*$/, '');
    throw new InputError('bad_json', `the file is not valid JSON: ${message}`, {
      location: { file, line: e.line ?? 1, column: e.column ?? 1 },
      fix: 'give a FHIR ConceptMap as JSON (check for a missing comma, quote or bracket there)',
    });
  }
}

/** Read a FHIR ConceptMap (R4, or R5 `relationship`) JSON file as a mapping set. */
export function readConceptMap(path: string): MappingSet {
  let bytes: Buffer;
  try {
    if (!statSync(path).isFile()) throw new InputError('not_a_file', `not a regular file: ${path}`, { location: { file: path }, fix: 'give the path of a FHIR ConceptMap JSON file' });
    bytes = readFileSync(path);
  } catch (err) {
    if (err instanceof InputError) throw err;
    throw new InputError('file_not_found', `no such file: ${path}`, { location: { file: path }, fix: 'check the path' });
  }
  checkTextBytes(path, bytes.subarray(0, 65536));
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  let text = bytes.toString('utf8');
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  return conceptMapToSet(path, sha256, text);
}

/** The mapping set of a ConceptMap given as text (`path` names it in messages). */
export function conceptMapToSet(path: string, sha256: string, text: string): MappingSet {
  const root = parseJsonWithLocations(path, text);
  if (root.type !== 'Object') {
    throw new InputError('bad_json', 'the JSON is not an object; a FHIR ConceptMap is one JSON object', { location: { file: path, ...at(root) }, fix: 'give one ConceptMap resource (not a Bundle or an array)' });
  }
  const top = members(root, 'the ConceptMap', path);
  const resourceType = str(top.get('resourceType'));
  if (resourceType !== 'ConceptMap') {
    throw new InputError('bad_json', `resourceType is ${resourceType === undefined ? 'missing' : quoteValue(resourceType)}, not "ConceptMap"`, {
      location: { file: path, ...at(top.get('resourceType') ?? root) },
      fix: 'give a FHIR ConceptMap resource ("resourceType": "ConceptMap")',
    });
  }
  const info: FhirMapInfo = {};
  for (const f of SET_FIELDS) {
    const v = str(top.get(f));
    if (v !== undefined) info[f] = v;
  }
  const source = str(top.get('sourceUri')) ?? str(top.get('sourceCanonical'));
  const target = str(top.get('targetUri')) ?? str(top.get('targetCanonical'));
  if (source !== undefined) info.source = source;
  if (target !== undefined) info.target = target;

  const ledger = new TargetLedger(path);
  const mappings: Mapping[] = [];
  const seen = new Map<string, number>();
  const groups = top.get('group');
  if (groups !== undefined && groups.type !== 'Array') {
    throw new InputError('bad_json', '"group" is not an array', { location: { file: path, ...at(groups) }, fix: 'write "group": [ { … } ]' });
  }
  const groupInfos: { source: string; sourceVersion: string; target: string; targetVersion: string }[] = [];
  (groups?.type === 'Array' ? groups.elements : []).forEach((gEl, gi) => {
    const g = gEl.value;
    const gPath = `group[${gi}]`;
    if (g.type !== 'Object') throw new InputError('bad_json', `${gPath} is not an object`, { location: { file: path, ...at(g) }, fix: 'each group is a JSON object with an "element" array' });
    const gm = members(g, gPath, path);
    const gInfo = { source: str(gm.get('source')) ?? '', sourceVersion: str(gm.get('sourceVersion')) ?? '', target: str(gm.get('target')) ?? '', targetVersion: str(gm.get('targetVersion')) ?? '' };
    groupInfos.push(gInfo);
    const elements = gm.get('element');
    if (elements === undefined || elements.type !== 'Array') {
      throw new InputError('bad_json', `${gPath}.element is ${elements === undefined ? 'missing' : 'not an array'}`, { location: { file: path, ...at(elements ?? g) }, fix: 'each group lists its mapped codes in "element": [ … ] (at least one)' });
    }
    elements.elements.forEach((eEl, ei) => {
      const e = eEl.value;
      const ePath = `${gPath}.element[${ei}]`;
      const eAt = at(e);
      if (e.type !== 'Object') {
        ledger.read++;
        ledger.reject(eAt.line, eAt.column, 'bad_value', `${ePath} is not an object`, 'each element is a JSON object with "code" and "target"');
        return;
      }
      const em = members(e, ePath, path);
      const code = (str(em.get('code')) ?? '').trim();
      const display = (str(em.get('display')) ?? '').trim();
      const targets = em.get('target');
      if (targets === undefined || targets.type !== 'Array' || targets.elements.length === 0) {
        ledger.read++;
        ledger.reject(eAt.line, eAt.column, 'empty_required', `${ePath}${code ? ` (${quoteValue(code)})` : ''} has no target`, 'give the code a target, or list it under group.unmapped; unmapped codes are not re-scored');
        return;
      }
      targets.elements.forEach((tEl, ti) => {
        const t = tEl.value;
        const tPath = `${ePath}.target[${ti}]`;
        const tAt = at(t);
        ledger.read++;
        if (t.type !== 'Object') return void ledger.reject(tAt.line, tAt.column, 'bad_value', `${tPath} is not an object`, 'each target is a JSON object with "code" and "equivalence"');
        const tm = members(t, tPath, path);
        if (code === '') return void ledger.reject(tAt.line, tAt.column, 'empty_required', `${ePath} has no code`, 'give element.code, the local code that is mapped');
        const eqNode = tm.get('equivalence') ?? tm.get('relationship');
        const eqName = tm.has('equivalence') ? 'equivalence' : 'relationship';
        const eq = str(eqNode);
        if (eq === undefined) return void ledger.reject(tAt.line, tAt.column, 'empty_required', `${tPath} of ${quoteValue(code)} has no equivalence`, 'give target.equivalence (R4: equivalent, wider, narrower, relatedto, …)');
        const eqAt = at(eqNode!);
        let relation: MappingRelation | null | undefined;
        if (eqName === 'equivalence') relation = (R4_EQUIVALENCES as readonly string[]).includes(eq) ? EQUIVALENCE_TO_RELATION[eq as R4Equivalence] : undefined;
        else relation = eq in R5_RELATIONSHIP_TO_RELATION ? R5_RELATIONSHIP_TO_RELATION[eq] : undefined;
        if (relation === undefined) {
          return void ledger.reject(eqAt.line, eqAt.column, 'bad_value', `unknown ${eqName} ${quoteValue(eq)} for ${quoteValue(code)}`, eqName === 'equivalence' ? `use one of: ${R4_EQUIVALENCES.join(', ')}` : `use one of: ${Object.keys(R5_RELATIONSHIP_TO_RELATION).join(', ')}`);
        }
        if (relation === null) {
          return void ledger.reject(eqAt.line, eqAt.column, 'bad_value', `${quoteValue(code)} is ${eq}: the map states that it has no such target, so there is nothing to re-score`, 'keep codes without a target out of the mapping set (or in group.unmapped)');
        }
        const targetId = (str(tm.get('code')) ?? '').trim();
        if (targetId === '') return void ledger.reject(tAt.line, tAt.column, 'empty_required', `${tPath} of ${quoteValue(code)} has no code`, 'give target.code, the concept the local code maps to');
        const key = `${code}\u0001${targetId}`;
        const first = seen.get(key);
        if (first !== undefined) return void ledger.reject(tAt.line, tAt.column, 'duplicate_row', `duplicate of line ${first}: ${quoteValue(code)} → ${quoteValue(targetId)}`, 'remove the duplicate target');
        seen.set(key, tAt.line);
        mappings.push({
          localCode: code,
          localLabel: display,
          targetId,
          relation,
          usage: 1,
          owner: '',
          line: tAt.line,
          extra: {
            target_label: str(tm.get('display')) ?? '',
            comment: str(tm.get('comment')) ?? '',
            source_system: gInfo.source,
            source_version: gInfo.sourceVersion,
            target_system: gInfo.target,
          },
        });
      });
    });
  });
  return {
    path,
    sha256,
    accounting: ledger.finish(),
    diagnostics: ledger.diagnostics,
    format: 'fhir',
    mappings,
    header: [...FHIR_HEADER],
    metadata: { fhir: { ...info, groups: groupInfos } },
  };
}

// ---------------------------------------------------------------------------
// Writing

/** One mapping as it goes into a ConceptMap. */
export interface ConceptMapRow {
  localCode: string;
  localLabel: string;
  targetId: string;
  targetLabel: string;
  relation: MappingRelation;
  /** Required for narrower (and inexact); a default is written when empty. */
  comment: string;
  sourceSystem: string;
  sourceVersion: string;
  targetSystem: string;
}

export interface ConceptMapOptions {
  /** The map's set-level fields (from the input ConceptMap, or given). */
  info: FhirMapInfo;
  /** group.targetVersion: the release the mappings were checked against. */
  targetVersion: string;
  /** ConceptMap.date (YYYY-MM-DD or a full time); omitted when not given. */
  date?: string;
}

/** The comment written for a narrower target when the mapping has none. */
export function defaultNarrowerComment(row: ConceptMapRow): string {
  return `The target is narrower in meaning than the local code ${row.localCode} (relation "narrow" in the mapping set).`;
}

/** Build an R4 ConceptMap from rows; groups by (source, sourceVersion, target), elements by local code. */
export function conceptMapFromRows(rows: ConceptMapRow[], options: ConceptMapOptions): Record<string, unknown> {
  const info = options.info;
  const map: Record<string, unknown> = { resourceType: 'ConceptMap' };
  if (info.id) map.id = info.id;
  if (info.url) map.url = info.url;
  if (info.version) map.version = info.version;
  if (info.name) map.name = info.name;
  if (info.title) map.title = info.title;
  map.status = info.status && (PUBLICATION_STATUS as readonly string[]).includes(info.status) ? info.status : 'draft';
  if (options.date) map.date = options.date;
  if (info.publisher) map.publisher = info.publisher;
  if (info.description) map.description = info.description;
  if (info.source) map.sourceUri = info.source;
  if (info.target) map.targetUri = info.target;

  type Target = { code: string; display?: string; equivalence: R4Equivalence; comment?: string };
  type Element = { code: string; display?: string; target: Target[] };
  type Group = { source: string; sourceVersion?: string; target: string; targetVersion: string; element: Element[]; byCode: Map<string, Element> };
  const groups = new Map<string, Group>();
  for (const r of rows) {
    const key = `${r.sourceSystem}\u0001${r.sourceVersion}\u0001${r.targetSystem}`;
    let g = groups.get(key);
    if (!g) {
      g = { source: r.sourceSystem, target: r.targetSystem, targetVersion: options.targetVersion, element: [], byCode: new Map() };
      if (r.sourceVersion) g.sourceVersion = r.sourceVersion;
      groups.set(key, g);
    }
    let e = g.byCode.get(r.localCode);
    if (!e) {
      e = { code: r.localCode, target: [] };
      if (r.localLabel) e.display = r.localLabel;
      g.byCode.set(r.localCode, e);
      g.element.push(e);
    }
    const equivalence = RELATION_TO_EQUIVALENCE[r.relation];
    const t: Target = { code: r.targetId, equivalence };
    if (r.targetLabel) t.display = r.targetLabel;
    const comment = r.comment || (COMMENT_REQUIRED.includes(equivalence) ? defaultNarrowerComment(r) : '');
    if (comment) t.comment = comment;
    e.target.push(t);
  }
  map.group = [...groups.values()].map((g) => {
    const out: Record<string, unknown> = { source: g.source };
    if (g.sourceVersion) out.sourceVersion = g.sourceVersion;
    out.target = g.target;
    out.targetVersion = g.targetVersion;
    out.element = g.element;
    return out;
  });
  const problems = checkConceptMapR4(map);
  if (problems.length) throw new Error(`internal: the ConceptMap written fails its own structural check: ${problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
  return map;
}

// ---------------------------------------------------------------------------
// Structural check

export interface StructureProblem {
  /** FHIRPath-like location, e.g. group[0].element[2].target[0].equivalence */
  path: string;
  message: string;
}

/**
 * Properties of each level of an R4 ConceptMap (4.0.1), written from the specification; the tests
 * compare these lists with HL7's StructureDefinition. A primitive may carry `_name` beside it.
 */
export const R4_PROPERTIES = {
  ConceptMap: ['resourceType', 'id', 'meta', 'implicitRules', 'language', 'text', 'contained', 'extension', 'modifierExtension', 'url', 'identifier', 'version', 'name', 'title', 'status', 'experimental', 'date', 'publisher', 'contact', 'description', 'useContext', 'jurisdiction', 'purpose', 'copyright', 'sourceUri', 'sourceCanonical', 'targetUri', 'targetCanonical', 'group'],
  group: ['id', 'extension', 'modifierExtension', 'source', 'sourceVersion', 'target', 'targetVersion', 'element', 'unmapped'],
  element: ['id', 'extension', 'modifierExtension', 'code', 'display', 'target'],
  target: ['id', 'extension', 'modifierExtension', 'code', 'display', 'equivalence', 'comment', 'dependsOn', 'product'],
  dependsOn: ['id', 'extension', 'modifierExtension', 'property', 'system', 'value', 'display'],
  unmapped: ['id', 'extension', 'modifierExtension', 'mode', 'code', 'display', 'url'],
} as const;

const PRIMITIVE_STRINGS: Record<keyof typeof R4_PROPERTIES, string[]> = {
  ConceptMap: ['id', 'implicitRules', 'language', 'url', 'version', 'name', 'title', 'status', 'date', 'publisher', 'description', 'purpose', 'copyright', 'sourceUri', 'sourceCanonical', 'targetUri', 'targetCanonical'],
  group: ['id', 'source', 'sourceVersion', 'target', 'targetVersion'],
  element: ['id', 'code', 'display'],
  target: ['id', 'code', 'display', 'equivalence', 'comment'],
  dependsOn: ['id', 'property', 'system', 'value', 'display'],
  unmapped: ['id', 'mode', 'code', 'display', 'url'],
};

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/**
 * Check the structure of an R4 ConceptMap: known properties only, primitives as strings, required
 * elements (status; group.element, at least one; target.equivalence; unmapped.mode; dependsOn
 * property and value), codes from their value sets, the choice of source[x]/target[x] made once, and
 * the invariants cmd-1 (a narrower or inexact target has a comment), cmd-2 (fixed → code) and
 * cmd-3 (other-map → url). Returns every problem; an empty list means the structure is sound.
 */
export function checkConceptMapR4(resource: unknown): StructureProblem[] {
  const problems: StructureProblem[] = [];
  const add = (path: string, message: string) => problems.push({ path, message });
  const level = (value: unknown, kind: keyof typeof R4_PROPERTIES, path: string): Record<string, unknown> | null => {
    if (!isObject(value)) {
      add(path, 'is not an object');
      return null;
    }
    const known = R4_PROPERTIES[kind] as readonly string[];
    for (const [k, v] of Object.entries(value)) {
      const base = k.startsWith('_') ? k.slice(1) : k;
      if (!known.includes(base) || (k.startsWith('_') && !PRIMITIVE_STRINGS[kind].includes(base))) add(`${path ? `${path}.` : ''}${k}`, 'is not a property of this element in R4');
      else if (!k.startsWith('_') && PRIMITIVE_STRINGS[kind].includes(k) && typeof v !== 'string') add(`${path ? `${path}.` : ''}${k}`, 'is not a string');
      else if (!k.startsWith('_') && v === '') add(`${path ? `${path}.` : ''}${k}`, 'is empty (FHIR forbids empty strings)');
    }
    return value;
  };
  const arrayOf = (value: unknown, path: string, min: number): unknown[] => {
    if (value === undefined) {
      if (min > 0) add(path, `is required (at least ${min})`);
      return [];
    }
    if (!Array.isArray(value)) {
      add(path, 'is not an array');
      return [];
    }
    if (value.length < min) add(path, `needs at least ${min} item${min === 1 ? '' : 's'}`);
    return value;
  };
  const cm = level(resource, 'ConceptMap', '');
  if (!cm) return problems;
  if (cm.resourceType !== 'ConceptMap') add('resourceType', 'must be "ConceptMap"');
  if (cm.status === undefined) add('status', 'is required');
  else if (!(PUBLICATION_STATUS as readonly unknown[]).includes(cm.status)) add('status', `must be one of ${PUBLICATION_STATUS.join(', ')}`);
  if (cm.sourceUri !== undefined && cm.sourceCanonical !== undefined) add('source[x]', 'is given twice (sourceUri and sourceCanonical)');
  if (cm.targetUri !== undefined && cm.targetCanonical !== undefined) add('target[x]', 'is given twice (targetUri and targetCanonical)');
  arrayOf(cm.group, 'group', 0).forEach((gv, gi) => {
    const gp = `group[${gi}]`;
    const g = level(gv, 'group', gp);
    if (!g) return;
    arrayOf(g.element, `${gp}.element`, 1).forEach((ev, ei) => {
      const ep = `${gp}.element[${ei}]`;
      const e = level(ev, 'element', ep);
      if (!e) return;
      arrayOf(e.target, `${ep}.target`, 0).forEach((tv, ti) => {
        const tp = `${ep}.target[${ti}]`;
        const t = level(tv, 'target', tp);
        if (!t) return;
        if (t.equivalence === undefined) add(`${tp}.equivalence`, 'is required');
        else if (!(R4_EQUIVALENCES as readonly unknown[]).includes(t.equivalence)) add(`${tp}.equivalence`, `must be one of ${R4_EQUIVALENCES.join(', ')}`);
        else if (COMMENT_REQUIRED.includes(t.equivalence as R4Equivalence) && (typeof t.comment !== 'string' || t.comment === '')) add(`${tp}.comment`, `is required when the equivalence is ${t.equivalence as string} (invariant cmd-1)`);
        for (const key of ['dependsOn', 'product'] as const) {
          arrayOf(t[key], `${tp}.${key}`, 0).forEach((dv, di) => {
            const dp = `${tp}.${key}[${di}]`;
            const d = level(dv, 'dependsOn', dp);
            if (!d) return;
            if (d.property === undefined) add(`${dp}.property`, 'is required');
            if (d.value === undefined) add(`${dp}.value`, 'is required');
          });
        }
      });
    });
    if (g.unmapped !== undefined) {
      const up = `${gp}.unmapped`;
      const u = level(g.unmapped, 'unmapped', up);
      if (u) {
        if (u.mode === undefined) add(`${up}.mode`, 'is required');
        else if (!(UNMAPPED_MODES as readonly unknown[]).includes(u.mode)) add(`${up}.mode`, `must be one of ${UNMAPPED_MODES.join(', ')}`);
        if (u.mode === 'fixed' && u.code === undefined) add(`${up}.code`, 'is required when mode is fixed (invariant cmd-2)');
        if (u.mode === 'other-map' && u.url === undefined) add(`${up}.url`, 'is required when mode is other-map (invariant cmd-3)');
      }
    }
  });
  return problems;
}
