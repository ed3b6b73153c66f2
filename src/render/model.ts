/**
 * The view every renderer draws: data derived once from a report so that the five forms
 * (text, Markdown, JSON, CSV, HTML) agree on order, grouping and counts.
 *
 * - changes in sections by severity (does the kind change what a code means?) then by kind,
 *   kinds in CHANGE_KINDS order (most dangerous first);
 * - mappings needing action (verdict other than ok, not settled by an earlier review decision),
 *   ordered by impact, then local code, target and the rest of the mapping (never its line); the settled ones apart; and the same mappings grouped under the change that caused them (the grouping
 *   of rankByImpact's groupByChange: groups by total impact), those no change touches last;
 * - the changes that touch no mapping, listed after the groups;
 * - counts by verdict and by kind, impact buckets, the input accounting table and the
 *   parameters used, flattened to name/value rows.
 * Nothing here reads a clock or the environment, so a report renders the same every time.
 */
import { CHANGE_KIND_INFO, type ChangeKindInfo } from '../classify/kinds.js';
import { CHANGE_KINDS, type Change, type ChangeKind } from '../classify/types.js';
import { VERDICTS, type MappingResult, type Verdict } from '../rescore/types.js';
import { isCheckReport, type CheckReport, type InputInfo, type Report } from '../report/types.js';
import { diffArrays, diffWords } from 'diff';
import { compareByImpact, groupByChange } from '../rank/rankByImpact.js';

/** Plain words for each verdict; `action` is false only for the verdict that needs no review. */
export const VERDICT_INFO: Record<Verdict, { title: string; meaning: string; action: boolean }> = {
  broken: { title: 'Broken', meaning: 'The target was retired or removed and no successor carries its meaning.', action: true },
  drifted: { title: 'Meaning drifted', meaning: 'The target now means something else, or the term the mapping relied on moved to another concept.', action: true },
  ambiguous: { title: 'Ambiguous', meaning: 'The meaning of the target was divided over several concepts; a reviewer must choose.', action: true },
  redirect: { title: 'Redirect', meaning: 'The target was replaced or merged, and one successor carries its meaning.', action: true },
  context_changed: { title: 'Context changed', meaning: 'The terms of the target are unchanged, but its category or parents changed.', action: true },
  ok: { title: 'No action', meaning: 'Nothing in the new release affects the mapping.', action: false },
  unknown_target: { title: 'Unknown target', meaning: 'The target identifier is not in the old release.', action: true },
};

/** The verdicts listed by default: every verdict that needs a reviewer. */
export const ACTION_VERDICTS: Verdict[] = VERDICTS.filter((v) => VERDICT_INFO[v].action);

export const SEVERITY_INFO = {
  meaning: { title: 'Changes to what a code means', meaning: 'Merges, splits, retirements and other changes after which a code may no longer mean what a mapping assumed.' },
  wording: { title: 'Changes that keep the meaning', meaning: 'New concepts, renamed concepts, moved or edited terms, new parents or categories.' },
} as const;
export type Severity = keyof typeof SEVERITY_INFO;

export const INPUT_ROLE_TITLE: Record<InputInfo['role'], string> = {
  old: 'old release',
  new: 'new release',
  old_hierarchy: 'old hierarchy',
  new_hierarchy: 'new hierarchy',
  history: 'history table',
  mappings: 'mappings',
  decisions: 'decisions',
};

export interface KindSection {
  kind: ChangeKind;
  info: ChangeKindInfo;
  changes: Change[];
}

export interface SeveritySection {
  severity: Severity;
  title: string;
  meaning: string;
  kinds: KindSection[];
  count: number;
}

/** Mappings needing action whose main cause is one change (or none: `change` null). */
export interface ActionGroup {
  change: Change | null;
  /** By impact, then local code, target and the rest of the mapping (compareByImpact). */
  mappings: MappingResult[];
  /** Sum of the mappings' impact. */
  impact: number;
}

export interface ImpactBucket {
  /** Lower bound, included. */
  low: number;
  /** Upper bound, excluded. */
  high: number;
  label: string;
  /** A short label for charts: "<10", "10–100", "1k–10k". */
  short: string;
  count: number;
}

