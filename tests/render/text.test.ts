/** The terminal form: summary, mappings by impact, filters, colour on request only, no escapes from input. */
import { describe, expect, it } from 'vitest';
import { renderText } from '../../src/render/text.js';
import { CAUTION } from '../../src/report/caution.js';
import { hostileCheck, hostileDiff, FORMULA, SCRIPT } from '../helpers/hostileReport.js';
import { makeCheckReport, mapping } from '../helpers/checkReport.js';

// ECMA-48 control sequence introducer: ESC [ (common practice: how terminals take colour codes).
const ESC = '\u001b';

describe('renderText on a check report', () => {
  it('opens with the caution and a summary, then the mappings in impact order', async () => {
    const out = renderText(await hostileCheck(), { color: false });
    expect(out).toContain(CAUTION);
    expect(out.indexOf('Summary')).toBeLessThan(out.indexOf('Mappings needing action'));
    const order = [FORMULA, '\\u{0009}TAB', '\\u{000d}CR', '  4  +1'].map((s) => out.indexOf(s));
    expect(order.every((p) => p > 0)).toBe(true);
    expect([...order].sort((a, b) => a - b)).toEqual(order);
    expect(out).toMatch(/Broken\s+2\n/);
    expect(out).toMatch(/Split\s+1\n/);
    // the old target, the cause and the candidates of the first mapping
    expect(out).toContain('mapped to  P1 Diabetes mellitus');
    expect(out).toContain('cause      Split: P1 Diabetes mellitus → P1 Diabetes mellitus, P2 Type 2 diabetes');
    expect(out).toContain(`P2 ${SCRIPT} 0.40 (term flow)`);
    // ok mappings are not listed
    expect(out).not.toContain('LAB-7');
  });

  it('applies --limit and --verdict', async () => {
    const report = await hostileCheck();
    const limited = renderText(report, { color: false, limit: 1 });
    expect(limited).toContain(FORMULA);
    expect(limited).not.toContain('+1  x"');
    expect(limited).toContain('3 more not shown (limit 1)');
    const broken = renderText(report, { color: false, verdicts: ['broken'] });
    expect(broken).toContain('(2 of 6; verdicts broken)');
    expect(broken).not.toContain(FORMULA);
  });

  it('uses colour only when asked, and input cannot smuggle terminal escapes', async () => {
    const diff = await hostileDiff();
    const report = makeCheckReport(diff, [mapping({ local_code: 'X1', local_label: `red ${ESC}[31mtext${ESC}[0m`, target_id: 'P1', verdict: 'broken' })]);
    const plain = renderText(report, { color: false });
    expect(plain).not.toContain(ESC);
    expect(plain).toContain('red \\u{001b}[31mtext');
    const coloured = renderText(report, { color: true });
    expect(coloured).toContain(`${ESC}[`);
    // the only escapes are ours: the label's ESC is still shown as text
    expect(coloured).toContain('red \\u{001b}[31mtext');
  });

  it('is the same text twice', async () => {
    const report = await hostileCheck();
    expect(renderText(report, { color: true })).toBe(renderText(structuredClone(report), { color: true }));
  });
});

describe('renderText on a diff report', () => {
  it('lists the changes by kind with their concepts and terms', async () => {
    const out = renderText(await hostileDiff(), { color: false });
    expect(out).toContain('Changes to what a code means');
    expect(out).toMatch(/Split \(1\)/);
    expect(out).toContain('P1 Diabetes mellitus → P1 Diabetes mellitus, P2 Type 2 diabetes');
    expect(out).toMatch(/Type 2 diabetes {2}P1 → P2/);
    expect(out).toContain('Preferred term changed');
    expect(out).not.toContain('Mappings needing action');
    // provenance in every form
    expect(out).toContain('Inputs');
    expect(out).toMatch(/old release\s+11\s+11\s+0\s+[0-9a-f]{64}/);
    expect(out).toContain('thresholds.carryShare');
    expect(out).toContain('Rejected rows (0)');
  });
});
