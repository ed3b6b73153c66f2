/**
 * The HTML page, read with parse5 (an HTML parser that follows the WHATWG parsing algorithm,
 * so it sees the page as a browser would): self-contained, one style and one script admitted by
 * their SHA-256 in the Content-Security-Policy (CSP Level 3 hash sources are base64 of the
 * SHA-256 of the element's text), no remote loads, no event-handler attributes, every input
 * string present only as text.
 */
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { parse } from 'parse5';
import { esc, renderHtml } from '../../src/render/html.js';
import { buildView } from '../../src/render/model.js';
import { hostileCheck, hostileDiff, ATTRIBUTE, FORMULA, MD_LINK, SCRIPT } from '../helpers/hostileReport.js';

interface Node {
  nodeName: string;
  tagName?: string;
  value?: string;
  attrs?: { name: string; value: string }[];
  childNodes?: Node[];
  content?: Node;
}

function all(node: Node, out: Node[] = []): Node[] {
  if (node.tagName) out.push(node);
  for (const c of node.childNodes ?? []) all(c, out);
  return out;
}

function text(node: Node): string {
  if (node.nodeName === '#text') return node.value ?? '';
  return (node.childNodes ?? []).map(text).join('');
}

const attr = (n: Node, name: string) => n.attrs?.find((a) => a.name === name)?.value;
const sha = (s: string) => `'sha256-${createHash('sha256').update(s, 'utf8').digest('base64')}'`;

describe('esc', () => {
  it('escapes the five characters HTML gives a meaning to, and control characters', () => {
    expect(esc(`<a href="x" title='y'>&amp;</a>`)).toBe('&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;amp;&lt;/a&gt;');
    expect(esc('a\u0000b')).toBe('a\\u{0000}b');
  });
});

describe('renderHtml', () => {
  it('admits only its own inline style and script, by hash, and loads nothing', async () => {
    const html = renderHtml(await hostileCheck());
    const doc = parse(html) as unknown as Node;
    const els = all(doc);
    const csp = els.find((e) => e.tagName === 'meta' && attr(e, 'http-equiv') === 'Content-Security-Policy');
    expect(csp).toBeDefined();
    const policy = attr(csp!, 'content')!;
    const scripts = els.filter((e) => e.tagName === 'script');
    const styles = els.filter((e) => e.tagName === 'style');
    expect(scripts).toHaveLength(1);
    expect(styles).toHaveLength(1);
    expect(policy).toContain("default-src 'none'");
    expect(policy).toContain(`script-src ${sha(text(scripts[0]))}`);
    expect(policy).toContain(`style-src ${sha(text(styles[0]))}`);
    expect(policy).not.toMatch(/unsafe-inline|unsafe-eval|https?:/);
    for (const e of els) {
      for (const a of e.attrs ?? []) {
        expect(a.name.startsWith('on'), `${e.tagName} ${a.name}`).toBe(false);
        if (a.name === 'href') expect(a.value).toMatch(/^#[a-z]+(-\d+)?$/);
        expect(['src', 'srcset', 'style', 'action', 'formaction', 'xlink:href'].includes(a.name), `${e.tagName} ${a.name}`).toBe(false);
      }
      expect(['img', 'iframe', 'object', 'embed', 'link', 'base', 'form'].includes(e.tagName!), e.tagName).toBe(false);
    }
  });

  it('shows every hostile string as text and never as markup', async () => {
    const html = renderHtml(await hostileCheck());
    const doc = parse(html) as unknown as Node;
    const body = text(doc);
    for (const s of [SCRIPT, ATTRIBUTE, MD_LINK, FORMULA]) expect(body).toContain(s);
    expect(html).not.toContain(SCRIPT);
    expect(html).not.toContain(ATTRIBUTE);
    // the hostile attribute text sits inside quoted attribute values, escaped
    expect(html).toContain(`title="${esc(ATTRIBUTE)}"`);
  });

  it('has a row per mapping needing action, each opening on its evidence, and the verdict toggles', async () => {
    const report = await hostileCheck();
    const view = buildView(report);
    const els = all(parse(renderHtml(report)) as unknown as Node);
    const rows = els.filter((e) => e.tagName === 'details' && attr(e, 'class') === 'm');
    expect(rows.map((r) => attr(r, 'data-v'))).toEqual(view.groups.flatMap((g) => g.mappings.map((m) => m.verdict)));
    expect(rows.every((r) => all(r).some((e) => e.tagName === 'summary'))).toBe(true);
    const toggles = els.filter((e) => e.tagName === 'input' && attr(e, 'type') === 'checkbox').map((e) => attr(e, 'data-v'));
    expect(toggles).toEqual(['broken', 'ambiguous', 'unknown_target']);
    expect(els.some((e) => attr(e, 'id') === 'q')).toBe(true);
  });

  it('draws charts and, for a split, the flow of terms with counts on the links', async () => {
    const report = await hostileDiff();
    const els = all(parse(renderHtml(report)) as unknown as Node);
    const flows = els.filter((e) => e.tagName === 'svg' && attr(e, 'class') === 'flow');
    expect(flows).toHaveLength(1);
    const labels = all(flows[0]).filter((e) => e.tagName === 'text').map(text);
    // P1 keeps 3 of its 5 terms and gives 2 to P2 (the split in the fixture)
    expect(labels).toEqual(expect.arrayContaining(['3 terms · 60%', '2 terms · 40%', 'P1', 'P2']));
    expect(all(flows[0]).filter((e) => e.tagName === 'path')).toHaveLength(2);
    const checkEls = all(parse(renderHtml(await hostileCheck())) as unknown as Node);
    const charts = checkEls.filter((e) => e.tagName === 'svg' && attr(e, 'role') === 'img').map((e) => attr(e, 'aria-label'));
    expect(charts).toEqual(expect.arrayContaining(['Mappings by verdict', 'Impact of mappings needing action', 'Changes by kind']));
  });

  it('carries provenance and the caution, and is the same bytes twice', async () => {
    const report = await hostileCheck();
    const html = renderHtml(report);
    const body = text(parse(html) as unknown as Node);
    expect(body).toContain(report.caution);
    for (const i of report.inputs) expect(body).toContain(i.sha256);
    expect(body).toContain('thresholds.carryShare');
    expect(body).toContain('Rejected rows');
    expect(renderHtml(structuredClone(report))).toBe(html);
    expect(html).not.toMatch(/\d{4}-\d{2}-\d{2}T\d{2}/);
  });
});