export interface InputRow {
  role: InputInfo['role'];
  title: string;
  path: string;
  sha256: string;
  read: number;
  used: number;
  rejected: number;
  blankLines: number;
}

export interface ParameterRow {
  name: string;
  value: string;
}

/** A concept id with the preferred term known for it on one side ('' when none is known). */
export interface ConceptRef {
  id: string;
  label: string;
}

/** One line of a term diff: kept, removed or added, with where a moved term went or came from. */
export interface TermLine {
  op: 'kept' | 'removed' | 'added';
  term: string;
  /** For a removed term: the concept it went to; for an added one: where it came from. */
  other: string | null;
}

export interface ConceptTermDiff {
  concept: string;
  before: string[];
  after: string[];
  lines: TermLine[];
}

/** Preferred term of one concept before and after, when it changed. */
export interface PreferredChange {
  concept: string;
  before: string;
  after: string;
}

export interface ViewOptions {
  /** Verdicts to list; default every verdict that needs action. */
  verdicts?: readonly Verdict[];
}

export interface ReportView {
  report: Report;
  check: CheckReport | null;
  severities: SeveritySection[];
  /** Every kind in CHANGE_KINDS order, zero counts included. */
  kindCounts: { kind: ChangeKind; title: string; count: number }[];
  /** Every verdict in VERDICTS order (check reports only). */
  verdictCounts: { verdict: Verdict; title: string; count: number }[];
  /** The verdicts listed, and whether the caller chose them. */
  verdicts: Verdict[];
  filtered: boolean;
  /** Mappings with a listed verdict and not settled by an earlier decision, by impact (descending), local code, line. */
  actions: MappingResult[];
  /** Mappings settled by an earlier review decision (MappingResult.settled), in the same order; never listed as needing action. */
  settled: MappingResult[];
  /** Mappings whose verdict needs a reviewer and that no earlier decision settles. */
  needingAction: number;
  /** The same mappings under the change that caused them, largest total impact first; those no change touches last. */
  groups: ActionGroup[];
  /** Changes that touch no mapping, in report order. */
  unmappedChanges: Change[];
  /** Distribution of impact over `actions`. */
  impact: ImpactBucket[];
  inputs: InputRow[];
  parameters: ParameterRow[];
  changeById: Map<string, Change>;
  /** Position of each change in report.changes (stable anchors). */
  changeIndex: Map<string, number>;
  /** Per change id: mappings it touches, in total and among `actions`. */
  touches: Map<string, { total: number; listed: number }>;
  /** Preferred terms known from the report, per side. */
  labels: { old: Map<string, string>; new: Map<string, string> };
}

const KIND_RANK = new Map<ChangeKind, number>(CHANGE_KINDS.map((k, i) => [k, i]));

/** Code-unit order: the same on every machine and locale. */
export function compareText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** The order of mappings in every form: rankByImpact's (impact descending, then the mapping's content, never its line). */
export { compareByImpact };

