import { describe, expect, it } from 'vitest';
import { SEVERITY, groupByChange, impactOf, rankByImpact } from '../../src/rank/rankByImpact.js';
import type { MappingResult, Verdict } from '../../src/rescore/types.js';
import { VERDICTS } from '../../src/rescore/types.js';
import type { Change } from '../../src/classify/types.js';

function result(code: string, verdict: Verdict, usage: number, change_ids: string[] = [], line = 2): MappingResult {
  return {
    local_code: code, local_label: code, target_id: 'T', target_label: '', relation: 'exact', usage, owner: '', verdict,
    score_old: 0.9, score_new: 0.9, suggestions: [], impact: -1, change_ids, reasons: [], line,
  };
}

function change(id: string, kind: Change['kind']): Change {
  return { id, kind, from: [], to: [], terms: [], confidence: 1, evidence: {} } as unknown as Change;
}

describe('impact', () => {
  it('has a weight for every verdict, ok weighing nothing', () => {
    expect(Object.keys(SEVERITY).sort()).toEqual([...VERDICTS].sort());
    expect(SEVERITY.ok).toBe(0);
    expect(SEVERITY.broken).toBeGreaterThan(SEVERITY.drifted);
    expect(SEVERITY.drifted).toBeGreaterThan(SEVERITY.ambiguous);
    expect(SEVERITY.ambiguous).toBeGreaterThan(SEVERITY.redirect);
    expect(SEVERITY.redirect).toBeGreaterThan(SEVERITY.context_changed);
    expect(impactOf('broken', 7)).toBe(70);
    expect(impactOf('broken', -3)).toBe(0);
  });

  it('orders by impact, then local code, without touching the input', () => {
    const input = [result('C', 'redirect', 100), result('A', 'broken', 40), result('B', 'broken', 40), result('D', 'ok', 1e6), result('E', 'drifted', 1)];
    const ranked = rankByImpact(input);
    expect(ranked.map((r) => `${r.local_code}:${r.impact}`)).toEqual(['A:400', 'B:400', 'C:400', 'E:8', 'D:0']);
    expect(input[0].impact).toBe(-1);
    // Other weights can be given.
    expect(rankByImpact(input, { ...SEVERITY, ok: 1 })[0].local_code).toBe('D');
  });
});

describe('groupByChange', () => {
  it('puts each mapping under its most structural change and lists untouched changes after', () => {
    const changes = [change('retirement:R>', 'retirement'), change('synonym_removed:R>R', 'synonym_removed'), change('merge:M+N>N', 'merge'), change('addition:>Z', 'addition')];
    const results = [
      result('A', 'broken', 5, ['synonym_removed:R>R', 'retirement:R>']),
      result('B', 'redirect', 1, ['merge:M+N>N']),
      result('C', 'redirect', 20, ['merge:M+N>N']),
      result('D', 'ok', 3),
    ].map((r) => ({ ...r, impact: impactOf(r.verdict, r.usage) }));
    const g = groupByChange(results, changes);
    expect(g.changes.map((c) => [c.change.id, c.mappings.map((m) => m.local_code), c.impact])).toEqual([
      ['merge:M+N>N', ['C', 'B'], 84],
      ['retirement:R>', ['A'], 50],
    ]);
    expect(g.unchanged.map((m) => m.local_code)).toEqual(['D']);
    // synonym_removed touches A (under the retirement), so only the addition touches nothing.
    expect(g.changes_without_mappings).toEqual(['addition:>Z']);
  });
});
