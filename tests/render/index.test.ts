/** One entry point for the five forms; each is a function of the report alone. */
import { describe, expect, it } from 'vitest';
import { RENDER_FORMATS, RENDERERS, renderReport } from '../../src/render/index.js';
import { renderCsv } from '../../src/render/csv.js';
import { renderHtml } from '../../src/render/html.js';
import { renderJson } from '../../src/render/json.js';
import { renderMarkdown } from '../../src/render/markdown.js';
import { renderText } from '../../src/render/text.js';
import { hostileCheck, hostileDiff } from '../helpers/hostileReport.js';

describe('renderReport', () => {
  it('has a renderer for every format, and dispatches to it', async () => {
    expect(Object.keys(RENDERERS).sort()).toEqual([...RENDER_FORMATS].sort());
    const report = await hostileCheck();
    expect(renderReport('text', report, { color: true, limit: 2 })).toBe(renderText(report, { color: true, limit: 2 }));
    expect(renderReport('text', report)).toBe(renderText(report, { color: false }));
    expect(renderReport('json', report, { verdicts: ['broken'] })).toBe(renderJson(report));
    expect(renderReport('md', report, { verdicts: ['broken'] })).toBe(renderMarkdown(report, { verdicts: ['broken'] }));
    expect(renderReport('csv', report)).toBe(renderCsv(report));
    expect(renderReport('html', report)).toBe(renderHtml(report));
  });

  it('gives the same output for the same report in every form, and leaves the report as it was', async () => {
    for (const report of [await hostileDiff(), await hostileCheck()]) {
      const before = JSON.stringify(report);
      for (const f of RENDER_FORMATS) {
        const a = renderReport(f, report, { color: true });
        const b = renderReport(f, JSON.parse(before), { color: true });
        expect(b, f).toBe(a);
      }
      expect(JSON.stringify(report)).toBe(before);
    }
  });

  it('carries tool version, release labels, every input hash, parameters, accounting and the caution in every form but CSV', async () => {
    const report = await hostileCheck();
    for (const f of ['text', 'json', 'md', 'html'] as const) {
      // Markdown backslash-escapes punctuation; compare without the escapes.
      const out = renderReport(f, report).replace(/\\/g, '');
      expect(out, f).toContain('0.1.0');
      for (const i of report.inputs) expect(out, f).toContain(i.sha256);
      expect(out, f).toContain('carryShare');
      expect(out, f).toMatch(/[Rr]ejected/);
      expect(out, f).toContain(report.caution);
    }
    // The worklist carries the release hashes and tool version on every row (see docs/report-schema.md).
    const csv = renderReport('csv', report);
    expect(csv).toContain(report.releases.old.sha256);
    expect(csv).toContain('termdrift 0.1.0');
  });
});
