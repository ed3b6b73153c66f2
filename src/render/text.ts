/**
 * The terminal form (the default): a summary, then the mappings needing action by impact, each
 * with its old target, the change that caused it and the best candidates; for a diff without
 * mappings, the changes by kind with their concepts and terms. Colour through chalk only when
 * the caller asks (the CLI decides from the TTY and NO_COLOR); every input string passes through
 * `visible` so a label cannot carry terminal escape sequences.
 */
import { Chalk, type ChalkInstance } from 'chalk';
import { CHANGE_KIND_INFO } from '../classify/kinds.js';
import type { Change, TermMove } from '../classify/types.js';
import type { MappingResult, Verdict } from '../rescore/types.js';
import { formatAccounting, formatDiagnostic } from './diagnostics.js';
import {
  buildView,
  changeSubject,
  evidenceFacts,
  formatCount,
  formatScore,
  mainCause,
  reportTitle,
  suggestionLabel,
  targetLabel,
  visible,
  VERDICT_INFO,
  type ConceptRef,
  type ReportView,
} from './model.js';
import type { Report } from '../report/types.js';

export interface TextOptions {
  color: boolean;
  /** At most this many mappings (or, for a diff, changes of each kind). */
  limit?: number;
  /** Verdicts to list; default every verdict other than ok. */
  verdicts?: readonly Verdict[];
}

interface Style {
  head: (s: string) => string;
  dim: (s: string) => string;
  id: (s: string) => string;
  removed: (s: string) => string;
  added: (s: string) => string;
  verdict: (v: Verdict, s: string) => string;
}

function style(color: boolean): Style {
  const c: ChalkInstance = new Chalk({ level: color ? 1 : 0 });
  const byVerdict: Record<Verdict, (s: string) => string> = {
    broken: c.red.bold,
    drifted: c.magenta.bold,
    ambiguous: c.yellow.bold,
    redirect: c.cyan,
    context_changed: c.blue,
    ok: c.green,
    unknown_target: c.gray.bold,
  };
  return { head: c.bold, dim: c.dim, id: c.cyan, removed: c.red, added: c.green, verdict: (v, s) => byVerdict[v](s) };
}

const v = (s: string) => visible(s);
const pad = (s: string, n: number) => (s.length >= n ? s : s + ' '.repeat(n - s.length));
const padLeft = (s: string, n: number) => (s.length >= n ? s : ' '.repeat(n - s.length) + s);

export function renderText(report: Report, options: TextOptions): string {
  const view = buildView(report, { verdicts: options.verdicts });
  const st = style(options.color);
  const out: string[] = [];
  const limit = options.limit !== undefined && options.limit >= 0 ? options.limit : Infinity;

  out.push(st.head(v(reportTitle(report))));
  out.push(st.dim(`${report.tool.name} ${report.tool.version}${report.generated_at ? `, generated ${v(report.generated_at)}` : ''}`));
  out.push(`Caution: ${report.caution}`);
  out.push('');
  summary(view, st, out);
  if (view.check) mappingList(view, st, limit, out);
  else changeList(view, st, limit, out);
  provenance(view, st, out);
  return out.join('\n') + '\n';
}

function ref(st: Style, r: ConceptRef): string {
  return r.label ? `${st.id(v(r.id))} ${v(r.label)}` : st.id(v(r.id));
}

function refs(st: Style, list: ConceptRef[]): string {
  return list.length ? list.map((r) => ref(st, r)).join(', ') : st.dim('(none)');
}

function subject(view: ReportView, st: Style, c: Change): string {
  const { from, to, only } = changeSubject(view, c);
  return only ? refs(st, only) : `${refs(st, from)} → ${refs(st, to)}`;
}