export function buildView(report: Report, options: ViewOptions = {}): ReportView {
  const check = isCheckReport(report) ? report : null;
  const changeById = new Map<string, Change>();
  const changeIndex = new Map<string, number>();
  report.changes.forEach((c, i) => {
    changeById.set(c.id, c);
    changeIndex.set(c.id, i);
  });

  const byKind = new Map<ChangeKind, Change[]>();
  for (const c of report.changes) {
    const list = byKind.get(c.kind);
    if (list) list.push(c);
    else byKind.set(c.kind, [c]);
  }
  const severities: SeveritySection[] = [];
  for (const severity of ['meaning', 'wording'] as const) {
    const kinds: KindSection[] = [];
    for (const kind of CHANGE_KINDS) {
      const info = CHANGE_KIND_INFO[kind];
      const changes = byKind.get(kind);
      if (changes && info.structural === (severity === 'meaning')) kinds.push({ kind, info, changes });
    }
    if (kinds.length) severities.push({ severity, ...SEVERITY_INFO[severity], kinds, count: kinds.reduce((n, k) => n + k.changes.length, 0) });
  }

  const kindCounts = CHANGE_KINDS.map((kind) => ({ kind, title: CHANGE_KIND_INFO[kind].title, count: report.summary[kind] ?? 0 }));
  const verdicts = options.verdicts ? VERDICTS.filter((v) => options.verdicts!.includes(v)) : ACTION_VERDICTS;
  const verdictCounts = check ? VERDICTS.map((verdict) => ({ verdict, title: VERDICT_INFO[verdict].title, count: check.verdict_summary[verdict] ?? 0 })) : [];

  const actions = check ? check.mappings.filter((m) => verdicts.includes(m.verdict) && !m.settled).sort(compareByImpact) : [];
  const settled = check ? check.mappings.filter((m) => m.settled).sort(compareByImpact) : [];
  const needingAction = check ? check.mappings.filter((m) => VERDICT_INFO[m.verdict].action && !m.settled).length : 0;
  const touches = new Map<string, { total: number; listed: number }>();
  const listedSet = new Set(actions);
  for (const m of check?.mappings ?? []) {
    for (const id of new Set(m.change_ids)) {
      const t = touches.get(id) ?? { total: 0, listed: 0 };
      t.total++;
      if (listedSet.has(m)) t.listed++;
      touches.set(id, t);
    }
  }

  return {
    report,
    check,
    severities,
    kindCounts,
    verdictCounts,
    verdicts,
    filtered: options.verdicts !== undefined,
    actions,
    settled,
    needingAction,
    groups: groupByCause(actions, report.changes),
    unmappedChanges: check ? check.changes_without_mappings.map((id) => changeById.get(id)).filter((c): c is Change => c !== undefined) : [],
    impact: impactBuckets(actions.map((m) => m.impact)),
    inputs: report.inputs.map((i) => ({ role: i.role, title: INPUT_ROLE_TITLE[i.role] ?? i.role, path: i.path, sha256: i.sha256, read: i.accounting.read, used: i.accounting.used, rejected: i.accounting.rejected, blankLines: i.accounting.blankLines })),
    parameters: parameterRows(report),
    changeById,
    changeIndex,
    touches,
    labels: labelIndex(report),
  };
}

/**
 * The change a mapping is listed under, as rankByImpact's groupByChange decides it: of the
 * changes it names that are in the report, the one of the most dangerous kind (CHANGE_KINDS
 * order), the smaller id on a tie.
 */
export function mainCause(m: MappingResult, changeById: Map<string, Change>): Change | null {
  let best: Change | null = null;
  for (const id of m.change_ids) {
    const c = changeById.get(id);
    if (!c) continue;
    if (!best) best = c;
    else {
      const d = KIND_RANK.get(c.kind)! - KIND_RANK.get(best.kind)!;
      if (d < 0 || (d === 0 && compareText(c.id, best.id) < 0)) best = c;
    }
  }
  return best;
}

/** Groups from groupByChange (total impact, then change id), then the mappings no change touches. */
function groupByCause(actions: MappingResult[], changes: Change[]): ActionGroup[] {
  const grouped = groupByChange(actions, changes);
  const groups: ActionGroup[] = grouped.changes.map((g) => ({ change: g.change, mappings: g.mappings, impact: g.impact }));
  if (grouped.unchanged.length) groups.push({ change: null, mappings: grouped.unchanged, impact: grouped.unchanged.reduce((n, m) => n + m.impact, 0) });
  return groups;
}

/** Decade buckets over impact: under 10, 10 to 100, 100 to 1,000 … up to the decade of the largest. */
export function impactBuckets(impacts: number[]): ImpactBucket[] {
  const max = impacts.reduce((a, b) => Math.max(a, b), 0);
  let top = 0;
  while (10 ** (top + 1) <= max) top++;
  const buckets: ImpactBucket[] = [];
  for (let d = 0; d <= top; d++) {
    const low = d === 0 ? 0 : 10 ** d;
    const high = 10 ** (d + 1);
    buckets.push({ low, high, label: d === 0 ? 'under 10' : `${formatCount(low)} to ${formatCount(high)}`, short: d === 0 ? '<10' : `${shortCount(low)}–${shortCount(high)}`, count: 0 });
  }
  for (const v of impacts) {
    let d = 0;
    while (d < top && v >= buckets[d].high) d++;
    buckets[d].count++;
  }
  return buckets;
}

