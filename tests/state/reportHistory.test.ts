/**
 * A check run with a state folder, through the library (runCheck): the report's `history` and
 * `settled` fields validate against docs/report.schema.json (JSON Schema 2020-12, Ajv), the HTML
 * page draws the recorded history (read back with parse5), and settled mappings leave the lists.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import { parse } from 'parse5';
import { runCheck, type CheckOptions } from '../../src/pipeline.js';
import { renderHtml } from '../../src/render/html.js';
import { renderReport } from '../../src/render/index.js';
import { renderJson } from '../../src/render/json.js';
import { StateStore } from '../../src/state/stateStore.js';
import { tempDir } from '../helpers/files.js';

const schema = JSON.parse(readFileSync('docs/report.schema.json', 'utf8'));
const validate = new Ajv2020.default({ strict: true, allErrors: true }).compile(schema);

const pair = (a: string, b: string): Omit<CheckOptions, 'mappings'> => ({
  old: `demo-data/release-${a}.tsv`,
  new: `demo-data/release-${b}.tsv`,
  oldHierarchy: `demo-data/hierarchy-${a}.tsv`,
  newHierarchy: `demo-data/hierarchy-${b}.tsv`,
  history: `demo-data/history-${b}.tsv`,
  oldLabel: a,
  newLabel: b,
});

interface Node { nodeName: string; tagName?: string; value?: string; attrs?: { name: string; value: string }[]; childNodes?: Node[] }
const all = (n: Node, out: Node[] = []): Node[] => {
  if (n.tagName) out.push(n);
  for (const c of n.childNodes ?? []) all(c, out);
  return out;
};
const text = (n: Node): string => (n.nodeName === '#text' ? n.value ?? '' : (n.childNodes ?? []).map(text).join(''));

describe('a check with a state folder', async () => {
  const state = join(tempDir(), 'state');
  await runCheck({ ...pair('r1', 'r2'), mappings: 'demo-data/mappings.tsv', state });
  // A decision recorded as apply would: keep DXP-2115 on its target for r2.
  const r2 = (await runCheck({ ...pair('r1', 'r2'), mappings: 'demo-data/mappings.tsv', state })).report;
  StateStore.open(state).recordDecisions([{ local_code: 'DXP-2115', old_target: 'QV12183E', new_target: 'QV12183E', decision: 'keep', reviewer: 'R <b>', note: 'reviewed', release: 'r2', release_sha256: r2.releases.new.sha256, time: '', worklist_sha256: '' }]);
  const { report } = await runCheck({ ...pair('r1', 'r2'), mappings: 'demo-data/mappings.tsv', state, now: '2026-03-01T00:00:00.000Z', failOn: 'ok' });
  const { report: r23 } = await runCheck({ ...pair('r2', 'r3'), mappings: 'demo-data/mappings.tsv', state });

  it('records one run per release pair and reports the history', () => {
    expect(report.history!.runs.map((r) => [r.old, r.new])).toEqual([['r1', 'r2']]);
    expect(r23.history!.runs.map((r) => [r.old, r.new])).toEqual([['r1', 'r2'], ['r2', 'r3']]);
    expect(r23.history!.declining.length).toBeGreaterThan(0);
    // generated_at stays the last field, after history.
    expect(Object.keys(report).slice(-2)).toEqual(['history', 'generated_at']);
  });

  it('validates against docs/report.schema.json, settled mapping and history included', () => {
    for (const r of [report, r23]) {
      const ok = validate(JSON.parse(renderJson(r)));
      expect(ok ? [] : validate.errors).toEqual([]);
    }
    expect(report.mappings.find((m) => m.local_code === 'DXP-2115')!.settled).toEqual({ decision: 'keep', reviewer: 'R <b>', note: 'reviewed', release: 'r2', time: '' });
  });

  it('leaves the settled mapping out of the lists and of --fail-on, and says how many are settled', () => {
    const settled = report.mappings.filter((m) => m.settled);
    expect(settled.map((m) => m.local_code)).toEqual(['DXP-2115']);
    expect(report.fail_on!.mappings).toBe(report.mappings.length - 1);
    expect(renderReport('csv', report)).not.toContain('DXP-2115');
    const txt = renderReport('text', report, { color: false, limit: 500 });
    expect(txt).toContain('(1 more settled by earlier review decisions)');
    expect(txt.split('\n').some((l) => /^\s+\d+\s+DXP-2115/.test(l))).toBe(false);
    expect(renderReport('md', report)).toContain('1 mapping is settled by earlier review decisions');
  });

  it('draws the recorded history in the HTML page, every input string as text', () => {
    const html = renderHtml(r23);
    const doc = parse(html) as unknown as Node;
    const nodes = all(doc);
    const section = nodes.find((n) => n.tagName === 'section' && n.attrs?.some((a) => a.name === 'id' && a.value === 'history'))!;
    expect(section).toBeDefined();
    const inside = all(section);
    const lines = inside.filter((n) => n.tagName === 'polyline');
    expect(lines.length).toBe(Math.min(8, r23.history!.declining.length));
    expect(inside.filter((n) => n.tagName === 'tr').length).toBe(r23.history!.declining.length + 1);
    expect(text(section)).toContain('r1 → r2');
    expect(nodes.some((n) => n.tagName === 'a' && n.attrs?.some((a) => a.name === 'href' && a.value === '#history'))).toBe(true);
    // No inline style attributes (the Content-Security-Policy admits only the hashed <style>).
    expect(nodes.some((n) => n.attrs?.some((a) => a.name === 'style'))).toBe(false);
    // The reviewer's name from the state is text, not markup.
    const settledPage = renderHtml(report);
    expect(settledPage).toContain('R &lt;b&gt;');
    expect(settledPage).not.toContain('R <b>');
  });
});
