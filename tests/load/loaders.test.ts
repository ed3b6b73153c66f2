import { describe, expect, it } from 'vitest';
import { loadRelease, loadMappings, loadHierarchy, loadHistory } from '../../src/load/index.js';
import { tempDir, tsv, writeFile } from '../helpers/files.js';

const H = ['concept_id', 'term', 'term_type', 'status', 'category'];

function file(name: string, content: string) {
  return writeFile(tempDir(), name, content);
}

describe('loadRelease', () => {
  it('builds the columnar release with concept → term index', async () => {
    const r = await loadRelease(file('r1.tsv', tsv([H, ['C1', 'Heart attack', 'preferred', 'active', 'disorder'], ['C2', 'Lung', 'preferred', '', 'body'], ['C1', 'Myocardial infarction', 'synonym', 'active', 'disorder'], ['C3', 'Old thing', 'preferred', 'retired', '']])));
    expect(r.label).toBe('r1');
    expect(r.conceptIds).toEqual(['C1', 'C2', 'C3']);
    expect(r.termCount).toBe(4);
    const termsOf = (c: number) => Array.from(r.conceptTerms.subarray(r.conceptTermStart[c], r.conceptTermStart[c + 1])).map((t) => r.termText[t]);
    expect(termsOf(0)).toEqual(['Heart attack', 'Myocardial infarction']);
    expect(Array.from(r.conceptStatus)).toEqual([0, 0, 1]);
    expect(r.categories[r.conceptCategory[0]]).toBe('disorder');
    expect(r.conceptCategory[2]).toBe(-1);
    expect(r.accounting).toMatchObject({ read: 4, used: 4, rejected: 0 });
  });

  it('honours --columns renames', async () => {
    const r = await loadRelease(file('r.csv', 'CODE,STR\nX1,Anaemia\n'), { columns: { concept_id: 'CODE', term: 'STR' } });
    expect(r.conceptIds).toEqual(['X1']);
    expect(r.termType[0]).toBe(1);
  });

  it('reports a missing required column as a whole-file error with line and column', async () => {
    await expect(loadRelease(file('r.tsv', 'code\tterm\nX\tY\n'))).rejects.toMatchObject({ code: 'header_missing_column', location: { line: 1, column: 1 } });
  });

  it('refuses a duplicated header name', async () => {
    await expect(loadRelease(file('r.tsv', 'concept_id\tterm\tterm\nX\tY\tZ\n'))).rejects.toMatchObject({ code: 'header_duplicate_column', location: { column: 3 } });
  });

  it('rejects duplicates and empty values, warns on two preferred terms and conflicting concept values, and accounts for every row', async () => {
    const rows = [
      H,
      ['C1', 'Heart attack', 'preferred', 'active', 'disorder'], // 2
      ['C1', 'Heart attack', 'synonym', 'active', 'disorder'], // 3 duplicate
      ['C1', 'Cardiac infarction', 'preferred', 'active', 'disorder'], // 4 second preferred
      ['C1', 'MI', 'synonym', 'inactive', 'finding'], // 5 conflicting status and category
      ['', 'Orphan', 'synonym', 'active', ''], // 6 empty concept
      ['C2', '', 'synonym', 'active', ''], // 7 empty term
      ['C2', 'Lung', 'preferred', 'maybe', ''], // 8 bad status
    ];
    const r = await loadRelease(file('r.tsv', tsv(rows)));
    expect(r.diagnostics.map((d) => [d.line, d.code, d.rejected])).toEqual([
      [3, 'duplicate_row', true],
      [4, 'two_preferred', false],
      [5, 'conflicting_status', false],
      [5, 'conflicting_category', false],
      [6, 'empty_required', true],
      [7, 'empty_required', true],
      [8, 'bad_value', true],
    ]);
    expect(r.accounting).toMatchObject({ read: 7, used: 3, rejected: 4 });
    expect(r.accounting.read).toBe(r.accounting.used + r.accounting.rejected);
    expect(r.termCount).toBe(3);
    expect(r.termText).toEqual(['Heart attack', 'Cardiac infarction', 'MI']);
    expect(Array.from(r.termType)).toEqual([0, 1, 1]);
    expect(r.conceptStatus[0]).toBe(0);
  });

  it('reads retired, deprecated and obsolete as inactive', async () => {
    const r = await loadRelease(file('r.tsv', tsv([H, ['A', 'a', '', 'retired', ''], ['B', 'b', '', 'deprecated', ''], ['C', 'c', '', 'OBSOLETE', ''], ['D', 'd', '', '', '']])));
    expect(Array.from(r.conceptStatus)).toEqual([1, 1, 1, 0]);
  });

  it('allows one preferred term per language', async () => {
    const r = await loadRelease(file('r.tsv', tsv([['concept_id', 'term', 'term_type', 'language'], ['A', 'Kidney', 'preferred', 'en'], ['A', 'Niere', 'preferred', 'de']])));
    expect(r.diagnostics).toEqual([]);
    expect(Array.from(r.termType)).toEqual([0, 0]);
  });
});

