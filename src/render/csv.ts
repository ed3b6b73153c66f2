/**
 * The CSV form: the reviewer's worklist, one row per mapping needing action (by impact, then
 * local code), with empty `decision`, `new_target`, `reviewer` and `note` columns to fill in
 * and release provenance columns that let `apply` check the worklist belongs to the releases it
 * is applied to. RFC 4180: comma-separated, CRLF line ends, fields quoted when they hold a comma,
 * a quote or a line break (quotes doubled). No comment line: the first line is the header, so
 * the file opens in a spreadsheet as it is.
 *
 * Formula injection (OWASP "CSV Injection"): a cell that begins with = + - @ tab, CR or LF is
 * prefixed with a single quote and quoted. So that `apply` can undo this exactly, a cell that
 * already begins with a single quote is prefixed too; `readWorklistCell` removes one leading
 * quote. The caution cannot be carried inside a worklist without breaking its table; it lives in
 * the report the worklist is made from (see docs/report-schema.md).
 */
import type { MappingResult } from '../rescore/types.js';
import type { Report } from '../report/types.js';
import { buildView, mainCause, suggestionLabel, targetLabel, type RenderOptions, type ReportView } from './model.js';

/** Columns in order. `apply` reads local_code, proposed_target, decision, new_target, reviewer, note. */
export const WORKLIST_COLUMNS = [
  'local_code',
  'local_label',
  'target_id',
  'target_label',
  'verdict',
  'impact',
  'usage',
  'change_ids',
  'proposed_target',
  'proposed_label',
  'proposed_score',
  'other_candidates',
  'reasons',
  'decision',
  'new_target',
  'reviewer',
  'note',
  'old_release',
  'old_sha256',
  'new_release',
  'new_sha256',
  'tool_version',
] as const;
export type WorklistColumn = (typeof WORKLIST_COLUMNS)[number];

/** Joins the values of a many-valued cell (change ids, candidates, reasons). */
export const LIST_SEPARATOR = ' | ';

const TRIGGER = /^[=+\-@\t\r\n']/;

/** Neutralise a spreadsheet formula trigger; the result is to be quoted. */
export function neutraliseCell(value: string): string {
  return TRIGGER.test(value) ? `'${value}` : value;
}

/** Undo `neutraliseCell` on a value read back from a worklist. */
export function readWorklistCell(value: string): string {
  return value.startsWith("'") ? value.slice(1) : value;
}

/** One RFC 4180 field, neutralised. */
export function csvField(value: string): string {
  const v = neutraliseCell(value);
  return v !== value || /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

function row(view: ReportView, m: MappingResult): Record<WorklistColumn, string> {
  const r = view.report;
  const [best, ...others] = m.suggestions;
  const cause = mainCause(m, view.changeById);
  // The main cause first, then the others as the mapping names them.
  const ids = cause ? [cause.id, ...m.change_ids.filter((id) => id !== cause.id)] : m.change_ids;
  return {
    local_code: m.local_code,
    local_label: m.local_label,
    target_id: m.target_id,
    target_label: targetLabel(view, m),
    verdict: m.verdict,
    impact: String(m.impact),
    usage: String(m.usage),
    change_ids: ids.join(LIST_SEPARATOR),
    proposed_target: best?.concept_id ?? '',
    proposed_label: best ? suggestionLabel(view, best) : '',
    proposed_score: best ? String(best.score) : '',
    other_candidates: others.map((s) => `${s.concept_id} ${suggestionLabel(view, s)} (${s.score.toFixed(2)}, ${s.reason})`).join(LIST_SEPARATOR),
    reasons: m.reasons.join(LIST_SEPARATOR),
    decision: '',
    new_target: '',
    reviewer: '',
    note: '',
    old_release: r.releases.old.label,
    old_sha256: r.releases.old.sha256,
    new_release: r.releases.new.label,
    new_sha256: r.releases.new.sha256,
    tool_version: `${r.tool.name} ${r.tool.version}`,
  };
}

export function renderCsv(report: Report, options: RenderOptions = {}): string {
  const view = buildView(report, { verdicts: options.verdicts });
  const lines = [WORKLIST_COLUMNS.join(',')];
  for (const m of view.actions) {
    const r = row(view, m);
    lines.push(WORKLIST_COLUMNS.map((c) => csvField(r[c])).join(','));
  }
  return lines.join('\r\n') + '\r\n';
}
