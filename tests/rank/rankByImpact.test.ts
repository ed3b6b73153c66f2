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

  it('breaks a tie of one local code by the mapping\'s content, never by its line', () => {
    const at = (target: string, line: number, more: Partial<MappingResult> = {}) => ({ ...result('L1', 'drifted', 1, [], line), target_id: target, ...more });
    const rows = [at('T2', 2), at('T1', 3), at('T3', 4, { local_label: 'b' }), at('T3', 5, { local_label: 'a', owner: 'x' }), at('T3', 6, { local_label: 'a', owner: 'w' })];
    const key = (list: MappingResult[]) => list.map((r) => `${r.target_id}/${r.local_label}/${r.owner}`);
    const want = ['T1/L1/', 'T2/L1/', 'T3/a/w', 'T3/a/x', 'T3/b/'];
    expect(key(rankByImpact(rows))).toEqual(want);
    // The same rows in the other order, and with their lines swapped: the same order.
    expect(key(rankByImpact([...rows].reverse()))).toEqual(want);
    expect(key(rankByImpact(rows.map((r, i) => ({ ...r, line: 100 - i }))))).toEqual(want);
    // Within a change's group too.
    const grouped = groupByChange([...rows].reverse().map((r) => ({ ...r, impact: 8, change_ids: ['retirement:R>'] })), [change('retirement:R>', 'retirement')]);
    expect(key(grouped.changes[0].mappings)).toEqual(want);
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