function summary(view: ReportView, st: Style, out: string[]): void {
  out.push(st.head('Summary'));
  const check = view.check;
  if (check) {
    const settled = view.settled.length ? ` (${formatCount(view.settled.length)} more settled by earlier review decisions)` : '';
    out.push(`  ${formatCount(check.mappings.length)} mappings, ${formatCount(view.needingAction)} needing action${settled}; ${formatCount(view.report.changes.length)} changes, ${formatCount(view.unmappedChanges.length)} of them touching no mapping.`);
    out.push('');
    out.push(`  ${pad('Verdict', 18)}${padLeft('Mappings', 9)}`);
    for (const c of view.verdictCounts) out.push(`  ${st.verdict(c.verdict, pad(c.title, 18))}${padLeft(formatCount(c.count), 9)}`);
  } else {
    out.push(`  ${formatCount(view.report.changes.length)} changes; ${formatCount(view.report.parameters.unchanged_concepts)} concepts unchanged.`);
  }
  out.push('');
  out.push(`  ${pad('Change kind', 24)}${padLeft('Changes', 8)}`);
  const shown = view.kindCounts.filter((k) => k.count > 0);
  for (const k of shown) out.push(`  ${pad(k.title, 24)}${padLeft(formatCount(k.count), 8)}`);
  if (!shown.length) out.push(st.dim('  (no change found)'));
  out.push('');
}

function mappingList(view: ReportView, st: Style, limit: number, out: string[]): void {
  const total = view.check!.mappings.length;
  const which = view.filtered ? `verdicts ${view.verdicts.join(', ')}` : 'every verdict but ok';
  out.push(st.head(`Mappings needing action, by impact`) + st.dim(` (${formatCount(view.actions.length)} of ${formatCount(total)}; ${which})`));
  if (!view.actions.length) out.push(st.dim('  (none)'));
  const shown = view.actions.slice(0, Math.min(limit, view.actions.length));
  const width = String(shown.length).length;
  shown.forEach((m, i) => mappingBlock(view, st, m, padLeft(String(i + 1), width), out));
  if (shown.length < view.actions.length) out.push(st.dim(`  … ${formatCount(view.actions.length - shown.length)} more not shown (limit ${limit})`));
  if (view.settled.length) out.push(st.dim(`  ${formatCount(view.settled.length)} mapping${view.settled.length === 1 ? '' : 's'} settled by earlier review decisions (accepted, kept or remapped, target unchanged since) not listed`));
  out.push('');

  out.push(st.head('Changes that touch no mapping') + st.dim(` (${formatCount(view.unmappedChanges.length)})`));
  if (!view.unmappedChanges.length) out.push(st.dim('  (none)'));
  const few = view.unmappedChanges.slice(0, Math.min(limit, view.unmappedChanges.length));
  for (const c of few) {
    out.push(`  ${pad(kindTitle(c), 24)}${subject(view, st, c)}`);
  }
  if (few.length < view.unmappedChanges.length) out.push(st.dim(`  … ${formatCount(view.unmappedChanges.length - few.length)} more not shown (limit ${limit})`));
  out.push('');
}

function kindTitle(c: Change): string {
  return CHANGE_KIND_INFO[c.kind].title;
}

function mappingBlock(view: ReportView, st: Style, m: MappingResult, n: string, out: string[]): void {
  const indent = ' '.repeat(n.length + 4);
  out.push(`  ${n}  ${st.head(v(m.local_code))}  ${v(m.local_label)}   ${st.verdict(m.verdict, VERDICT_INFO[m.verdict].title)}  ${st.dim('impact')} ${formatCount(m.impact)}  ${st.dim('usage')} ${formatCount(m.usage)}`);
  const label = targetLabel(view, m);
  out.push(`${indent}${st.dim(pad('mapped to', 11))}${st.id(v(m.target_id))}${label ? ` ${v(label)}` : ''} ${st.dim(`(${v(m.relation)}; score old ${formatScore(m.score_old)}, new ${formatScore(m.score_new)})`)}`);
  const cause = mainCause(m, view.changeById);
  if (cause) {
    const others = m.change_ids.filter((id) => id !== cause.id);
    out.push(`${indent}${st.dim(pad('cause', 11))}${kindTitle(cause)}: ${subject(view, st, cause)}${others.length ? st.dim(` (also ${others.map(v).join(', ')})`) : ''}`);
  } else if (m.change_ids.length) {
    out.push(`${indent}${st.dim(pad('cause', 11))}${m.change_ids.map(v).join(', ')}`);
  }
  if (m.suggestions.length) {
    const top = m.suggestions.slice(0, 3).map((s) => `${st.id(v(s.concept_id))} ${v(suggestionLabel(view, s))} ${formatScore(s.score)} ${st.dim(`(${s.reason.replace(/_/g, ' ')})`)}`);
    out.push(`${indent}${st.dim(pad('candidates', 11))}${top.join(st.dim('  ·  '))}`);
  } else {
    out.push(`${indent}${st.dim(pad('candidates', 11))}${st.dim('none found')}`);
  }
  for (const r of m.reasons) out.push(`${indent}${st.dim(pad('why', 11))}${v(r)}`);
}

