/**
 * Verdicts on small hand-built release pairs, one case per verdict and the tricky ones. The
 * releases share BASE (./fixtures.ts) so that the scorer has something to learn from.
 */
import { describe, expect, it } from 'vitest';
import { diffReleases } from '../../src/pipeline.js';
import { loadMappings } from '../../src/load/index.js';
import { rescoreMappings } from '../../src/rescore/rescoreMappings.js';
import type { MappingResult } from '../../src/rescore/types.js';
import { loadPair, type PairSpec } from '../helpers/releases.js';
import { tempDir, tsv, writeFile } from '../helpers/files.js';
import { BASE, BASE_HIERARCHY } from './fixtures.js';
import { buildIndexParts, indexSource } from '../../src/rescore/conceptIndex.js';

async function check(spec: PairSpec, rows: [code: string, label: string, target: string][], content?: string, nearestSearch = true): Promise<Map<string, MappingResult>> {
  const inputs = await loadPair(spec);
  const { report, context } = diffReleases(inputs);
  const path = writeFile(tempDir(), 'mappings.tsv', content ?? tsv([['local_code', 'local_label', 'target_id', 'usage'], ...rows.map(([c, l, t], i) => [c, l, t, String(10 + i)])]));
  const set = await loadMappings(path);
  const { mappings, scorer } = rescoreMappings(context, report.changes, set, { training: { seed: 5 }, nearestSearch });
  expect(mappings).toHaveLength(set.mappings.length); // every mapping is accounted for
  expect(scorer.pairs_held_out).toBeGreaterThan(0);
  return new Map(mappings.map((m) => [m.local_code, m]));
}

const top = (m: MappingResult) => m.suggestions[0]?.concept_id;

