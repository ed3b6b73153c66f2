/**
 * The Markdown form: a change log for the governance record. Summary tables, the mappings
 * needing action grouped under the change that caused them, the changes that touch no mapping,
 * then every change by severity and kind, each structural change with its term sets before and
 * after as a diff (diffArrays) and a changed preferred term as a word diff (diffWords).
 *
 * Every string from the input goes through `mdText` (or `codeLine` inside a fenced block): ASCII
 * punctuation that Markdown or GFM gives a meaning to is backslash-escaped (so no input makes a
 * link, an autolink, an image, emphasis, HTML or a table cell break) and control characters
 * are made visible, so a label cannot start a new line or a new block.
 */
import type { Change } from '../classify/types.js';
import type { MappingResult } from '../rescore/types.js';
import type { Report } from '../report/types.js';
import {
  buildView,
  changeSubject,
  evidenceFacts,
  formatCount,
  formatScore,
  mainCause,
  preferredChanges,
  reportTitle,
  suggestionLabel,
  targetLabel,
  termDiffs,
  visible,
  wordParts,
  VERDICT_INFO,
  type ConceptRef,
  type RenderOptions,
  type ReportView,
} from './model.js';
import { CHANGE_KIND_INFO } from '../classify/kinds.js';

/**
 * Escape a string from the input for inline Markdown (CommonMark + GFM): backslash before every
 * character that can open a construct — \ ` * _ [ ] ( ) < > # ! | ~ & : @ . $ { }, and - + = at the
 * start — and visible
 * escapes for control and bidi characters (line breaks included). ':' '@' '.' are escaped because
 * GFM turns `http://…`, `www.…` and `a@b.c` into links even without brackets.
 */
export function mdText(s: string): string {
  // A leading - + = could start a list item, thematic break or heading underline where the
  // string begins a line (list items, table cells): escape it too.
  return visible(s).replace(/[\\`*_[\]()<>#!|~&:@.${}]|^[-+=]/g, (ch) => `\\${ch}`);
}

/** A line inside a fenced code block: nothing is interpreted there but line breaks. */
function codeLine(s: string): string {
  return visible(s);
}

/** A fence longer than any run of backticks in the block, so the block cannot be closed early. */
function fence(lines: string[]): string {
  let longest = 0;
  for (const l of lines) for (const m of l.matchAll(/`+/g)) longest = Math.max(longest, m[0].length);
  return '`'.repeat(Math.max(3, longest + 1));
}

function cell(s: string): string {
  return mdText(s);
}

function table(head: string[], rows: string[][], align?: ('l' | 'r')[]): string[] {
  const sep = head.map((_, i) => (align?.[i] === 'r' ? '---:' : '---'));
  return [`| ${head.join(' | ')} |`, `| ${sep.join(' | ')} |`, ...rows.map((r) => `| ${r.map((c) => (c === '' ? ' ' : c)).join(' | ')} |`)];
}

function ref(r: ConceptRef): string {
  return r.label ? `${mdText(r.id)} ${mdText(r.label)}` : mdText(r.id);
}

function refs(list: ConceptRef[]): string {
  return list.length ? list.map(ref).join(', ') : 'none';
}

function subject(view: ReportView, c: Change): string {
  const { from, to, only } = changeSubject(view, c);
  return only ? refs(only) : `${refs(from)} → ${refs(to)}`;
}

/** Word diff: removed words struck through, added words in bold, spaces kept outside the marks. */
export function wordDiff(before: string, after: string): string {
  let out = '';
  for (const p of wordParts(before, after)) {
    const m = /^(\s*)([\s\S]*?)(\s*)$/.exec(p.text)!;
    const core = mdText(m[2]);
    const mark = core === '' ? core : p.op === 'removed' ? `~~${core}~~` : p.op === 'added' ? `**${core}**` : core;
    out += `${m[1]}${mark}${m[3]}`;
  }
  return out.replace(/\s+/g, ' ');
}

export function renderMarkdown(report: Report, options: RenderOptions = {}): string {
  const view = buildView(report, { verdicts: options.verdicts });
  const out: string[] = [];
  out.push(`# ${mdText(reportTitle(report))}`, '');
  out.push(`> **Caution.** ${mdText(report.caution)}`, '');
  out.push(`Made by ${mdText(report.tool.name)} ${mdText(report.tool.version)}${report.generated_at ? ` on ${mdText(report.generated_at)}` : ''}. Old release: ${mdText(report.releases.old.label)} (SHA-256 ${report.releases.old.sha256}). New release: ${mdText(report.releases.new.label)} (SHA-256 ${report.releases.new.sha256}).`, '');
  summary(view, out);
  if (view.check) {
    actionSection(view, out);
    unmappedSection(view, out);
  }
  changeLog(view, out);
  provenance(view, out);
  return out.join('\n').replace(/\n+$/, '') + '\n';
}

