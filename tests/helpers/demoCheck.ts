/**
 * A CheckReport of realistic size for looking at the reports: the real diff of the demo releases
 * r1 → r2, with the demo hospital's mappings given the verdicts the demo expects
 * (demo-data/expected-verdicts-r1-r2.tsv). Candidates come from the changes' own evidence and
 * impact is rankByImpact's severity weight × usage. No rescoring is run: this is a fixture for
 * renderers, not a check of the rescoring.
 */
import { readFileSync } from 'node:fs';
import { loadMappings } from '../../src/load/index.js';
import { runDiff } from '../../src/pipeline.js';
import type { Change } from '../../src/classify/types.js';
import type { MappingResult, MappingSuggestion, Verdict } from '../../src/rescore/types.js';
import type { CheckReport } from '../../src/report/types.js';
import { impactOf } from '../../src/rank/rankByImpact.js';
import { makeCheckReport } from './checkReport.js';

function candidates(c: Change | undefined): MappingSuggestion[] {
  if (!c) return [];
  if (c.kind === 'retirement') return c.evidence.suggestions.map((s) => ({ ...s }));
  if (c.kind === 'split' || c.kind === 'merge' || c.kind === 'reorganization' || c.kind === 'replacement') {
    return c.evidence.flows
      .map((f) => ({ concept_id: f.to, label: c.evidence.preferred_after[f.to] ?? '', score: f.share, reason: 'term_flow' as const }))
      .sort((a, b) => b.score - a.score);
  }
  if (c.kind === 'moved_synonym') return c.to.map((id) => ({ concept_id: id, label: '', score: 0.6, reason: 'term_flow' as const }));
  return [];
}

export async function demoCheckReport(): Promise<CheckReport> {
  const { report } = await runDiff({
    old: 'demo-data/release-r1.tsv',
    new: 'demo-data/release-r2.tsv',
    oldHierarchy: 'demo-data/hierarchy-r1.tsv',
    newHierarchy: 'demo-data/hierarchy-r2.tsv',
    history: 'demo-data/history-r2.tsv',
  });
  const set = await loadMappings('demo-data/mappings.tsv');
  const expected = new Map(
    readFileSync('demo-data/expected-verdicts-r1-r2.tsv', 'utf8')
      .trim()
      .split('\n')
      .slice(1)
      .map((l) => l.split('\t'))
      .map(([code, verdict, , note]) => [code, { verdict: verdict as Verdict, note: note ?? '' }]),
  );
  const touching = (id: string) => report.changes.filter((c) => c.from.includes(id) || (c.kind !== 'addition' && c.to.includes(id)));
  const results: MappingResult[] = set.mappings.map((m) => {
    const e = expected.get(m.localCode) ?? { verdict: 'ok' as Verdict, note: '' };
    const changes = touching(m.targetId);
    return {
      local_code: m.localCode,
      local_label: m.localLabel,
      target_id: m.targetId,
      target_label: '',
      relation: m.relation,
      usage: m.usage,
      owner: m.owner,
      verdict: e.verdict,
      score_old: e.verdict === 'unknown_target' ? null : 0.88,
      score_new: e.verdict === 'ok' ? 0.88 : e.verdict === 'broken' ? null : 0.31,
      suggestions: e.verdict === 'ok' ? [] : candidates(changes[0]).slice(0, 5),
      impact: impactOf(e.verdict, m.usage),
      change_ids: changes.map((c) => c.id),
      reasons: e.note ? [e.note] : [],
      line: m.line,
    };
  });
  return makeCheckReport(report, results, {
    mappingsInput: { role: 'mappings', path: set.path, sha256: set.sha256, accounting: set.accounting },
  });
}
