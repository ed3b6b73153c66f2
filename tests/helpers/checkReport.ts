/**
 * Build a CheckReport by hand for renderer tests: a real DiffReport (from loadPair +
 * diffReleases) plus a few MappingResult objects. The rescoring is not run; the fields it
 * would compute are filled as `check` documents them (verdict_summary counts every verdict,
 * changes_without_mappings lists the changes no mapping names, mappings ordered by impact).
 */
import { VERDICTS, type MappingResult, type ScorerInfo, type Verdict } from '../../src/rescore/types.js';
import type { CheckReport, DiffReport, InputInfo } from '../../src/report/types.js';
import { compareByImpact } from '../../src/render/model.js';
import { impactOf } from '../../src/rank/rankByImpact.js';

/** A mapping result with plain defaults; impact defaults to rankByImpact's weight of the verdict × usage. */
export function mapping(fields: Partial<MappingResult> & Pick<MappingResult, 'local_code' | 'target_id' | 'verdict'>): MappingResult {
  const usage = fields.usage ?? 10;
  return {
    local_label: `Label of ${fields.local_code}`,
    target_label: '',
    relation: 'exact',
    usage,
    owner: 'Laboratory',
    score_old: 0.9,
    score_new: fields.verdict === 'ok' ? 0.9 : 0.2,
    suggestions: [],
    impact: impactOf(fields.verdict, usage),
    change_ids: [],
    reasons: [],
    line: 2,
    ...fields,
  };
}

/** A scorer block with hand-set values (no scorer is trained in these tests). */
export const TEST_SCORER: ScorerInfo = {
  auc: 0.93,
  ece: 0.041,
  pairs_trained: 1200,
  pairs_held_out: 300,
  features: ['token_jaccard', 'char_trigram', 'same_preferred'],
  weights: { bias: -2.1, token_jaccard: 3.4, char_trigram: 2.2, same_preferred: 1.1 },
  seed: 7,
};

export function makeCheckReport(
  diff: DiffReport,
  mappings: MappingResult[],
  extra: { mappingsInput?: InputInfo; fail_on?: CheckReport['fail_on'] } = {},
): CheckReport {
  const verdict_summary = Object.fromEntries(VERDICTS.map((v) => [v, 0])) as Record<Verdict, number>;
  for (const m of mappings) verdict_summary[m.verdict]++;
  const named = new Set(mappings.flatMap((m) => m.change_ids));
  const mappingsInput: InputInfo = extra.mappingsInput ?? {
    role: 'mappings',
    path: 'mappings.tsv',
    sha256: 'a'.repeat(64),
    accounting: { file: 'mappings.tsv', read: mappings.length, used: mappings.length, rejected: 0, blankLines: 0 },
  };
  const report: CheckReport = {
    ...diff,
    inputs: [...diff.inputs, mappingsInput],
    mappings: [...mappings].sort(compareByImpact),
    scorer: TEST_SCORER,
    verdict_summary,
    changes_without_mappings: diff.changes.filter((c) => !named.has(c.id)).map((c) => c.id),
  };
  if (extra.fail_on) report.fail_on = extra.fail_on;
  return report;
}