function summary(view: ReportView, out: string[]): void {
  out.push('## Summary', '');
  if (view.check) {
    out.push(`${formatCount(view.check.mappings.length)} mappings were checked against ${formatCount(view.report.changes.length)} changes between the releases.`, '');
    out.push(...table(['Verdict', 'Mappings', 'Meaning'], view.verdictCounts.map((c) => [c.title, formatCount(c.count), VERDICT_INFO[c.verdict].meaning]), ['l', 'r', 'l']), '');
    if (view.actions.length) {
      out.push('Impact of the mappings listed below (verdict weight × usage):', '');
      out.push(...table(['Impact', 'Mappings'], view.impact.map((b) => [b.label, formatCount(b.count)]), ['l', 'r']), '');
    }
  } else {
    out.push(`${formatCount(view.report.changes.length)} changes between the releases; ${formatCount(view.report.parameters.unchanged_concepts)} concepts unchanged.`, '');
  }
  const kinds = view.kindCounts.filter((k) => k.count > 0);
  if (kinds.length) out.push(...table(['Change kind', 'Changes', 'Meaning'], kinds.map((k) => [k.title, formatCount(k.count), CHANGE_KIND_INFO[k.kind].meaning]), ['l', 'r', 'l']), '');
}

function candidate(view: ReportView, s: MappingResult['suggestions'][number]): string {
  const label = suggestionLabel(view, s);
  return `${mdText(s.concept_id)}${label ? ` ${mdText(label)}` : ''} (${formatScore(s.score)}, ${s.reason.replace(/_/g, ' ')})`;
}

function actionSection(view: ReportView, out: string[]): void {
  out.push('## Mappings needing action', '');
  const which = view.filtered ? `Only the verdicts ${view.verdicts.map((v) => VERDICT_INFO[v].title).join(', ')} are listed.` : 'Every verdict but "No action" is listed.';
  const settled = view.settled.length ? ` ${formatCount(view.settled.length)} mapping${view.settled.length === 1 ? ' is' : 's are'} settled by earlier review decisions (accepted, kept or remapped, and the target unchanged since) and not listed.` : '';
  out.push(`${formatCount(view.actions.length)} mappings, under the change that caused them; the group with the largest total impact comes first, mappings that no change touches last, and within a group the mappings go by impact, then local code. ${which}${settled}`, '');
  if (!view.actions.length) {
    out.push('None.', '');
    return;
  }
  view.groups.forEach((g, i) => {
    const title = g.change ? `${CHANGE_KIND_INFO[g.change.kind].title}: ${subject(view, g.change)}` : 'Not caused by a change between the releases';
    out.push(`### ${i + 1}. ${title}`, '');
    out.push(`${g.change ? `Change ${mdText(g.change.id)}, confidence ${formatScore(g.change.confidence)}. ` : ''}${formatCount(g.mappings.length)} mapping${g.mappings.length === 1 ? '' : 's'}, total impact ${formatCount(g.impact)}.`, '');
    const rows = g.mappings.map((m) => {
      const label = targetLabel(view, m);
      const others = m.change_ids.filter((id) => id !== mainCause(m, view.changeById)?.id);
      return [
        cell(m.local_code),
        cell(m.local_label),
        `${cell(m.target_id)}${label ? ` ${cell(label)}` : ''}`,
        VERDICT_INFO[m.verdict].title,
        formatCount(m.impact),
        formatCount(m.usage),
        m.suggestions[0] ? candidate(view, m.suggestions[0]) : 'none',
        m.suggestions.slice(1).map((s) => candidate(view, s)).join('; '),
        [...m.reasons.map(cell), ...(others.length ? [`also ${others.map(cell).join(', ')}`] : [])].join('; '),
      ];
    });
    out.push(...table(['Local code', 'Local label', 'Mapped to', 'Verdict', 'Impact', 'Usage', 'Best candidate', 'Other candidates', 'Reasons'], rows, ['l', 'l', 'l', 'l', 'r', 'r', 'l', 'l', 'l']), '');
  });
}

function unmappedSection(view: ReportView, out: string[]): void {
  out.push('## Changes that touch no mapping', '');
  if (!view.unmappedChanges.length) out.push('None.', '');
  else {
    for (const c of view.unmappedChanges) out.push(`- ${CHANGE_KIND_INFO[c.kind].title}: ${subject(view, c)}`);
    out.push('');
  }
}