/** 10 → "10", 1000 → "1k", 1e6 → "1M" (powers of ten only). */
function shortCount(n: number): string {
  if (n >= 1e9) return `${n / 1e9}G`;
  if (n >= 1e6) return `${n / 1e6}M`;
  if (n >= 1e3) return `${n / 1e3}k`;
  return String(n);
}

function parameterRows(report: Report): ParameterRow[] {
  const rows: ParameterRow[] = [];
  const walk = (prefix: string, value: unknown) => {
    if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
      for (const [k, v] of Object.entries(value)) walk(prefix ? `${prefix}.${k}` : k, v);
    } else rows.push({ name: prefix, value: Array.isArray(value) ? value.map(String).join(', ') : String(value) });
  };
  walk('', report.parameters);
  if (isCheckReport(report)) {
    walk('scorer', report.scorer);
    if (report.fail_on) walk('fail_on', report.fail_on);
  }
  return rows;
}

function labelIndex(report: Report): ReportView['labels'] {
  const old = new Map<string, string>();
  const neu = new Map<string, string>();
  const put = (m: Map<string, string>, id: string | undefined, label: string | undefined) => {
    if (id && label && !m.has(id)) m.set(id, label);
  };
  for (const c of report.changes) {
    switch (c.kind) {
      case 'replacement':
      case 'merge':
      case 'split':
      case 'reorganization':
        for (const [id, l] of Object.entries(c.evidence.preferred_before)) put(old, id, l);
        for (const [id, l] of Object.entries(c.evidence.preferred_after)) put(neu, id, l);
        break;
      case 'retirement':
        put(old, c.from[0], c.evidence.preferred);
        for (const s of c.evidence.suggestions) put(neu, s.concept_id, s.label);
        break;
      case 'addition':
        put(neu, c.to[0], c.evidence.preferred);
        break;
      case 'preferred_term_change':
        put(old, c.from[0], c.evidence.before);
        put(neu, c.to[0], c.evidence.after);
        break;
      default:
        break;
    }
  }
  if (isCheckReport(report)) {
    for (const m of report.mappings) {
      put(old, m.target_id, m.target_label);
      for (const s of m.suggestions) put(neu, s.concept_id, s.label);
    }
  }
  return { old, new: neu };
}

/** The concepts a change comes from (old labels) and goes to (new labels). */
export function changeConcepts(view: ReportView, c: Change): { from: ConceptRef[]; to: ConceptRef[] } {
  return {
    from: c.from.map((id) => ({ id, label: view.labels.old.get(id) ?? view.labels.new.get(id) ?? '' })),
    to: c.to.map((id) => ({ id, label: view.labels.new.get(id) ?? view.labels.old.get(id) ?? '' })),
  };
}

/**
 * What a change is about: the concepts it goes from and to, and `only` when one list says it
 * all (the same concepts on both sides, an addition, or a retirement).
 */
export function changeSubject(view: ReportView, c: Change): { from: ConceptRef[]; to: ConceptRef[]; only: ConceptRef[] | null } {
  const { from, to } = changeConcepts(view, c);
  const same = from.length === to.length && from.every((r, i) => r.id === to[i].id);
  return { from, to, only: same || !to.length ? from : !from.length ? to : null };
}

/** The old preferred term of a mapping's target: from the mapping, else from the changes. */
export function targetLabel(view: ReportView, m: MappingResult): string {
  return m.target_label || view.labels.old.get(m.target_id) || '';
}

/** The label of a candidate: from the suggestion, else from the changes. */
export function suggestionLabel(view: ReportView, s: { concept_id: string; label: string }): string {
  return s.label || view.labels.new.get(s.concept_id) || '';
}

/**
 * Per concept the change involves: its terms before (moves from it) and after (moves to it),
 * compared as sorted sets with diffArrays. A removed term names the concept it went to, an
 * added one the concept it came from (null when it is gone or new).
 */