function changeList(view: ReportView, st: Style, limit: number, out: string[]): void {
  for (const sev of view.severities) {
    out.push(st.head(`${sev.title}`) + st.dim(` (${formatCount(sev.count)})`));
    for (const k of sev.kinds) {
      out.push(`  ${st.head(k.info.title)} ${st.dim(`(${formatCount(k.changes.length)}) ${k.info.meaning}`)}`);
      const shown = k.changes.slice(0, Math.min(limit, k.changes.length));
      for (const c of shown) changeBlock(view, st, c, out);
      if (shown.length < k.changes.length) out.push(st.dim(`    … ${formatCount(k.changes.length - shown.length)} more not shown (limit ${limit})`));
    }
    out.push('');
  }
  if (!view.severities.length) out.push(st.dim('No change between the releases.'), '');
}

function side(id: string | null): string {
  return id === null ? '(none)' : v(id);
}

function termLine(st: Style, t: TermMove): string {
  const text = t.new_term !== undefined && t.new_term !== t.term ? `${v(t.term)} → ${v(t.new_term)}` : v(t.term);
  const mark = t.from === null ? st.added('+') : t.to === null ? st.removed('-') : ' ';
  return `      ${mark} ${text}  ${st.dim(`${side(t.from)} → ${side(t.to)}${t.match ? `, ${t.match}` : ''}`)}`;
}

function changeBlock(view: ReportView, st: Style, c: Change, out: string[]): void {
  out.push(`    ${subject(view, st, c)}  ${st.dim(`confidence ${formatScore(c.confidence)}`)}`);
  for (const f of evidenceFacts(c)) out.push(st.dim(`      ${v(f)}`));
  for (const t of c.terms) out.push(termLine(st, t));
}

function provenance(view: ReportView, st: Style, out: string[]): void {
  const r = view.report;
  out.push(st.head('Inputs'));
  out.push(`  ${pad('role', 14)}${padLeft('read', 9)}${padLeft('used', 9)}${padLeft('rejected', 9)}  sha256 and path`);
  for (const i of view.inputs) {
    out.push(`  ${pad(i.title, 14)}${padLeft(formatCount(i.read), 9)}${padLeft(formatCount(i.used), 9)}${padLeft(formatCount(i.rejected), 9)}  ${i.sha256}  ${v(i.path)}`);
  }
  for (const i of r.inputs) if (i.accounting.blankLines) out.push(st.dim(`  ${v(formatAccounting(i.accounting))}`));
  out.push(`  releases: old ${v(r.releases.old.label)} (${formatCount(r.releases.old.concepts)} concepts, ${formatCount(r.releases.old.terms)} terms), new ${v(r.releases.new.label)} (${formatCount(r.releases.new.concepts)} concepts, ${formatCount(r.releases.new.terms)} terms)`);
  out.push('');
  out.push(st.head('Parameters'));
  for (const p of view.parameters) out.push(`  ${pad(p.name, 30)} ${v(p.value)}`);
  out.push('');
  out.push(st.head('Rejected rows') + st.dim(` (${formatCount(r.rejected_rows.length)})`));
  if (!r.rejected_rows.length) out.push(st.dim('  (none)'));
  for (const d of r.rejected_rows) out.push(indentLines(v2(formatDiagnostic(d))));
  if (r.warnings.length) {
    out.push('');
    out.push(st.head('Warnings') + st.dim(` (${formatCount(r.warnings.length)})`));
    for (const d of r.warnings) out.push(indentLines(v2(formatDiagnostic(d))));
  }
}

/** `visible` for each line of a multi-line message of our own. */
function v2(s: string): string {
  return s.split('\n').map(v).join('\n');
}

function indentLines(s: string): string {
  return s.split('\n').map((l) => `  ${l}`).join('\n');
}