describe('loadMappings', () => {
  it('reads a plain mapping table with defaults', async () => {
    const m = await loadMappings(file('m.csv', 'local_code,local_label,target_id,usage\nL1,Hb,C1,120\nL2,Na,C2,\nL3,K,C3,lots\n'));
    expect(m.format).toBe('csv');
    expect(m.mappings.map((x) => [x.localCode, x.targetId, x.relation, x.usage])).toEqual([
      ['L1', 'C1', 'exact', 120], ['L2', 'C2', 'exact', 1], ['L3', 'C3', 'exact', 1],
    ]);
    expect(m.diagnostics.map((d) => [d.line, d.code, d.rejected])).toEqual([[4, 'bad_value', false]]);
  });

  it('reads SSSOM TSV: metadata block, slot names, predicates, and refuses undeclared prefixes', async () => {
    // Layout as in the SSSOM TSV specification (mapping-commons/sssom, spec-formats-tsv.md).
    const text = [
      '# mapping_set_id: https://example.org/sets/1',
      '# license: https://creativecommons.org/publicdomain/zero/1.0/',
      '# curie_map:',
      '#   LOC: https://example.org/local/',
      '#   TV: https://example.org/vocab/',
      'subject_id\tsubject_label\tpredicate_id\tobject_id\tmapping_justification\tconfidence',
      'LOC:1\tHaemoglobin\tskos:exactMatch\tTV:100\tsemapv:ManualMappingCuration\t0.9',
      'LOC:2\tSodium\tskos:broadMatch\tTV:200\tsemapv:ManualMappingCuration\t0.8',
      'LOC:3\tPotassium\tskos:exactMatch\tZZ:300\tsemapv:ManualMappingCuration\t0.8',
    ].join('\n');
    const m = await loadMappings(file('m.sssom.tsv', text));
    expect(m.format).toBe('sssom');
    expect(m.metadata?.mapping_set_id).toBe('https://example.org/sets/1');
    expect(m.curieMap).toEqual({ LOC: 'https://example.org/local/', TV: 'https://example.org/vocab/' });
    expect(m.mappings.map((x) => [x.localCode, x.localLabel, x.targetId, x.relation])).toEqual([
      ['LOC:1', 'Haemoglobin', 'TV:100', 'exact'],
      ['LOC:2', 'Sodium', 'TV:200', 'broad'],
    ]);
    expect(m.mappings[0].extra.confidence).toBe('0.9');
    expect(m.diagnostics.map((d) => [d.line, d.code])).toEqual([[9, 'unknown_prefix']]);
    expect(m.accounting).toMatchObject({ read: 3, used: 2, rejected: 1 });
  });

  it('rejects duplicate mappings and unknown relations', async () => {
    const m = await loadMappings(file('m.tsv', tsv([['local_code', 'local_label', 'target_id', 'relation'], ['L1', 'x', 'C1', 'exact'], ['L1', 'x', 'C1', 'exact'], ['L2', 'y', 'C2', 'sideways'], ['L3', 'z', '', 'exact']])));
    expect(m.diagnostics.map((d) => [d.line, d.code])).toEqual([[3, 'duplicate_row'], [4, 'bad_value'], [5, 'empty_required']]);
    expect(m.accounting).toMatchObject({ read: 4, used: 1, rejected: 3 });
  });
});

describe('loadHierarchy and loadHistory', () => {
  it('reads parents and rejects self-loops and duplicates', async () => {
    const h = await loadHierarchy(file('h.tsv', tsv([['concept_id', 'parent_id'], ['A', 'B'], ['A', 'C'], ['A', 'B'], ['D', 'D']])));
    expect(h.parents.get('A')).toEqual(['B', 'C']);
    expect(h.diagnostics.map((d) => [d.line, d.code])).toEqual([[4, 'duplicate_row'], [5, 'bad_value']]);
  });

  it('folds relation spellings', async () => {
    const h = await loadHistory(file('x.tsv', tsv([['old_id', 'new_id', 'relation'], ['A', 'B', 'REPLACED BY'], ['C', 'D', ''], ['E', 'F', 'consider'], ['G', 'G', 'same_as']])));
    expect(h.rows.map((r) => r.relation)).toEqual(['replaced_by', 'replaced_by', 'consider']);
    expect(h.byOld.get('E')?.[0].newId).toBe('F');
    expect(h.diagnostics.map((d) => d.code)).toEqual(['bad_value']);
  });
});

describe('SSSOM extension slots for usage and owner', () => {
  it('the demo SSSOM set (usage_count and owner declared in extension_definitions) gives the same usage and owner as the plain TSV set', async () => {
    const sssom = await loadMappings('demo-data/mappings.sssom.tsv');
    const plain = new Map((await loadMappings('demo-data/mappings.tsv')).mappings.map((m) => [m.localCode, m]));
    expect(sssom.mappings.length).toBe(plain.size);
    for (const m of sssom.mappings) {
      const p = plain.get(m.localCode.replace(/^FHGH:/, ''))!;
      expect([m.localCode, m.usage, m.owner]).toEqual([m.localCode, p.usage, p.owner]);
    }
    expect(sssom.mappings.some((m) => m.usage > 1)).toBe(true);
    expect(Object.keys(sssom.mappings[0].extra)).not.toContain('usage_count');
  });

  it('a usage slot wins over usage_count, and author_id over owner', async () => {
    const dir = tempDir();
    const meta = '#curie_map:\n#  L: https://example.org/l/\n#  C: https://example.org/c/\n#mapping_set_id: https://example.org/set\n#license: https://creativecommons.org/publicdomain/zero/1.0/\n';
    const path = writeFile(dir, 'm.sssom.tsv', meta + 'subject_id\tobject_id\tpredicate_id\tmapping_justification\tusage\tusage_count\tauthor_id\towner\nL:1\tC:9\tskos:exactMatch\tsemapv:ManualMappingCuration\t7\t99\torcid:1\tLab\n');
    const [m] = (await loadMappings(path)).mappings;
    expect([m.usage, m.owner, m.extra.usage_count, m.extra.owner]).toEqual([7, 'orcid:1', '99', 'Lab']);
  });
});