export function termDiffs(c: Change): ConceptTermDiff[] {
  const ids: string[] = [];
  for (const id of [...c.from, ...c.to, ...c.terms.flatMap((t) => [t.from, t.to])]) if (id !== null && !ids.includes(id)) ids.push(id);
  const out: ConceptTermDiff[] = [];
  for (const concept of ids) {
    const leaving = c.terms.filter((t) => t.from === concept);
    const arriving = c.terms.filter((t) => t.to === concept);
    if (!leaving.length && !arriving.length) continue;
    const before = leaving.map((t) => t.term).sort(compareText);
    const after = arriving.map((t) => t.new_term ?? t.term).sort(compareText);
    const wentTo = new Map<string, string | null>();
    for (const t of leaving) if (!wentTo.has(t.term)) wentTo.set(t.term, t.to);
    const cameFrom = new Map<string, string | null>();
    for (const t of arriving) if (!cameFrom.has(t.new_term ?? t.term)) cameFrom.set(t.new_term ?? t.term, t.from);
    const lines: TermLine[] = [];
    for (const part of diffArrays(before, after)) {
      for (const term of part.value) {
        if (part.added) lines.push({ op: 'added', term, other: cameFrom.get(term) ?? null });
        else if (part.removed) lines.push({ op: 'removed', term, other: wentTo.get(term) ?? null });
        else lines.push({ op: 'kept', term, other: null });
      }
    }
    out.push({ concept, before, after, lines });
  }
  return out;
}

/** Preferred terms that changed under a kept identifier, as the change shows them. */
export function preferredChanges(c: Change): PreferredChange[] {
  if (c.kind === 'preferred_term_change') return [{ concept: c.from[0], before: c.evidence.before, after: c.evidence.after }];
  if (c.kind === 'merge' || c.kind === 'split' || c.kind === 'reorganization' || c.kind === 'replacement') {
    const out: PreferredChange[] = [];
    for (const [id, before] of Object.entries(c.evidence.preferred_before)) {
      const after = c.evidence.preferred_after[id];
      if (after !== undefined && after !== before) out.push({ concept: id, before, after });
    }
    return out;
  }
  return [];
}

/**
 * A word diff (diffWords) as runs of kept, removed and added text. A removed run directly
 * followed by an added one gets a space between them, so the two read as two phrases.
 */
export function wordParts(before: string, after: string): { op: 'kept' | 'removed' | 'added'; text: string }[] {
  const out: { op: 'kept' | 'removed' | 'added'; text: string }[] = [];
  for (const p of diffWords(before, after)) {
    const op = p.added ? 'added' : p.removed ? 'removed' : 'kept';
    const prev = out[out.length - 1];
    if (op === 'added' && prev?.op === 'removed' && !/\s$/.test(prev.text) && !/^\s/.test(p.value)) out.push({ op: 'kept', text: ' ' });
    out.push({ op, text: p.value });
  }
  return out;
}

/** Kinds whose evidence carries a term flow worth drawing. */
export function flowsOf(c: Change): import('../classify/types.js').FlowCell[] | null {
  return c.kind === 'split' || c.kind === 'merge' || c.kind === 'reorganization' ? c.evidence.flows : null;
}