function changeLog(view: ReportView, out: string[]): void {
  out.push('## Change log', '');
  if (!view.severities.length) {
    out.push('No change between the releases.', '');
    return;
  }
  for (const sev of view.severities) {
    out.push(`### ${sev.title} (${formatCount(sev.count)})`, '', sev.meaning, '');
    for (const k of sev.kinds) {
      out.push(`#### ${k.info.title} (${formatCount(k.changes.length)})`, '', k.info.meaning, '');
      for (const c of k.changes) changeEntry(view, c, out);
    }
  }
}

function changeEntry(view: ReportView, c: Change, out: string[]): void {
  const t = view.touches.get(c.id);
  const touch = view.check ? ` Mappings touched: ${formatCount(t?.total ?? 0)}${t?.listed ? `, ${formatCount(t.listed)} needing action` : ''}.` : '';
  out.push(`**${subject(view, c)}**`, '');
  out.push(`Change ${mdText(c.id)}, confidence ${formatScore(c.confidence)}.${touch}`, '');
  const facts = evidenceFacts(c);
  for (const p of preferredChanges(c)) facts.unshift(`preferred term of ${p.concept}: ${p.before} → ${p.after}`);
  for (const f of facts) out.push(`- ${mdText(f)}`);
  for (const p of preferredChanges(c)) out.push(`- word changes: ${wordDiff(p.before, p.after)}`);
  if (facts.length) out.push('');
  if (!c.terms.length) return;
  if (CHANGE_KIND_INFO[c.kind].structural) {
    const lines: string[] = [];
    for (const d of termDiffs(c)) {
      const label = view.labels.old.get(d.concept) ?? view.labels.new.get(d.concept) ?? '';
      lines.push(codeLine(`@@ ${d.concept}${label ? ` ${label}` : ''}: ${d.before.length} term${d.before.length === 1 ? '' : 's'} before, ${d.after.length} after @@`));
      for (const l of d.lines) {
        const mark = l.op === 'added' ? '+' : l.op === 'removed' ? '-' : ' ';
        const where = l.op === 'removed' ? (l.other ? `   (to ${l.other})` : '   (gone)') : l.op === 'added' ? (l.other ? `   (from ${l.other})` : '   (new)') : '';
        lines.push(codeLine(`${mark} ${l.term}${where}`));
      }
    }
    const f = fence(lines);
    out.push('Terms before and after:', '', `${f}diff`, ...lines, f, '');
  } else {
    const added = c.terms.filter((t) => t.from === null).map((t) => mdText(t.new_term ?? t.term));
    const removed = c.terms.filter((t) => t.to === null).map((t) => mdText(t.term));
    const moved = c.terms.filter((t) => t.from !== null && t.to !== null).map((t) => `${mdText(t.term)}${t.new_term && t.new_term !== t.term ? ` (now ${mdText(t.new_term)})` : ''} from ${mdText(t.from!)} to ${mdText(t.to!)}`);
    const parts = [added.length ? `added ${added.join(', ')}` : '', removed.length ? `removed ${removed.join(', ')}` : '', moved.length ? `moved ${moved.join(', ')}` : ''].filter(Boolean);
    out.push(`Terms: ${parts.join('; ')}.`, '');
  }
}

function provenance(view: ReportView, out: string[]): void {
  const r = view.report;
  out.push('## Inputs', '');
  out.push(...table(['Role', 'File', 'SHA-256', 'Rows read', 'Used', 'Rejected', 'Blank lines'], view.inputs.map((i) => [i.title, cell(i.path), i.sha256, formatCount(i.read), formatCount(i.used), formatCount(i.rejected), formatCount(i.blankLines)]), ['l', 'l', 'l', 'r', 'r', 'r', 'r']), '');
  out.push(`Old release ${mdText(r.releases.old.label)}: ${formatCount(r.releases.old.concepts)} concepts, ${formatCount(r.releases.old.terms)} terms. New release ${mdText(r.releases.new.label)}: ${formatCount(r.releases.new.concepts)} concepts, ${formatCount(r.releases.new.terms)} terms.`, '');
  out.push('## Parameters', '');
  out.push(...table(['Name', 'Value'], view.parameters.map((p) => [mdText(p.name), mdText(p.value)])), '');
  out.push(`## Rejected rows (${formatCount(r.rejected_rows.length)})`, '');
  if (!r.rejected_rows.length) out.push('None.', '');
  else out.push(...table(['Where', 'Problem', 'Message', 'Fix'], r.rejected_rows.map((d) => [cell(`${d.file}:${d.line}:${d.column}`), cell(d.code), cell(d.message), cell(d.fix)])), '');
  if (r.warnings.length) {
    out.push(`## Warnings (${formatCount(r.warnings.length)})`, '');
    out.push(...table(['Where', 'Problem', 'Message', 'Fix'], r.warnings.map((d) => [cell(`${d.file}:${d.line}:${d.column}`), cell(d.code), cell(d.message), cell(d.fix)])), '');
  }
}
