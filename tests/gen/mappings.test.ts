/** The mapping set and its truth: coverage of changed concepts, verdicts, successors, labels, usage. */
import { describe, expect, it } from 'vitest';
import { distance } from 'fastest-levenshtein';
import { VERDICTS } from '../../src/rescore/types.js';
import { CHANGE_KIND_INFO } from '../../src/classify/kinds.js';
import { loadMappings } from '../../src/load/index.js';
import { lexicalKey } from '../../src/text/normalize.js';
import { LOCAL_ABBREVIATIONS, abbreviate, reorder, typo, verdictFor } from '../../src/gen/mappings.js';
import { Rng } from '../../src/gen/random.js';
import { dataset, written } from './fixture.js';

const d = dataset(1);
const { injected, mappings, mappingTruth } = d;
const truthOf = new Map(mappingTruth.map((t) => [t.local_code, t]));
const oldById = new Map(d.old.concepts.map((c) => [c.id, c]));
const newById = new Map(d.new.concepts.map((c) => [c.id, c]));

describe('generateMappings', () => {
  it('maps about one concept in ten and every concept a structural change touched', () => {
    expect(mappings.length).toBeGreaterThan(1900);
    expect(mappings.length).toBeLessThan(2200);
    expect(mappingTruth.map((t) => t.local_code)).toEqual(mappings.map((m) => m.local_code));
    expect(new Set(mappings.map((m) => m.local_code)).size).toBe(mappings.length);
    const mapped = new Set(mappings.map((m) => m.target_id));
    for (const c of injected.changes) {
      if (!CHANGE_KIND_INFO[c.kind].structural) continue;
      for (const id of c.olds) expect(mapped.has(id), `${c.kind} ${id}`).toBe(true);
    }
    // A split concept is mapped once per part its terms went to.
    for (const c of injected.changes.filter((x) => x.kind === 'split')) {
      const parts = c.truth[0].to.length;
      expect(mappings.filter((m) => m.target_id === c.olds[0]).length).toBe(parts);
    }
  });

  it('gives every verdict, with a successor exactly where one is due', () => {
    const counts = new Map<string, number>();
    for (const t of mappingTruth) counts.set(t.verdict, (counts.get(t.verdict) ?? 0) + 1);
    for (const v of VERDICTS) expect(counts.get(v) ?? 0, v).toBeGreaterThan(10);
    for (const m of mappings) {
      const t = truthOf.get(m.local_code)!;
      if (['ok', 'broken', 'context_changed', 'unknown_target'].includes(t.verdict)) expect(t.successor).toBe('');
      if (['redirect', 'ambiguous'].includes(t.verdict)) expect(newById.get(t.successor)?.status, m.local_code).toBe('active');
      if (t.verdict === 'drifted' && t.successor) expect(newById.get(t.successor)?.status).toBe('active');
      if (t.verdict === 'unknown_target') {
        expect(oldById.has(m.target_id)).toBe(false);
        expect(newById.has(m.target_id)).toBe(false);
      } else expect(oldById.get(m.target_id)?.status).toBe('active');
    }
  });

  it('follows the definitions: moved synonym drifts only from its own label, a split points at the receiving part', () => {
    const o = (kind: string, role = 'changed') => ({ kind, role, successor: 'S', termTo: new Map([['a', 'A'], ['b', 'B']]) }) as never;
    expect(verdictFor('A', o('moved_synonym', 'source'), 'b')).toEqual({ verdict: 'drifted', successor: 'B' });
    expect(verdictFor('A', o('moved_synonym', 'source'), 'a')).toEqual({ verdict: 'ok', successor: '' });
    expect(verdictFor('A', o('split'), 'b')).toEqual({ verdict: 'ambiguous', successor: 'B' });
    expect(verdictFor('A', o('reorganization'), 'a')).toEqual({ verdict: 'ambiguous', successor: 'A' });
    expect(verdictFor('A', o('merge', 'absorbed'), 'a')).toEqual({ verdict: 'redirect', successor: 'S' });
    expect(verdictFor('A', o('merge', 'survivor'), 'a')).toEqual({ verdict: 'ok', successor: '' });
    expect(verdictFor('A', o('preferred_term_change'), 'a')).toEqual({ verdict: 'ok', successor: '' });
    expect(verdictFor('A', o('hierarchy_change'), 'a')).toEqual({ verdict: 'context_changed', successor: '' });
    expect(verdictFor('A', o('retirement'), 'a')).toEqual({ verdict: 'broken', successor: '' });
    expect(verdictFor('A', o('id_reuse'), 'a')).toEqual({ verdict: 'drifted', successor: 'S' });
    expect(verdictFor('A', undefined, 'a')).toEqual({ verdict: 'ok', successor: '' });
  });

  it('perturbs labels as local labels are, and keeps them recognisable', () => {
    let changed = 0;
    let recognisable = 0;
    for (const m of mappings) {
      const c = oldById.get(m.target_id);
      if (!c) continue;
      if (!c.terms.some((t) => t.text === m.local_label)) changed++;
      const label = new Set(lexicalKey(m.local_label).split(' '));
      if (c.terms.some((t) => lexicalKey(t.text).split(' ').some((w) => label.has(w)))) recognisable++;
    }
    expect(changed / mappings.length).toBeGreaterThan(0.5);
    expect(recognisable / mappings.length).toBeGreaterThan(0.95);
    expect(mappings.some((m) => m.local_label === m.local_label.toUpperCase() && /[A-Z]{4}/.test(m.local_label))).toBe(true);
    expect(mappings.some((m) => / - ED$| \(adult\)$/.test(m.local_label))).toBe(true);
  });

  it('abbreviates with its own table, reorders, and makes one-edit typos (Levenshtein distance 1, fastest-levenshtein)', () => {
    const r = new Rng('labels');
    expect(abbreviate('Fracture of left distal femur', r, 1)).toBe('fx of lt dist femur');
    expect(abbreviate('Sodium measurement in cerebrospinal fluid', r, 1)).toBe('Na meas in CSF');
    expect(reorder('Fracture of left femur')).toBe('Left femur fracture');
    expect(reorder('Pain in knee, left')).toBe('Knee, left pain');
    for (let i = 0; i < 500; i++) {
      const s = 'Chronic inflammation of posterior patella';
      const t = typo(s, r);
      expect(distance(s, t) === 1 || distance(s, t) === 2).toBe(true);
      // A transposition is one edit of Damerau–Levenshtein, two of plain Levenshtein.
      if (distance(s, t) === 2) expect([...t].sort().join('')).toBe([...s].sort().join(''));
    }
    // The abbreviation table is about this vocabulary: its words occur in the generated terms.
    const words = new Set(d.old.concepts.flatMap((c) => c.terms.flatMap((t) => t.text.toLowerCase().split(/[ ,]+/))));
    const singles = Object.keys(LOCAL_ABBREVIATIONS).filter((k) => !k.includes(' '));
    expect(singles.filter((w) => words.has(w)).length / singles.length).toBeGreaterThan(0.9);
  });

  it('skews usage like a Zipf law: the top tenth of codes carries most of the records', () => {
    const usage = mappings.map((m) => m.usage).sort((a, b) => b - a);
    const total = usage.reduce((a, b) => a + b, 0);
    const top = usage.slice(0, Math.ceil(usage.length / 10)).reduce((a, b) => a + b, 0);
    expect(top / total).toBeGreaterThan(0.6);
    expect(usage[usage.length - 1]).toBeGreaterThanOrEqual(1);
  });

  it('writes a mapping file that termdrift reads without a single rejected row', async () => {
    const { paths } = await written(1);
    const set = await loadMappings(paths.mappings);
    expect(set.diagnostics).toEqual([]);
    expect(set.mappings.length).toBe(mappings.length);
    expect(set.mappings[0].localCode).toBe(mappings[0].local_code);
    expect(set.mappings[0].usage).toBe(mappings[0].usage);
  });
});
