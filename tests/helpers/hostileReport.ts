/**
 * Reports whose strings try to break out of every output form: HTML and script injection,
 * attribute injection, Markdown links and autolinks, spreadsheet formulas (OWASP "CSV
 * Injection" triggers = + - @ tab CR), table pipes and line breaks. The releases are diffed for
 * real; the mapping results are built by hand (no rescoring runs).
 */
import { diffReleases } from '../../src/pipeline.js';
import type { CheckReport, DiffReport } from '../../src/report/types.js';
import { loadPair } from './releases.js';
import { makeCheckReport, mapping } from './checkReport.js';

export const SCRIPT = '<script>alert(1)</script>';
export const ATTRIBUTE = 'x" onmouseover="alert(1)';
export const MD_LINK = '[click](javascript:alert(1))';
export const FORMULA = '=HYPERLINK("http://evil.example","x")';

export const HOSTILE_PAIR = {
  old: `
S1 disorder: Asthma* | Bronchial asthma
P1 disorder: Diabetes mellitus* | Type 1 diabetes | Juvenile diabetes | Type 2 diabetes | ${SCRIPT}
R1 disorder: ${ATTRIBUTE}* | ${MD_LINK}
A1 disorder: Chronic renal failure* | Renal failure, chronic
`,
  new: `
S1 disorder: Asthma* | Bronchial asthma
P1 disorder: Diabetes mellitus* | Type 1 diabetes | Juvenile diabetes
P2 disorder: Type 2 diabetes* | ${SCRIPT}
A1 disorder: Chronic kidney disease* | Chronic renal failure | Renal failure, chronic
`,
};

export async function hostileDiff(): Promise<DiffReport> {
  return diffReleases(await loadPair(HOSTILE_PAIR)).report;
}

/** The id of the first change of a kind; throws when the diff has none (the fixture changed). */
export function changeId(report: DiffReport, kind: string): string {
  const c = report.changes.find((x) => x.kind === kind);
  if (!c) throw new Error(`fixture: no ${kind} in ${report.changes.map((x) => x.id).join(', ')}`);
  return c.id;
}

export async function hostileCheck(): Promise<CheckReport> {
  const diff = await hostileDiff();
  const split = changeId(diff, 'split');
  const retired = changeId(diff, 'retirement');
  const renamed = changeId(diff, 'preferred_term_change');
  return makeCheckReport(diff, [
    mapping({
      local_code: FORMULA,
      local_label: 'A | B\nC',
      target_id: 'P1',
      target_label: 'Diabetes mellitus',
      verdict: 'ambiguous',
      usage: 500,
      impact: 500,
      change_ids: [split],
      suggestions: [
        { concept_id: 'P1', label: 'Diabetes mellitus', score: 0.6, reason: 'term_flow' },
        { concept_id: 'P2', label: SCRIPT, score: 0.4, reason: 'term_flow' },
      ],
      reasons: ['the target was split; pick the part that fits'],
      line: 2,
    }),
    mapping({ local_code: '+1', local_label: ATTRIBUTE, target_id: 'R1', target_label: ATTRIBUTE, verdict: 'broken', usage: 300, impact: 300, change_ids: [retired], reasons: [MD_LINK], line: 3 }),
    mapping({ local_code: '-2', local_label: '@SUM(A1:A9)', target_id: 'A1', target_label: 'Chronic renal failure', verdict: 'ok', usage: 900, impact: 0, change_ids: [renamed], line: 4 }),
    mapping({ local_code: '\tTAB', local_label: "'quoted", target_id: 'X9', verdict: 'unknown_target', usage: 300, impact: 300, score_old: null, line: 5 }),
    mapping({ local_code: '\rCR', local_label: 'www.evil.example and a@b.example', target_id: 'R1', verdict: 'broken', usage: 300, impact: 300, change_ids: [retired], line: 6 }),
    mapping({ local_code: 'LAB-7', local_label: 'Fasting glucose', target_id: 'S1', verdict: 'ok', usage: 50, impact: 0, line: 7 }),
  ]);
}