describe('rescoreMappings verdicts', () => {
  it('ok: unchanged target, scored once for both releases', async () => {
    const r = await check({ old: BASE, new: BASE }, [['L1', 'Asthma', 'B01'], ['L2', 'GOUT', 'B02']]);
    const m = r.get('L1')!;
    expect(m.verdict).toBe('ok');
    expect(m.score_old).toBe(m.score_new);
    expect(m.score_old!).toBeGreaterThan(0.9);
    expect(m.suggestions).toEqual([]);
    expect(m.change_ids).toEqual([]);
    expect(m.impact).toBe(0);
    expect(r.get('L2')!.verdict).toBe('ok');
    expect(m.target_label).toBe('Asthma');
  });

  it('ok: a synonym added to the target', async () => {
    const r = await check({ old: BASE, new: BASE.replace('Gout* | Podagra', 'Gout* | Podagra | Urate arthropathy') }, [['L1', 'Gout', 'B02']]);
    expect(r.get('L1')!.verdict).toBe('ok');
    expect(r.get('L1')!.change_ids).toEqual(['synonym_added:B02>B02']);
  });

  it('redirect: the target was merged into a survivor that holds the label', async () => {
    const old = BASE + 'M1 disorder: Heart attack* | Cardiac infarction\nM2 disorder: Myocardial infarction* | MI';
    const neu = BASE + 'M1 disorder (inactive): Heart attack*\nM2 disorder: Myocardial infarction* | MI | Heart attack | Cardiac infarction';
    const r = await check({ old, new: neu }, [['L1', 'Heart attack', 'M1'], ['L2', 'MI', 'M2']]);
    const m = r.get('L1')!;
    expect(m.verdict).toBe('redirect');
    expect(top(m)).toBe('M2');
    expect(m.suggestions[0].reason).toBe('term_flow');
    expect(m.change_ids).toEqual(['merge:M1+M2>M2']);
    expect(r.get('L2')!.verdict).toBe('ok'); // the survivor only gained terms
  });

  it('redirect: replaced by a new identifier, through the history table alone', async () => {
    const old = BASE + 'R1 disorder: Dropsy* | Oedema of old';
    const neu = BASE + 'R2 disorder: Dropsy, generalised* | Generalised oedema';
    const r = await check({ old, new: neu, history: 'R1 > R2 replaced_by' }, [['L1', 'Dropsy', 'R1']]);
    expect(r.get('L1')!.verdict).toBe('redirect');
    expect(top(r.get('L1')!)).toBe('R2');
    expect(r.get('L1')!.suggestions[0].reason).toBe('history');
  });

  it('ambiguous: the target was split, and one part keeps the identifier', async () => {
    const old = BASE + 'P1 disorder: Wrist fracture* | Fracture of wrist | Broken wrist | Scaphoid fracture | Fracture of scaphoid';
    const neu = BASE + 'P1 disorder: Wrist fracture* | Fracture of wrist | Broken wrist\nP2 disorder: Scaphoid fracture* | Fracture of scaphoid';
    const r = await check({ old, new: neu }, [['L1', 'Wrist fracture', 'P1'], ['L2', 'Scaphoid fracture', 'P1']]);
    expect(r.get('L1')!.verdict).toBe('ambiguous');
    expect(top(r.get('L1')!)).toBe('P1');
    expect(r.get('L2')!.verdict).toBe('ambiguous');
    expect(top(r.get('L2')!)).toBe('P2');
    expect(r.get('L2')!.suggestions.map((s) => s.concept_id).sort()).toEqual(['P1', 'P2']);
  });

  it('broken: retired with no successor; drifted when the label\'s own term moved on', async () => {
    const old = BASE + 'R1 disorder: Dropsy* | Oedema of old\nS1 disorder: Spastic colon* | Irritable colon | Colonic spasm\nS2 disorder: Irritable bowel syndrome* | IBS';
    const neu = BASE + 'R1 disorder (inactive): Dropsy* | Oedema of old\nS1 disorder (inactive): Spastic colon* | Colonic spasm\nS2 disorder: Irritable bowel syndrome* | IBS | Irritable colon';
    const r = await check({ old, new: neu }, [['L1', 'Dropsy', 'R1'], ['L2', 'Irritable colon', 'S1']]);
    expect(r.get('L1')!.verdict).toBe('broken');
    expect(r.get('L1')!.score_new).not.toBeNull(); // still in the file, as inactive
    expect(r.get('L2')!.verdict).toBe('drifted');
    expect(top(r.get('L2')!)).toBe('S2');
  });

  it('broken: absent from the new release, score_new null', async () => {
    const r = await check({ old: BASE + 'R1 disorder: Dropsy*', new: BASE }, [['L1', 'Dropsy', 'R1']]);
    expect(r.get('L1')!.verdict).toBe('broken');
    expect(r.get('L1')!.score_new).toBeNull();
    expect(r.get('L1')!.change_ids).toEqual(['retirement:R1>']);
  });

  it('a target that vanished without a trace still gets suggestions from the nearest-concept search', async () => {
    // The label shares nothing with the retired concept's own term, so only a search with the
    // label's text can find B01 (the retirement's own suggestions search with 'Zymotic fever').
    const spec = { old: BASE + 'R1 disorder: Zymotic fever*', new: BASE };
    const rows: [string, string, string][] = [['L1', 'Bronchial asthma attack', 'R1']];
    const m = (await check(spec, rows)).get('L1')!;
    expect(m.verdict).toBe('broken');
    expect(m.suggestions[0].concept_id).toBe('B01');
    expect(m.suggestions[0].reason).toBe('lexical_neighbour');
    const without = (await check(spec, rows, undefined, false)).get('L1')!;
    expect(without.verdict).toBe('broken');
    expect(without.suggestions.map((s) => s.concept_id)).not.toContain('B01');
  });

  it('a new concept holding the label in other words (same lexical key) is a candidate without a search, with the index word lists too', async () => {
    // "Kidney cyst" and "Cyst of kidney" differ when folded and share the lexical key; the retired
    // target's own term shares nothing with either, so only the changed frontier's text finds N1.
    const inputs = await loadPair({ old: BASE + 'R1 disorder: Zymotic fever*', new: BASE + 'N1 disorder: Cyst of kidney*' });
    const set = await loadMappings(writeFile(tempDir(), 'mappings.tsv', tsv([['local_code', 'local_label', 'target_id'], ['L1', 'Kidney cyst', 'R1']])));
    const { report, context } = diffReleases(inputs);
    const lists = buildIndexParts(indexSource(context.new), undefined, true);
    for (const ctx of [context, { ...context, newIndexWords: () => lists }]) {
      const [m] = rescoreMappings(ctx, report.changes, set, { training: { seed: 5 }, nearestSearch: false }).mappings;
      expect(m.verdict).toBe('broken');
      expect(m.suggestions.map((x) => [x.concept_id, x.reason])).toContainEqual(['N1', 'lexical_neighbour']);
    }
  });

  it('drifted: a synonym the label was built from moved to another concept', async () => {
    const old = BASE + 'A disorder: Migraine* | Sick headache | Hemicrania | Migraine headache\nB disorder: Tension headache* | Stress headache';
    const neu = BASE + 'A disorder: Migraine* | Hemicrania | Migraine headache\nB disorder: Tension headache* | Stress headache | Sick headache';
    const r = await check({ old, new: neu }, [['L1', 'Sick headache', 'A'], ['L2', 'Migraine', 'A']]);
    const m = r.get('L1')!;
    expect(m.verdict).toBe('drifted');
    expect(top(m)).toBe('B');
    expect(m.score_new!).toBeLessThan(m.score_old!);
    expect(m.change_ids).toContain('moved_synonym:A>B');
    expect(r.get('L2')!.verdict).toBe('ok');
  });

  it('drifted: the identifier was reused for another meaning', async () => {
    const old = BASE + 'X1 lab test: Acid phosphatase measurement* | Serum acid phosphatase';
    const neu = BASE + 'X1 lab test: Plasma ammonia measurement* | Blood ammonia';
    const r = await check({ old, new: neu }, [['L1', 'Acid phosphatase', 'X1']]);
    expect(r.get('L1')!.verdict).toBe('drifted');
    expect(r.get('L1')!.reasons[0]).toMatch(/reused/);
  });

  it('context_changed: category or parents changed while the terms held', async () => {
    const old = BASE + 'K1 disorder: Obesity* | Adiposity';
    const neu = BASE + 'K1 finding: Obesity* | Adiposity';
    const oh = BASE_HIERARCHY + 'B26 < G3';
    const nh = BASE_HIERARCHY + 'B26 < G1';
    const r = await check({ old, new: neu, oldHierarchy: oh, newHierarchy: nh }, [['L1', 'Obesity', 'K1'], ['L2', 'Dizziness', 'B26'], ['L3', 'Asthma', 'B01']]);
    expect(r.get('L1')!.verdict).toBe('context_changed');
    expect(r.get('L1')!.suggestions.map((s) => s.reason)).toEqual(['current_target']);
    expect(r.get('L2')!.verdict).toBe('context_changed');
    expect(r.get('L2')!.change_ids).toEqual(['hierarchy_change:B26>B26']);
    expect(r.get('L3')!.verdict).toBe('ok');
  });

  it('unknown_target: not in the old release; a CURIE resolves by its local part', async () => {
    const r = await check({ old: BASE, new: BASE + 'N1 disorder: Sarcoidosis*' }, [['L1', 'Sarcoidosis', 'N1'], ['L2', 'Nothing', 'Z9'], ['L3', 'Gout', 'QCV:B02']]);
    expect(r.get('L1')!.verdict).toBe('unknown_target');
    expect(r.get('L1')!.score_old).toBeNull();
    expect(r.get('L1')!.score_new).not.toBeNull();
    expect(r.get('L2')!.verdict).toBe('unknown_target');
    expect(r.get('L2')!.score_new).toBeNull();
    expect(r.get('L3')!.verdict).toBe('ok');
    expect(r.get('L3')!.target_label).toBe('Gout');
  });
});
