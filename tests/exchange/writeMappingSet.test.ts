/**
 * Writing mapping sets: back in their own format (CSV, TSV, SSSOM) with unchanged cells as they
 * were, and as SSSOM TSV from a plain table, read back through loadMappings.
 *
 * SSSOM facts used here are from the SSSOM specification (mapping-commons/sssom, "SSSOM/TSV":
 * a `#`-prefixed YAML metadata block with curie_map; mapping_set_id and license required per set;
 * subject_id, predicate_id, object_id, mapping_justification required per mapping; see
 * /work/shared/STANDARDS.md). The example set below follows the layout of the specification's
 * own TSV example, written from memory (HP/MP prefixes, skos:exactMatch, semapv:LexicalMatching).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parse as parseYaml } from 'yaml';
import { loadMappings } from '../../src/load/index.js';
import { readRawTable } from '../../src/exchange/rawTable.js';
import { writeMappingSet, type OutputRow } from '../../src/exchange/writeMappingSet.js';
import type { MappingSet } from '../../src/load/types.js';
import { TermdriftError } from '../../src/errors.js';
import { tempDir, writeFile } from '../helpers/files.js';

const unchanged = (set: MappingSet): OutputRow[] => set.mappings.map((m) => ({ mapping: m, targetId: m.targetId, targetLabel: '', targetChanged: false }));

/** The metadata block and the table of an SSSOM TSV text. */
function splitSssom(text: string): { meta: Record<string, any>; header: string[]; rows: string[][] } {
  const lines = text.split('\n').filter((l) => l !== '');
  const meta = lines.filter((l) => l.startsWith('#')).map((l) => l.slice(1)).join('\n');
  const table = lines.filter((l) => !l.startsWith('#')).map((l) => l.split('\t'));
  return { meta: parseYaml(meta) as Record<string, any>, header: table[0], rows: table.slice(1) };
}

// Layout of the SSSOM specification's TSV example (from memory): metadata with curie_map,
// mapping_set_id and license, then the mapping slots.
const SPEC_EXAMPLE = [
  '# curie_map:',
  '#   HP: http://purl.obolibrary.org/obo/HP_',
  '#   MP: http://purl.obolibrary.org/obo/MP_',
  '# mapping_set_id: https://w3id.org/sssom/mappings/example',
  '# license: https://creativecommons.org/publicdomain/zero/1.0/',
  'subject_id\tsubject_label\tpredicate_id\tobject_id\tobject_label\tmapping_justification',
  'HP:0000175\tCleft palate\tskos:exactMatch\tMP:0000111\tcleft palate\tsemapv:LexicalMatching',
  'HP:0000252\tMicrocephaly\tskos:exactMatch\tMP:0000433\tmicrocephaly\tsemapv:LexicalMatching',
  '',
].join('\n');

describe('writing a set back in its own format', () => {
  it('writes the demo TSV back byte for byte when no decision changed it', async () => {
    const path = 'demo-data/mappings.tsv';
    const set = await loadMappings(path);
    const text = writeMappingSet(set, unchanged(set), { format: 'tsv', release: 'r2', raw: await readRawTable(path) });
    expect(text).toBe(readFileSync(path, 'utf8'));
  });

  it('keeps CSV quoting, CRLF line ends and extra columns; changes only the target cells', async () => {
    const csv = 'local_code,local_label,target_id,target_label,usage,note\r\nL1,"Heart attack, acute",C1,Myocardial infarction,"1,200",x\r\nL2,"Say ""hi""",C2,Old,3,\r\n';
    const path = writeFile(tempDir(), 'm.csv', csv);
    const set = await loadMappings(path);
    const rows = unchanged(set);
    rows[1] = { ...rows[1], targetId: 'C9', targetLabel: 'New name', targetChanged: true };
    const text = writeMappingSet(set, rows, { format: 'csv', release: 'r2', raw: await readRawTable(path) });
    expect(text).toBe('local_code,local_label,target_id,target_label,usage,note\r\nL1,"Heart attack, acute",C1,Myocardial infarction,"1,200",x\r\nL2,"Say ""hi""",C9,New name,3,\r\n');
    const back = await loadMappings(writeFile(tempDir(), 'back.csv', text));
    expect(back.mappings.map((m) => [m.localCode, m.localLabel, m.targetId, m.usage, m.extra.note])).toEqual([['L1', 'Heart attack, acute', 'C1', 1200, 'x'], ['L2', 'Say "hi"', 'C9', 3, '']]);
  });

  it('writes the demo SSSOM set back with only the set version and object source version changed', async () => {
    const path = 'demo-data/mappings.sssom.tsv';
    const set = await loadMappings(path);
    const text = writeMappingSet(set, unchanged(set), { format: 'sssom', release: 'r2', raw: await readRawTable(path) });
    const before = readFileSync(path, 'utf8').split('\n');
    const after = text.split('\n');
    expect(after.length).toBe(before.length);
    const differing = before.map((l, i) => [l, after[i]]).filter(([a, b]) => a !== b);
    expect(differing).toEqual([
      ['#mapping_set_version: fh-2023.11', '#mapping_set_version: r2'],
      ['#object_source_version: r1', '#object_source_version: r2'],
    ]);
  });
});

