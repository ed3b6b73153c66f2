/**
 * The view shared by the renderers: ordering, grouping, counts, impact buckets, term diffs.
 * Inputs are a real diff of hand-built releases plus hand-built mapping results.
 */
import { describe, expect, it } from 'vitest';
import { buildView, formatCount, impactBuckets, termDiffs, visible, preferredChanges } from '../../src/render/model.js';
import { VERDICTS } from '../../src/rescore/types.js';
import { hostileCheck, hostileDiff, FORMULA, SCRIPT } from '../helpers/hostileReport.js';

describe('buildView', () => {
  it('lists mappings needing action by impact, then local code (code-unit order), ok left out', async () => {
    const view = buildView(await hostileCheck());
    // impact 500 first; the three at 300 by local code: "\t" (U+0009) < "\r" (U+000D) < "+" (U+002B)
    expect(view.actions.map((m) => m.local_code)).toEqual([FORMULA, '\tTAB', '\rCR', '+1']);
    expect(view.actions.every((m) => m.verdict !== 'ok')).toBe(true);
  });

  it('groups mappings under their change, the larger total impact first, those no change touches last', async () => {
    const view = buildView(await hostileCheck());
    expect(view.groups.map((g) => [g.change?.kind ?? null, g.impact, g.mappings.map((m) => m.local_code)])).toEqual([
      ['retirement', 600, ['\rCR', '+1']],
      ['split', 500, [FORMULA]],
      [null, 300, ['\tTAB']],
    ]);
  });

  it('lists a mapping under its most dangerous change, the smaller id on a tie', async () => {
    const report = await hostileCheck();
    const split = report.changes.find((c) => c.kind === 'split')!.id;
    const renamed = report.changes.find((c) => c.kind === 'preferred_term_change')!.id;
    const m = { ...report.mappings[0], change_ids: [renamed, 'not-in-report', split] };
    const view = buildView({ ...report, mappings: [m] });
    expect(view.groups.map((g) => g.change?.id)).toEqual([split]);
  });

  it('filters by the verdicts asked for, ok included when asked', async () => {
    const view = buildView(await hostileCheck(), { verdicts: ['ok', 'broken'] });
    expect(view.filtered).toBe(true);
    expect(view.actions.map((m) => m.local_code)).toEqual(['\rCR', '+1', '-2', 'LAB-7']);
  });

  it('counts every verdict and every kind, zeros included, and what each change touches', async () => {
    const report = await hostileCheck();
    const view = buildView(report);
    expect(view.verdictCounts.map((c) => c.verdict)).toEqual([...VERDICTS]);
    expect(Object.fromEntries(view.verdictCounts.map((c) => [c.verdict, c.count]))).toEqual({ broken: 2, drifted: 0, ambiguous: 1, redirect: 0, context_changed: 0, ok: 2, unknown_target: 1 });
    expect(view.kindCounts.reduce((n, k) => n + k.count, 0)).toBe(report.changes.length);
    const retired = report.changes.find((c) => c.kind === 'retirement')!;
    expect(view.touches.get(retired.id)).toEqual({ total: 2, listed: 2 });
    const renamed = report.changes.find((c) => c.kind === 'preferred_term_change')!;
    expect(view.touches.get(renamed.id)).toEqual({ total: 1, listed: 0 });
  });

  it('puts structural kinds in the first severity section, in CHANGE_KINDS order', async () => {
    const view = buildView(await hostileDiff());
    expect(view.severities.map((s) => [s.severity, s.kinds.map((k) => k.kind)])).toEqual([
      ['meaning', ['retirement', 'split']],
      ['wording', ['preferred_term_change']],
    ]);
  });

  it('accounts for every input and flattens the parameters', async () => {
    const report = await hostileCheck();
    const view = buildView(report);
    expect(view.inputs.map((i) => i.role)).toEqual(['old', 'new', 'mappings']);
    for (const i of view.inputs) expect(i.read).toBe(i.used + i.rejected);
    const names = view.parameters.map((p) => p.name);
    expect(names).toContain('thresholds.carryShare');
    expect(names).toContain('scorer.auc');
    expect(names).toContain('scorer.weights.token_jaccard');
  });
});

describe('termDiffs', () => {
  it('shows a split per concept: terms that left, with where they went, and terms that arrived', async () => {
    const report = await hostileDiff();
    const split = report.changes.find((c) => c.kind === 'split')!;
    const byConcept = Object.fromEntries(termDiffs(split).map((d) => [d.concept, d.lines.map((l) => `${l.op} ${l.term} ${l.other ?? ''}`.trim())]));
    expect(byConcept.P1).toEqual([
      `removed ${SCRIPT} P2`,
      'kept Diabetes mellitus',
      'kept Juvenile diabetes',
      'kept Type 1 diabetes',
      'removed Type 2 diabetes P2',
    ]);
    expect(byConcept.P2).toEqual([`added ${SCRIPT} P1`, 'added Type 2 diabetes P1']);
  });

  it('finds a changed preferred term', async () => {
    const report = await hostileDiff();
    const renamed = report.changes.find((c) => c.kind === 'preferred_term_change')!;
    expect(preferredChanges(renamed)).toEqual([{ concept: 'A1', before: 'Chronic renal failure', after: 'Chronic kidney disease' }]);
  });
});

describe('impactBuckets', () => {
  it('uses decades from under 10 up to the decade of the largest value; lower bounds included', () => {
    const b = impactBuckets([0, 9.99, 10, 99, 100, 999.5, 1000, 12345]);
    expect(b.map((x) => [x.label, x.count])).toEqual([
      ['under 10', 2],
      ['10 to 100', 2],
      ['100 to 1,000', 2],
      ['1,000 to 10,000', 1],
      ['10,000 to 100,000', 1],
    ]);
    expect(b.map((x) => x.short)).toEqual(['<10', '10–100', '100–1k', '1k–10k', '10k–100k']);
  });

  it('has one bucket when nothing reaches 10, and none empty at the top', () => {
    expect(impactBuckets([]).map((x) => [x.label, x.count])).toEqual([['under 10', 0]]);
    expect(impactBuckets([3, 10]).map((x) => x.count)).toEqual([1, 1]);
  });
});

describe('formatting helpers', () => {
  it('groups digits without a locale and keeps one decimal', () => {
    expect([0, 7, 999, 1000, 48213, 1234567, 29313.94, 12.96, -1500].map(formatCount)).toEqual(['0', '7', '999', '1,000', '48,213', '1,234,567', '29,313.9', '13.0', '-1,500']);
  });

  it('makes control and bidi characters visible', () => {
    expect(visible('a\u001b[31mb\nc\u202ed')).toBe('a\\u{001b}[31mb\\u{000a}c\\u{202e}d');
    expect(visible('Sjögren syndrome')).toBe('Sjögren syndrome');
  });
});
