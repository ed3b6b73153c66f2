/**
 * The HTML form: one self-contained page, readable offline and printable. No external script,
 * style, font or image; a Content-Security-Policy meta tag forbids every load (default-src
 * 'none') and admits only the one inline style and the one inline script, by their SHA-256.
 *
 * Contents: the caution and provenance; a summary with charts drawn here as inline SVG (counts
 * by verdict, impact distribution, or changes by kind for a diff); the mappings needing action
 * under the change that caused them, each row a <details> that opens on its evidence, with a
 * filter box and verdict toggles (small inline script; without it every row simply shows); for
 * each split, merge and reorganization an SVG of the terms flowing from old concepts to new ones;
 * with a state folder, the recorded history (needing action per run, the scores of the mappings
 * that keep falling); then inputs, row accounting, parameters, rejected rows and warnings.
 *
 * Every string from the input goes through `esc` (& < > " ' and control characters), in text
 * and in attributes alike; attributes are always double-quoted.
 */
import { createHash } from 'node:crypto';
import { CHANGE_KIND_INFO } from '../classify/kinds.js';
import type { Change, FlowCell } from '../classify/types.js';
import type { MappingResult, Verdict } from '../rescore/types.js';
import type { CheckReport, Report } from '../report/types.js';
import type { ReportHistory } from '../state/history.js';
import {
  buildView,
  changeSubject,
  evidenceFacts,
  flowsOf,
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

/** HTML-escape a string from the input (text or double-quoted attribute). */
export function esc(s: string): string {
  return visible(s).replace(/[&<>"']/g, (ch) => ESCAPES[ch]);
}
const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** The palette: muted, distinct in lightness as well as hue, every colour paired with a word. */
export const VERDICT_COLOUR: Record<Verdict, string> = {
  broken: '#b4463a',
  drifted: '#c47f2c',
  ambiguous: '#8a6cb4',
  redirect: '#3d7ea6',
  context_changed: '#5f8f6b',
  ok: '#a9b0b5',
  unknown_target: '#6f6359',
};

const STYLE = `
:root{--ink:#22272b;--muted:#5d6870;--rule:#dedfd9;--soft:#f3f3ef;--page:#fcfcfa;--accent:#2e5a78;--add:#2f6f45;--del:#a2412f}
*{box-sizing:border-box}
[hidden]{display:none!important}
html{background:var(--page);color:var(--ink);font:13px/1.4 system-ui,-apple-system,"Segoe UI",Roboto,"Noto Sans",sans-serif}
body{margin:0 auto;max-width:1400px;padding:16px 20px 40px}
h1{font-size:1.538rem;font-weight:600;margin:0 0 4px}
h2{font-size:1.231rem;font-weight:600;margin:28px 0 8px;padding-bottom:3px;border-bottom:1px solid var(--rule)}
h3{font-size:1.038rem;font-weight:600;margin:16px 0 4px}
h4{font-size:1rem;font-weight:600;margin:12px 0 4px;color:var(--muted)}
p{margin:4px 0}
.meta,.small{color:var(--muted);font-size:0.923rem}
.mono,code{font-family:ui-monospace,"SF Mono",Menlo,Consolas,"Liberation Mono",monospace;font-size:0.923rem}
.caution{border-left:3px solid var(--accent);background:var(--soft);padding:6px 10px;margin:10px 0}
nav{font-size:0.923rem;margin:8px 0}
nav a{color:var(--accent);margin-right:14px;text-decoration:none}
nav a:hover{text-decoration:underline}
a{color:var(--accent)}
.charts{display:flex;flex-wrap:wrap;gap:18px 36px;align-items:flex-start}
figure{margin:0}
figcaption{font-weight:600;font-size:0.923rem;margin-bottom:4px}
svg text{font-family:system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;font-size:11px;fill:var(--ink)}
svg .muted{fill:var(--muted)}
table{border-collapse:collapse;font-size:0.923rem}
th,td{text-align:left;padding:2px 8px 2px 0;vertical-align:top;border-bottom:1px solid var(--rule)}
th{font-weight:600;color:var(--muted);border-bottom-color:#c9cbc3}
td.n,th.n{text-align:right;font-variant-numeric:tabular-nums}
.tools{display:flex;flex-wrap:wrap;gap:6px 14px;align-items:center;margin:6px 0 8px;padding:6px 8px;background:var(--soft)}
.tools input[type=search]{font:inherit;padding:2px 6px;width:22em;border:1px solid #c9cbc3;background:#fff}
.tools label{white-space:nowrap;cursor:pointer}
.sw{display:inline-block;width:9px;height:9px;border-radius:2px;margin-right:5px;vertical-align:0}
.grid{display:grid;grid-template-columns:7.5em minmax(9em,1.1fr) minmax(11em,1.4fr) 9.5em 5.5em 5em minmax(11em,1.4fr);column-gap:10px;align-items:baseline}
.grid>span{overflow:hidden;text-overflow:ellipsis;white-space:nowrap}
.grid .n{text-align:right;font-variant-numeric:tabular-nums}
.rows-head{font-size:0.885rem;font-weight:600;color:var(--muted);padding:2px 0 2px 14px;border-bottom:1px solid #c9cbc3}
.group{margin:0 0 10px}
.group h3{margin:12px 0 2px;font-weight:400;font-size:1rem}
.group h3 .k{font-weight:600}
.group h3 .num{color:var(--muted);margin-right:4px}
details>summary{cursor:pointer;list-style:none}
details>summary::-webkit-details-marker{display:none}
details>summary::before{content:"\\25B8";display:inline-block;width:12px;color:var(--muted);font-size:0.769rem}
details[open]>summary::before{content:"\\25BE"}
details.m>summary{display:grid;padding:2px 0}
details.m>summary::before{position:absolute}
details.m{border-bottom:1px solid var(--rule);position:relative}
details.m>summary{padding-left:14px}
details.m>summary::before{left:0;top:3px}
details.m:hover{background:#f6f6f1}
details.m[open]{background:var(--soft)}
.ev{padding:4px 10px 8px 14px;display:grid;grid-template-columns:minmax(16em,1fr) minmax(16em,1fr);gap:4px 24px}
.ev dl{margin:0;display:grid;grid-template-columns:max-content 1fr;gap:1px 10px}
.ev dt{color:var(--muted)}
.ev dd{margin:0}
.ev ul{margin:0;padding-left:16px}
.cause{margin:0 0 4px}
.cause>summary{color:var(--muted);font-size:0.923rem}
.change{border-bottom:1px solid var(--rule);padding:3px 0}
.change>summary .k{color:var(--muted)}
.change .body{padding:4px 0 6px 14px}
.facts{margin:2px 0;padding-left:16px;color:var(--muted)}
.facts.many{columns:2 30em;column-gap:28px}
.tds{display:flex;flex-wrap:wrap;gap:6px 28px;margin:4px 0}
.td ul{list-style:none;margin:0;padding:0}
.td li::before{display:inline-block;width:1.1em;color:var(--muted)}
.td li.kept::before{content:"\\00B7"}
.td li.added{color:var(--add)}
.td li.added::before{content:"+"}
.td li.removed{color:var(--del)}
.td li.removed::before{content:"\\2212"}
.td .head{font-weight:600}
.td .to{color:var(--muted);font-size:0.885rem}
del{color:var(--del);text-decoration:line-through}
ins{color:var(--add);text-decoration:none;font-weight:600}
.tag{display:inline-block;font-size:0.846rem;color:var(--muted);border:1px solid var(--rule);border-radius:3px;padding:0 4px;margin-left:6px}
.cols{columns:3 22em;column-gap:28px}
.cols table{width:100%}
.flow{max-width:100%;height:auto;display:block;margin:4px 0}
footer{margin-top:30px;color:var(--muted);font-size:0.885rem}
@media print{
html{font-size:10.5px;background:#fff}
body{max-width:none;padding:0}
nav,.tools{display:none!important}
details>summary::before{content:""!important;width:0}
details.m,.change,tr{break-inside:avoid}
h2{break-after:avoid}
*{print-color-adjust:exact;-webkit-print-color-adjust:exact}
}
`;

const SCRIPT = `
(function(){
var d=document,q=d.getElementById('q'),shown=d.getElementById('shown');
d.querySelectorAll('[data-js]').forEach(function(e){e.hidden=false;});
var rows=[].slice.call(d.querySelectorAll('details.m')),boxes=[].slice.call(d.querySelectorAll('input[data-v]')),groups=[].slice.call(d.querySelectorAll('.group'));
var text=rows.map(function(r){return r.textContent.toLowerCase();});
function apply(){
var t=q?q.value.trim().toLowerCase():'',on={},n=0;
boxes.forEach(function(b){on[b.getAttribute('data-v')]=b.checked;});
rows.forEach(function(r,i){var v=on[r.getAttribute('data-v')]!==false&&(!t||text[i].indexOf(t)>=0);r.hidden=!v;if(v)n++;});
groups.forEach(function(g){g.hidden=!g.querySelector('details.m:not([hidden])');});
if(shown)shown.textContent=n+' of '+rows.length+' shown';
}
if(q)q.addEventListener('input',apply);
boxes.forEach(function(b){b.addEventListener('change',apply);});
var opened=[];
window.addEventListener('beforeprint',function(){d.querySelectorAll('details:not([open])').forEach(function(e){e.open=true;opened.push(e);});});
window.addEventListener('afterprint',function(){opened.forEach(function(e){e.open=false;});opened=[];});
apply();
})();
`;

const hash = (s: string) => `'sha256-${createHash('sha256').update(s, 'utf8').digest('base64')}'`;
/** The policy: nothing may load; only our inline style and script run. */
export const CONTENT_SECURITY_POLICY = `default-src 'none'; style-src ${hash(STYLE)}; script-src ${hash(SCRIPT)}; base-uri 'none'; form-action 'none'`;

function ref(r: ConceptRef): string {
  return `<span class="mono">${esc(r.id)}</span>${r.label ? ` ${esc(r.label)}` : ''}`;
}

function refs(list: ConceptRef[]): string {
  return list.length ? list.map(ref).join(', ') : '<span class="small">none</span>';
}

function subject(view: ReportView, c: Change): string {
  const { from, to, only } = changeSubject(view, c);
  return only ? refs(only) : `${refs(from)} → ${refs(to)}`;
}

function swatch(v: Verdict): string {
  return `<svg class="sw" width="9" height="9" aria-hidden="true"><rect width="9" height="9" rx="2" fill="${VERDICT_COLOUR[v]}"/></svg>`;
}

function cut(s: string, n: number): string {
  return s.length > n ? s.slice(0, n - 1) + '…' : s;
}

// ---------------------------------------------------------------------------
// Charts

function barChart(rows: { label: string; value: number; colour: string }[], title: string): string {
  const rowH = 18;
  const labelW = 150;
  const barW = 240;
  const w = labelW + barW + 60;
  const h = rows.length * rowH + 4;
  const max = Math.max(1, ...rows.map((r) => r.value));
  const parts = rows.map((r, i) => {
    const y = i * rowH + 2;
    const len = r.value === 0 ? 0 : Math.max(2, Math.round((r.value / max) * barW));
    return `<text x="${labelW - 8}" y="${y + 12}" text-anchor="end">${esc(r.label)}</text><rect x="${labelW}" y="${y + 3}" width="${len}" height="${rowH - 6}" fill="${r.colour}"/><text x="${labelW + len + 5}" y="${y + 12}" class="muted">${formatCount(r.value)}</text>`;
  });
  return `<svg width="${w}" height="${h}" viewBox="0 0 ${w} ${h}" role="img" aria-label="${esc(title)}">${parts.join('')}</svg>`;
}

function histogram(view: ReportView): string {
  const buckets = view.impact;
  const colW = 64;
  const plotH = 90;
  const w = Math.max(1, buckets.length) * colW + 10;
  const h = plotH + 36;
  const max = Math.max(1, ...buckets.map((b) => b.count));
  const parts = buckets.map((b, i) => {
    const x = 5 + i * colW;
    const len = b.count === 0 ? 0 : Math.max(2, Math.round((b.count / max) * plotH));
    const y = plotH + 14 - len;
    return `<rect x="${x + 10}" y="${y}" width="${colW - 20}" height="${len}" fill="#6f8797"/><text x="${x + colW / 2}" y="${y - 3}" text-anchor="middle" class="muted">${formatCount(b.count)}</text><text x="${x + colW / 2}" y="${plotH + 28}" text-anchor="middle">${esc(b.short)}<title>${esc(b.label)}</title></text>`;
  });
  return `<svg width="${w}" height="${h}" viewBox="0 0 ${w} ${h}" role="img" aria-label="Impact of mappings needing action"><line x1="5" x2="${w - 5}" y1="${plotH + 14.5}" y2="${plotH + 14.5}" stroke="#c9cbc3"/>${parts.join('')}</svg>`;
}

/**
 * Terms flowing from old concepts (left) to new ones (right): one box per concept, one band per
 * flow cell, its width by term count; a darker band carries the old preferred term.
 */
export function flowSvg(view: ReportView, c: Change, flows: FlowCell[]): string {
  if (!flows.length) return '<p class="small">No term flow to draw: the history table alone decided this change.</p>';
  const left: string[] = [];
  const right: string[] = [];
  for (const id of [...c.from, ...flows.map((f) => f.from)]) if (flows.some((f) => f.from === id) && !left.includes(id)) left.push(id);
  for (const id of [...c.to, ...flows.map((f) => f.to)]) if (flows.some((f) => f.to === id) && !right.includes(id)) right.push(id);
  const boxW = 200;
  const gap = 210;
  const portH = 22;
  const vGap = 10;
  const maxTerms = Math.max(1, ...flows.map((f) => f.terms));
  const layout = (ids: string[], side: 'from' | 'to', other: string[]) => {
    let y = 6;
    const pos = new Map<string, { y: number; h: number; ports: Map<FlowCell, number> }>();
    for (const id of ids) {
      const mine = flows.filter((f) => f[side] === id).sort((a, b) => other.indexOf(side === 'from' ? a.to : a.from) - other.indexOf(side === 'from' ? b.to : b.from));
      const h = Math.max(36, mine.length * portH + 8);
      const ports = new Map<FlowCell, number>();
      mine.forEach((f, i) => ports.set(f, y + (h - mine.length * portH) / 2 + i * portH + portH / 2));
      pos.set(id, { y, h, ports });
      y += h + vGap;
    }
    return { pos, height: y };
  };
  const L = layout(left, 'from', right);
  const R = layout(right, 'to', left);
  const h = Math.max(L.height, R.height) + 2;
  const xL = 1;
  const xR = xL + boxW + gap;
  const w = xR + boxW + 1;
  const bands = flows.map((f) => {
    const y1 = L.pos.get(f.from)!.ports.get(f)!;
    const y2 = R.pos.get(f.to)!.ports.get(f)!;
    const sw = (2 + (10 * f.terms) / maxTerms).toFixed(1);
    const x1 = xL + boxW;
    const mid = x1 + gap / 2;
    const tip = `${f.from} to ${f.to}: ${f.terms} term${f.terms === 1 ? '' : 's'} (${Math.round(f.share * 100)}% of ${f.from})${f.preferred ? ', with its preferred term' : ''}`;
    return `<path d="M${x1} ${y1} C${mid} ${y1} ${mid} ${y2} ${xR} ${y2}" fill="none" stroke="${f.preferred ? '#55788e' : '#a9bcc8'}" stroke-width="${sw}" stroke-opacity="0.85"><title>${esc(tip)}</title></path><text x="${x1 + 6}" y="${(y1 - Number(sw) / 2 - 3).toFixed(1)}" class="muted">${f.terms} term${f.terms === 1 ? '' : 's'} · ${Math.round(f.share * 100)}%</text>`;
  });
  const box = (id: string, x: number, p: { y: number; h: number }, side: 'old' | 'new') => {
    const label = (side === 'old' ? view.labels.old.get(id) ?? view.labels.new.get(id) : view.labels.new.get(id) ?? view.labels.old.get(id)) ?? '';
    const cy = p.y + p.h / 2;
    return `<g><title>${esc(`${id}${label ? ` ${label}` : ''} (${side} release)`)}</title><rect x="${x}" y="${p.y}" width="${boxW}" height="${p.h}" rx="3" fill="#ffffff" stroke="#b9bfc2"/><text x="${x + 8}" y="${cy - 2}" font-weight="600">${esc(cut(id, 30))}</text><text x="${x + 8}" y="${cy + 11}" class="muted">${esc(cut(label, 32))}</text></g>`;
  };
  const boxes = [...left.map((id) => box(id, xL, L.pos.get(id)!, 'old')), ...right.map((id) => box(id, xR, R.pos.get(id)!, 'new'))];
  return `<svg class="flow" width="${w}" height="${h}" viewBox="0 0 ${w} ${h}" role="img" aria-label="${esc(`How the terms moved in ${c.id}`)}">${bands.join('')}${boxes.join('')}</svg><p class="small">Left: old concepts; right: new concepts. Band width follows the number of terms; a darker band carries the old preferred term.</p>`;
}

function wordDiffHtml(before: string, after: string): string {
  return wordParts(before, after)
    .map((p) => (p.op === 'removed' ? `<del>${esc(p.text)}</del>` : p.op === 'added' ? `<ins>${esc(p.text)}</ins>` : esc(p.text)))
    .join('');
}

function termDiffHtml(view: ReportView, c: Change): string {
  const blocks = termDiffs(c).map((d) => {
    const label = view.labels.old.get(d.concept) ?? view.labels.new.get(d.concept) ?? '';
    const items = d.lines.map((l) => {
      const where = l.op === 'removed' ? (l.other ? ` <span class="to">to ${esc(l.other)}</span>` : ' <span class="to">gone</span>') : l.op === 'added' ? (l.other ? ` <span class="to">from ${esc(l.other)}</span>` : ' <span class="to">new</span>') : '';
      return `<li class="${l.op}">${esc(l.term)}${where}</li>`;
    });
    return `<div class="td"><div class="head"><span class="mono">${esc(d.concept)}</span> ${esc(label)} <span class="to">${d.before.length} before, ${d.after.length} after</span></div><ul>${items.join('')}</ul></div>`;
  });
  return blocks.length ? `<div class="tds">${blocks.join('')}</div>` : '';
}

function changeBody(view: ReportView, c: Change): string {
  const parts: string[] = [];
  parts.push(`<p class="small">Change <span class="mono">${esc(c.id)}</span>. ${esc(CHANGE_KIND_INFO[c.kind].meaning)}</p>`);
  const pref = preferredChanges(c);
  for (const p of pref) parts.push(`<p>Preferred term of <span class="mono">${esc(p.concept)}</span>: ${wordDiffHtml(p.before, p.after)}</p>`);
  const facts = evidenceFacts(c);
  if (facts.length) parts.push(`<ul class="facts${facts.length > 4 ? ' many' : ''}">${facts.map((f) => `<li>${esc(f)}</li>`).join('')}</ul>`);
  const flows = flowsOf(c);
  if (flows) parts.push(flowSvg(view, c, flows));
  parts.push(termDiffHtml(view, c));
  return parts.join('');
}

// ---------------------------------------------------------------------------
// Mappings

function candidate(view: ReportView, s: MappingResult['suggestions'][number]): string {
  const label = suggestionLabel(view, s);
  return `<span class="mono">${esc(s.concept_id)}</span>${label ? ` ${esc(label)}` : ''} <span class="small">${formatScore(s.score)}</span>`;
}

function mappingRow(view: ReportView, m: MappingResult): string {
  const label = targetLabel(view, m);
  const best = m.suggestions[0];
  const plainBest = best ? `${best.concept_id} ${suggestionLabel(view, best)} ${formatScore(best.score)}` : 'none';
  const cells = [
    `<span class="mono" title="${esc(m.local_code)}">${esc(m.local_code)}</span>`,
    `<span title="${esc(m.local_label)}">${esc(m.local_label)}</span>`,
    `<span title="${esc(`${m.target_id} ${label}`)}"><span class="mono">${esc(m.target_id)}</span> ${esc(label)}</span>`,
    `<span>${swatch(m.verdict)}${esc(VERDICT_INFO[m.verdict].title)}</span>`,
    `<span class="n">${formatCount(m.impact)}</span>`,
    `<span class="n">${formatCount(m.usage)}</span>`,
    `<span title="${esc(plainBest)}">${best ? candidate(view, best) : '<span class="small">none</span>'}</span>`,
  ];
  const cands = m.suggestions.length
    ? `<table><tr><th>Concept</th><th>Label</th><th class="n">Score</th><th>From</th></tr>${m.suggestions.map((s) => `<tr><td class="mono">${esc(s.concept_id)}</td><td>${esc(suggestionLabel(view, s))}</td><td class="n">${formatScore(s.score)}</td><td>${esc(s.reason.replace(/_/g, ' '))}</td></tr>`).join('')}</table>`
    : '<p class="small">No candidate found.</p>';
  const changes = m.change_ids.map((id) => {
    const c = view.changeById.get(id);
    return c ? `<li><a href="#c-${view.changeIndex.get(id)}">${esc(CHANGE_KIND_INFO[c.kind].title)}</a> <span class="mono small">${esc(id)}</span></li>` : `<li class="mono">${esc(id)}</li>`;
  });
  const ev = `<div class="ev"><div><dl>
<dt>Mapped to</dt><dd><span class="mono">${esc(m.target_id)}</span> ${esc(label)} (${esc(m.relation)})</dd>
<dt>Verdict</dt><dd>${swatch(m.verdict)}${esc(VERDICT_INFO[m.verdict].title)}: ${esc(VERDICT_INFO[m.verdict].meaning)}</dd>
<dt>Score</dt><dd>old release ${formatScore(m.score_old)}, new release ${formatScore(m.score_new)}</dd>
<dt>Usage</dt><dd>${formatCount(m.usage)}; impact ${formatCount(m.impact)}</dd>
<dt>Owner</dt><dd>${esc(m.owner) || '<span class="small">none</span>'}</dd>
<dt>Source</dt><dd>line ${m.line} of the mappings</dd>
</dl>${m.reasons.length ? `<h4>Why</h4><ul>${m.reasons.map((r) => `<li>${esc(r)}</li>`).join('')}</ul>` : ''}${changes.length ? `<h4>Changes</h4><ul>${changes.join('')}</ul>` : ''}</div><div><h4>Candidates</h4>${cands}</div></div>`;
  return `<details class="m" data-v="${esc(m.verdict)}"><summary class="grid">${cells.join('')}</summary>${ev}</details>`;
}

function actionSection(view: ReportView): string {
  const out: string[] = [];
  out.push(`<section id="actions"><h2>Mappings needing action <span class="tag">${formatCount(view.actions.length)}</span></h2>`);
  const which = view.filtered ? `Only the verdicts ${view.verdicts.map((v) => VERDICT_INFO[v].title).join(', ')} are listed.` : 'Every verdict but “No action” is listed.';
  out.push(`<p class="small">Under the change that caused them, the group with the largest total impact first, mappings that no change touches last; within a group by impact, then local code. ${esc(which)} Open a row for its evidence.</p>`);
  if (!view.actions.length) {
    out.push(`<p>None.</p>${settledTable(view)}</section>`);
    return out.join('');
  }
  const counts = new Map<Verdict, number>();
  for (const m of view.actions) counts.set(m.verdict, (counts.get(m.verdict) ?? 0) + 1);
  const toggles = view.verdicts
    .filter((v) => counts.get(v))
    .map((v) => `<label><input type="checkbox" checked data-v="${esc(v)}"> ${swatch(v)}${esc(VERDICT_INFO[v].title)} <span class="small">${formatCount(counts.get(v)!)}</span></label>`);
  out.push(`<div class="tools" data-js hidden><label>Filter <input type="search" id="q" placeholder="code, label, concept id, reason" aria-label="Filter the mappings"></label>${toggles.join('')}<span id="shown" class="small" aria-live="polite"></span></div>`);
  out.push('<div class="grid rows-head"><span>Local code</span><span>Local label</span><span>Mapped to</span><span>Verdict</span><span class="n">Impact</span><span class="n">Usage</span><span>Best candidate</span></div>');
  view.groups.forEach((g, i) => {
    const head = g.change
      ? `<span class="num">${i + 1}.</span><span class="k">${esc(CHANGE_KIND_INFO[g.change.kind].title)}:</span> ${subject(view, g.change)}`
      : `<span class="num">${i + 1}.</span><span class="k">Not caused by a change between the releases</span>`;
    const meta = `<span class="tag">${formatCount(g.mappings.length)} mapping${g.mappings.length === 1 ? '' : 's'}</span><span class="tag">total impact ${formatCount(g.impact)}</span>`;
    const cause = g.change ? `<details class="cause"><summary>The change <a href="#c-${view.changeIndex.get(g.change.id)}" class="mono">${esc(g.change.id)}</a></summary><div class="body">${changeBody(view, g.change)}</div></details>` : '';
    out.push(`<div class="group"><h3>${head}${meta}</h3>${cause}${g.mappings.map((m) => mappingRow(view, m)).join('')}</div>`);
  });
  out.push(settledTable(view));
  out.push('</section>');
  return out.join('');
}

// ---------------------------------------------------------------------------
// History (only for a check run with a state folder)

/** Scores of the declining mappings across the recorded releases: one line each, on 0..1. */
function trendChart(h: ReportHistory): string {
  const shown = h.declining.slice(0, 8);
  const labels = h.releases.map((r) => r.label);
  const left = 34;
  const right = 120;
  const stepX = Math.max(70, Math.min(140, Math.floor(420 / Math.max(1, labels.length - 1))));
  const plotW = Math.max(1, labels.length - 1) * stepX;
  const plotH = 120;
  const top = 8;
  const w = left + plotW + right;
  const x = (i: number) => left + i * stepX;
  const y = (v: number) => top + Math.round((1 - v) * plotH);
  const grid = [0, 0.5, 1].map((v) => `<line x1="${left}" x2="${left + plotW}" y1="${y(v) + 0.5}" y2="${y(v) + 0.5}" stroke="#dedfd9"/><text x="${left - 6}" y="${y(v) + 4}" text-anchor="end" class="muted">${v.toFixed(1)}</text>`);
  const axis = labels.map((l, i) => `<text x="${x(i)}" y="${top + plotH + 18}" text-anchor="middle">${esc(cut(l, 18))}</text>`);
  const palette = ['#b4463a', '#3d7ea6', '#c47f2c', '#5f8f6b', '#8a6cb4', '#6f6359', '#2e5a78', '#a2412f'];
  // End labels, moved apart so that no two overlap (12 px at least), in the order of their lines.
  const ends = shown.map((t, k) => {
    const last = t.scores.reduce<number>((a, v, i) => (v === null ? a : i), -1);
    return { k, last, y: last >= 0 ? y(t.scores[last]!) + 4 : 0 };
  });
  const placed = [...ends].filter((e) => e.last >= 0).sort((a, b) => a.y - b.y || a.k - b.k);
  for (let i = 1; i < placed.length; i++) if (placed[i].y - placed[i - 1].y < 12) placed[i].y = placed[i - 1].y + 12;
  const hgtNeeded = Math.max(top + plotH + 30, ...placed.map((e) => e.y + 6));
  const lines = shown.map((t, k) => {
    const pts = t.scores.map((v, i) => (v === null ? null : `${x(i)},${y(v)}`)).filter((p): p is string => p !== null);
    const { last, y: labelY } = ends[k];
    const colour = palette[k % palette.length];
    const dots = t.scores.map((v, i) => (v === null ? '' : `<circle cx="${x(i)}" cy="${y(v)}" r="2.5" fill="${colour}"/>`)).join('');
    const end = last >= 0 ? `<text x="${x(last) + 6}" y="${labelY}" fill="${colour}">${esc(cut(t.local_code, 16))}</text>` : '';
    return `<g><title>${esc(`${t.local_code} ${t.local_label} → ${t.target_id}: ${t.scores.map((v) => (v === null ? 'none' : v.toFixed(2))).join(', ')}`)}</title><polyline points="${pts.join(' ')}" fill="none" stroke="${colour}" stroke-width="1.5"/>${dots}${end}</g>`;
  });
  return `<svg width="${w}" height="${hgtNeeded}" viewBox="0 0 ${w} ${hgtNeeded}" role="img" aria-label="Scores of the mappings whose score keeps falling, release by release">${grid.join('')}${axis.join('')}${lines.join('')}</svg>`;
}

function historySection(report: CheckReport): string {
  const h = report.history!;
  const out: string[] = ['<section id="history"><h2>Recorded history</h2>'];
  out.push(`<p class="small">${formatCount(h.runs.length)} run${h.runs.length === 1 ? '' : 's'} recorded in the state folder, over the releases ${esc(h.releases.map((r) => r.label).join(', '))}. A score is the probability that the local label names the target.</p>`);
  out.push('<div class="charts">');
  out.push(`<figure><figcaption>Mappings needing action per run</figcaption>${barChart(h.runs.map((r) => ({ label: cut(`${r.old} → ${r.new}`, 24), value: r.needing_action, colour: '#6f8797' })), 'Mappings needing action per recorded run')}<p class="small">Settled by earlier decisions: ${h.runs.map((r) => formatCount(r.settled)).join(', ')}.</p></figure>`);
  if (h.declining.length) out.push(`<figure><figcaption>Scores falling release after release</figcaption>${trendChart(h)}${h.declining.length > 8 ? `<p class="small">The first 8 of ${formatCount(h.declining.length)} are drawn.</p>` : ''}</figure>`);
  out.push('</div>');
  const p = h.parameters;
  out.push(`<h3>Falling release after release <span class="tag">${formatCount(h.declining.length)}</span></h3><p class="small">${p.min_drops} or more drops in a row, each at least ${p.min_step}, ${p.min_total_drop} or more in all, up to the latest release.</p>`);
  if (!h.declining.length) out.push('<p>None.</p>');
  else {
    const rows = h.declining.map((t) => {
      const d = t.decline!;
      return `<tr><td class="mono">${esc(t.local_code)}</td><td>${esc(t.local_label)}</td><td class="mono">${esc(t.target_id)}</td><td class="mono">${esc(t.scores.map((v) => (v === null ? '·' : v.toFixed(2))).join(' → '))}</td><td>${esc(d.from_release)} to ${esc(d.to_release)}</td><td class="n">${d.total_drop.toFixed(2)}</td><td class="n">${d.largest_step.toFixed(2)}</td><td>${d.step_crossed_threshold ? 'yes' : 'no'}</td></tr>`;
    });
    out.push(`<table><tr><th>Local code</th><th>Local label</th><th>Target</th><th>Scores</th><th>Falling</th><th class="n">Fell</th><th class="n">Largest step</th><th>A step crossed the drift threshold</th></tr>${rows.join('')}</table>`);
  }
  out.push('</section>');
  return out.join('');
}

function settledTable(view: ReportView): string {
  if (!view.settled.length) return '';
  const rows = view.settled.map((m) => `<tr><td class="mono">${esc(m.local_code)}</td><td>${esc(m.local_label)}</td><td class="mono">${esc(m.target_id)}</td><td>${swatch(m.verdict)}${esc(VERDICT_INFO[m.verdict].title)}</td><td>${esc(m.settled!.decision)}</td><td>${esc(m.settled!.reviewer)}</td><td>${esc(m.settled!.release)}</td><td>${esc(m.settled!.note)}</td></tr>`);
  return `<h3>Settled by earlier review decisions <span class="tag">${formatCount(view.settled.length)}</span></h3><p class="small">Accepted, kept or remapped by a reviewer, and the target has not changed since; not listed above and not counted by --fail-on.</p><table><tr><th>Local code</th><th>Local label</th><th>Target</th><th>Verdict</th><th>Decision</th><th>Reviewer</th><th>For release</th><th>Note</th></tr>${rows.join('')}</table>`;
}

// ---------------------------------------------------------------------------
// Page

function summarySection(view: ReportView): string {
  const out: string[] = ['<section id="summary"><h2>Summary</h2>'];
  const r = view.report;
  if (view.check) {
    const settled = view.settled.length ? ` (${formatCount(view.settled.length)} more settled by earlier review decisions)` : '';
    out.push(`<p>${formatCount(view.check.mappings.length)} mappings checked, ${formatCount(view.needingAction)} needing action${settled}; ${formatCount(r.changes.length)} changes between the releases, ${formatCount(view.unmappedChanges.length)} touching no mapping.</p>`);
  } else {
    out.push(`<p>${formatCount(r.changes.length)} changes between the releases; ${formatCount(r.parameters.unchanged_concepts)} concepts unchanged.</p>`);
  }
  out.push('<div class="charts">');
  if (view.check) {
    out.push(`<figure><figcaption>Mappings by verdict</figcaption>${barChart(view.verdictCounts.map((c) => ({ label: c.title, value: c.count, colour: VERDICT_COLOUR[c.verdict] })), 'Mappings by verdict')}</figure>`);
    out.push(`<figure><figcaption>Impact of the mappings needing action</figcaption>${histogram(view)}<p class="small">Impact is the verdict's weight × usage.</p></figure>`);
  }
  const kinds = view.kindCounts.filter((k) => k.count > 0);
  if (kinds.length) out.push(`<figure><figcaption>Changes by kind</figcaption>${barChart(kinds.map((k) => ({ label: k.title, value: k.count, colour: CHANGE_KIND_INFO[k.kind].structural ? '#6f8797' : '#b7c3cb' })), 'Changes by kind')}<p class="small">Darker: kinds that change what a code means.</p></figure>`);
  out.push('</div></section>');
  return out.join('');
}

function changeItem(view: ReportView, c: Change): string {
  const t = view.touches.get(c.id);
  const tag = view.check ? (t ? `<span class="tag">${formatCount(t.total)} mapping${t.total === 1 ? '' : 's'}${t.listed ? `, ${formatCount(t.listed)} needing action` : ''}</span>` : '<span class="tag">no mapping</span>') : '';
  const open = CHANGE_KIND_INFO[c.kind].structural ? ' open' : '';
  return `<details class="change" id="c-${view.changeIndex.get(c.id)}"${open}><summary>${subject(view, c)} <span class="k small">confidence ${formatScore(c.confidence)}</span>${tag}</summary><div class="body">${changeBody(view, c)}</div></details>`;
}

function changeSection(view: ReportView): string {
  const out: string[] = ['<section id="changes"><h2>Changes by severity and kind</h2>'];
  if (!view.severities.length) out.push('<p>No change between the releases.</p>');
  for (const sev of view.severities) {
    out.push(`<h3>${esc(sev.title)} <span class="tag">${formatCount(sev.count)}</span></h3><p class="small">${esc(sev.meaning)}</p>`);
    for (const k of sev.kinds) {
      out.push(`<h4>${esc(k.info.title)} <span class="tag">${formatCount(k.changes.length)}</span></h4>`);
      out.push(k.changes.map((c) => changeItem(view, c)).join(''));
    }
  }
  out.push('</section>');
  return out.join('');
}

function unmappedSection(view: ReportView): string {
  const items = view.unmappedChanges.map((c) => `<li><a href="#c-${view.changeIndex.get(c.id)}">${esc(CHANGE_KIND_INFO[c.kind].title)}</a>: ${subject(view, c)}</li>`);
  return `<section id="unmapped"><h2>Changes that touch no mapping <span class="tag">${formatCount(items.length)}</span></h2>${items.length ? `<ul class="cols">${items.join('')}</ul>` : '<p>None.</p>'}</section>`;
}

function diagnosticsTable(list: Report['rejected_rows']): string {
  if (!list.length) return '<p>None.</p>';
  const rows = list.map((d) => `<tr><td class="mono">${esc(`${d.file}:${d.line}:${d.column}`)}</td><td class="mono">${esc(d.code)}</td><td>${esc(d.message)}</td><td>${esc(d.fix)}</td></tr>`);
  return `<table><tr><th>Where</th><th>Problem</th><th>Message</th><th>Fix</th></tr>${rows.join('')}</table>`;
}

function provenanceSection(view: ReportView): string {
  const r = view.report;
  const inputs = view.inputs.map((i) => `<tr><td>${esc(i.title)}</td><td class="mono">${esc(i.path)}</td><td class="mono small">${esc(i.sha256)}</td><td class="n">${formatCount(i.read)}</td><td class="n">${formatCount(i.used)}</td><td class="n">${formatCount(i.rejected)}</td><td class="n">${formatCount(i.blankLines)}</td></tr>`);
  const params = view.parameters.map((p) => `<tr><td class="mono">${esc(p.name)}</td><td class="mono">${esc(p.value)}</td></tr>`);
  return [
    '<section id="inputs"><h2>Inputs and row accounting</h2>',
    `<table><tr><th>Role</th><th>File</th><th>SHA-256</th><th class="n">Rows read</th><th class="n">Used</th><th class="n">Rejected</th><th class="n">Blank lines</th></tr>${inputs.join('')}</table>`,
    `<p class="small">Old release ${esc(r.releases.old.label)}: ${formatCount(r.releases.old.concepts)} concepts, ${formatCount(r.releases.old.terms)} terms. New release ${esc(r.releases.new.label)}: ${formatCount(r.releases.new.concepts)} concepts, ${formatCount(r.releases.new.terms)} terms.</p>`,
    `<h3>Parameters</h3><div class="cols"><table><tr><th>Name</th><th>Value</th></tr>${params.join('')}</table></div>`,
    `<h3>Rejected rows <span class="tag">${formatCount(r.rejected_rows.length)}</span></h3>${diagnosticsTable(r.rejected_rows)}`,
    r.warnings.length ? `<h3>Warnings <span class="tag">${formatCount(r.warnings.length)}</span></h3>${diagnosticsTable(r.warnings)}` : '',
    '</section>',
  ].join('');
}

export function renderHtml(report: Report, options: RenderOptions = {}): string {
  const view = buildView(report, { verdicts: options.verdicts });
  const title = reportTitle(report);
  const old = report.releases.old;
  const neu = report.releases.new;
  const history = view.check?.history ? view.check : null;
  const nav = [['summary', 'Summary'], ...(view.check ? [['actions', 'Mappings needing action'], ['unmapped', 'Changes that touch no mapping']] : []), ...(history ? [['history', 'History']] : []), ['changes', 'Changes'], ['inputs', 'Inputs']]
    .map(([id, t]) => `<a href="#${id}">${t}</a>`)
    .join('');
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${CONTENT_SECURITY_POLICY}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<meta name="generator" content="${esc(`${report.tool.name} ${report.tool.version}`)}">`,
    `<title>${esc(title)}</title>`,
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    `<header><h1>${esc(title)}</h1>`,
    `<p class="meta">${esc(report.tool.name)} ${esc(report.tool.version)}${report.generated_at ? `, generated ${esc(report.generated_at)}` : ''}. Old release <strong>${esc(old.label)}</strong> <span class="mono">${esc(old.sha256)}</span>; new release <strong>${esc(neu.label)}</strong> <span class="mono">${esc(neu.sha256)}</span>.</p>`,
    `<p class="caution"><strong>Caution.</strong> ${esc(report.caution)}</p>`,
    `<nav>${nav}</nav></header>`,
    '<main>',
    summarySection(view),
    view.check ? actionSection(view) : '',
    view.check ? unmappedSection(view) + (history ? historySection(history) : '') : '',
    changeSection(view),
    provenanceSection(view),
    '</main>',
    `<footer>${esc(report.tool.name)} ${esc(report.tool.version)}. ${esc(report.caution)}</footer>`,
    `<script>${SCRIPT}</script>`,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