describe('SSSOM export', () => {
  it('exports the demo TSV as SSSOM with the required metadata and slots, and reads back the same mappings', async () => {
    const set = await loadMappings('demo-data/mappings.tsv');
    const options = { format: 'sssom' as const, release: 'release-r2' };
    // Required set metadata cannot be made up: the export asks for it.
    const noId = (() => { try { writeMappingSet(set, unchanged(set), options); } catch (e) { return e as TermdriftError; } })();
    expect(noId?.code).toBe('usage');
    expect(noId?.fix).toMatch(/--set-id/);
    const text = writeMappingSet(set, unchanged(set), {
      ...options,
      mappingSetId: 'https://example.org/fenwick-hollow/mappings/qcv',
      license: 'https://creativecommons.org/publicdomain/zero/1.0/',
      localPrefix: { prefix: 'FHGH', iri: 'https://example.org/fenwick-hollow/local-code/' },
      targetPrefix: { prefix: 'QCV', iri: 'https://example.org/quillmere/concept/' },
    });
    const { meta, header, rows } = splitSssom(text);
    // SSSOM: required set-level slots; every prefix used is declared.
    expect(meta).toMatchObject({
      curie_map: { FHGH: 'https://example.org/fenwick-hollow/local-code/', QCV: 'https://example.org/quillmere/concept/' },
      mapping_set_id: 'https://example.org/fenwick-hollow/mappings/qcv',
      license: 'https://creativecommons.org/publicdomain/zero/1.0/',
      mapping_set_version: 'release-r2',
      object_source_version: 'release-r2',
    });
    // Non-standard columns are declared as extension slots (SSSOM "extension_definitions").
    expect(meta.extension_definitions.map((d: any) => d.slot_name)).toEqual(['usage', 'owner']);
    // SSSOM: required mapping slots, present and filled on every row.
    for (const slot of ['subject_id', 'predicate_id', 'object_id', 'mapping_justification']) {
      const i = header.indexOf(slot);
      expect(i, slot).toBeGreaterThanOrEqual(0);
      expect(rows.every((r) => r[i] !== ''), slot).toBe(true);
    }
    expect(rows[0].slice(0, 6)).toEqual(['FHGH:LAB-0401', 'FBC', 'skos:exactMatch', 'QCV:QV10169A', '', 'semapv:UnspecifiedMatching']);
    const back = await loadMappings(writeFile(tempDir(), 'out.sssom.tsv', text));
    expect(back.format).toBe('sssom');
    expect(back.accounting.rejected).toBe(0);
    // owner travels as the extension slot `owner` (SSSOM's author_id takes CURIEs, not department
    // names); loadMappings reads that slot back as the owner.
    expect(back.mappings.map((m) => [m.localCode.replace(/^FHGH:/, ''), m.localLabel, m.targetId.replace(/^QCV:/, ''), m.relation, m.usage, m.owner])).toEqual(set.mappings.map((m) => [m.localCode, m.localLabel, m.targetId, m.relation, m.usage, m.owner]));
  });

  it('marks reviewed rows semapv:MappingReview, with the reviewer, the note and the new object label', async () => {
    const path = 'demo-data/mappings.sssom.tsv';
    const set = await loadMappings(path);
    const rows = unchanged(set);
    rows[0] = { ...rows[0], review: { decision: 'keep', reviewer: 'A. Reviewer', note: '' } };
    rows[1] = { ...rows[1], targetId: 'QCV:QV21999X', targetLabel: 'Something new', targetChanged: true, review: { decision: 'remap', reviewer: 'B. Reviewer', note: 'see ticket 12' } };
    const { header, rows: out } = splitSssom(writeMappingSet(set, rows, { format: 'sssom', release: 'r2', raw: await readRawTable(path) }));
    const col = (n: string) => header.indexOf(n);
    expect(out[0][col('mapping_justification')]).toBe('semapv:MappingReview');
    expect(out[0][col('reviewer_label')]).toBe('A. Reviewer');
    expect(out[1]).toEqual(expect.arrayContaining(['QCV:QV21999X', 'Something new', 'semapv:MappingReview', 'B. Reviewer', 'see ticket 12']));
    expect(out[1][col('confidence')]).toBe('');
    expect(out[2][col('mapping_justification')]).toBe('semapv:ManualMappingCuration');
  });

  it("reads and writes the layout of the SSSOM specification's example (from memory)", async () => {
    const path = writeFile(tempDir(), 'example.sssom.tsv', SPEC_EXAMPLE);
    const set = await loadMappings(path);
    expect(set.format).toBe('sssom');
    expect(set.mappings.map((m) => [m.localCode, m.targetId, m.relation])).toEqual([['HP:0000175', 'MP:0000111', 'exact'], ['HP:0000252', 'MP:0000433', 'exact']]);
    const text = writeMappingSet(set, unchanged(set), { format: 'sssom', release: 'v1', raw: await readRawTable(path) });
    const { meta, rows } = splitSssom(text);
    expect(meta.curie_map).toEqual({ HP: 'http://purl.obolibrary.org/obo/HP_', MP: 'http://purl.obolibrary.org/obo/MP_' });
    expect(rows).toEqual(SPEC_EXAMPLE.split('\n').filter((l) => l && !l.startsWith('#')).slice(1).map((l) => l.split('\t')));
    // As a FHIR ConceptMap, the curie_map gives the code systems.
    const fhir = JSON.parse(writeMappingSet(set, unchanged(set), { format: 'fhir', release: 'v1' }));
    expect(fhir.group[0]).toMatchObject({ source: 'http://purl.obolibrary.org/obo/HP_', target: 'http://purl.obolibrary.org/obo/MP_', element: [{ code: '0000175', target: [{ code: '0000111', equivalence: 'equivalent' }] }, { code: '0000252' }] });
  });
});