/** Short facts from a change's evidence, in plain words, for every form. */
export function evidenceFacts(c: Change): string[] {
  const f: string[] = [];
  switch (c.kind) {
    case 'retirement': {
      const e = c.evidence;
      f.push(e.status === 'absent' ? 'removed from the new release' : 'kept in the new release as inactive');
      for (const h of e.history) f.push(`history line ${h.line}: ${h.relation} ${h.new_id}`);
      if (e.stray_terms.length) f.push(`${e.stray_terms.reduce((n, s) => n + s.terms, 0)} term(s) went elsewhere: ${e.stray_terms.map((s) => s.to).join(', ')}`);
      break;
    }
    case 'replacement':
    case 'merge':
    case 'split':
    case 'reorganization': {
      const e = c.evidence;
      f.push(e.basis === 'terms' ? 'decided by where the terms went' : 'decided by the history table alone');
      if (c.kind === 'merge') f.push(`survivor ${c.evidence.survivor}; absorbed ${c.evidence.absorbed.join(', ') || 'none'}`);
      if (c.kind === 'split') f.push(c.evidence.kept_identifier ? 'one part keeps the old identifier' : 'every part has a new identifier');
      for (const fl of e.flows) f.push(`${fl.from} to ${fl.to}: ${fl.terms} term(s), ${Math.round(fl.share * 100)}% of its terms${fl.preferred ? ', preferred term included' : ''}`);
      for (const h of e.history) f.push(`history line ${h.line}: ${h.old_id} ${h.relation} ${h.new_id}${h.agrees_with_terms === false ? ' (the terms went elsewhere)' : ''}`);
      for (const h of e.history_disagrees) f.push(`history line ${h.line} disagrees with the terms: ${h.old_id} ${h.relation} ${h.new_id}`);
      for (const [id, s] of Object.entries(e.status)) f.push(`${id} is ${s} in the new release`);
      break;
    }
    case 'moved_synonym':
      f.push(`source concept is ${c.evidence.source_status} in the new release`, c.evidence.target_existed ? 'the receiving concept existed before' : 'the receiving concept is new');
      break;
    case 'preferred_term_change':
      f.push(c.evidence.old_preferred_kept_as_synonym ? 'the old preferred term stays as a synonym' : 'the old preferred term is gone');
      break;
    case 'id_reuse':
      f.push(`similarity of old and new terms ${c.evidence.similarity.toFixed(2)}`);
      if (c.evidence.category_before !== c.evidence.category_after) f.push(`category ${c.evidence.category_before ?? 'none'} to ${c.evidence.category_after ?? 'none'}`);
      if (c.evidence.old_terms_went_to.length) f.push(`the old terms went to ${c.evidence.old_terms_went_to.join(', ')}`);
      break;
    case 'category_change':
      f.push(`category ${c.evidence.before ?? 'none'} to ${c.evidence.after ?? 'none'}`);
      break;
    case 'hierarchy_change':
      if (c.evidence.added.length) f.push(`parents added: ${c.evidence.added.join(', ')}`);
      if (c.evidence.removed.length) f.push(`parents removed: ${c.evidence.removed.join(', ')}`);
      break;
    case 'synonym_added':
    case 'synonym_removed':
      f.push(`${c.evidence.count} term(s)`);
      break;
    case 'addition':
      f.push(`${c.evidence.terms} term(s)${c.evidence.category ? `, category ${c.evidence.category}` : ''}`);
      break;
  }
  return f;
}

/** Digits grouped by commas without a locale (48213 → "48,213"); a fraction keeps one decimal. */
export function formatCount(n: number): string {
  if (!Number.isFinite(n)) return String(n);
  const text = Number.isInteger(n) ? String(Math.abs(n)) : Math.abs(n).toFixed(1);
  const [int, frac] = text.split('.');
  return (n < 0 ? '-' : '') + int.replace(/\B(?=(\d{3})+(?!\d))/g, ',') + (frac ? `.${frac}` : '');
}

export function formatScore(n: number | null): string {
  return n === null ? 'none' : n.toFixed(2);
}

/**
 * Make characters that could mislead a reader visible: C0/C1 controls (terminal escapes, NUL,
 * line breaks inside a label) and bidirectional overrides become `\u{…}` text.
 */
export function visible(s: string): string {
  // eslint-disable-next-line no-control-regex
  return s.replace(/[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, (ch) => `\\u{${ch.charCodeAt(0).toString(16).padStart(4, '0')}}`);
}

/** Options every renderer accepts; each form uses the ones that make sense for it. */
export interface RenderOptions {
  /** Terminal colour (text form only). */
  color?: boolean;
  /** At most this many items in each list (text form only). */
  limit?: number;
  /** Verdicts to list (text, Markdown, CSV and HTML; JSON is always the whole report). */
  verdicts?: readonly Verdict[];
}

/** The one-line heading of a report: what was compared. */
export function reportTitle(report: Report): string {
  return `${isCheckReport(report) ? 'Mapping check' : 'Release comparison'}: ${report.releases.old.label} to ${report.releases.new.label}`;
}
