/**
 * The Markdown change log. Escaping is checked by rendering our output with micromark and its
 * GFM extension (micromark follows the CommonMark spec; micromark-extension-gfm the GitHub
 * Flavored Markdown spec, tables, autolink literals and strikethrough included) and parsing the
 * HTML with parse5: no link, image, script or raw HTML may come from input strings.
 */
import { describe, expect, it } from 'vitest';
import { micromark } from 'micromark';
import { gfm, gfmHtml } from 'micromark-extension-gfm';
import { parseFragment } from 'parse5';
import { renderMarkdown, mdText, wordDiff } from '../../src/render/markdown.js';
import { CAUTION } from '../../src/report/caution.js';
import { hostileCheck, hostileDiff, ATTRIBUTE, FORMULA, MD_LINK, SCRIPT } from '../helpers/hostileReport.js';

const toHtml = (md: string) => micromark(md, { extensions: [gfm()], htmlExtensions: [gfmHtml()] });

interface El {
  nodeName: string;
  tagName?: string;
  value?: string;
  attrs?: { name: string; value: string }[];
  childNodes?: El[];
}

function elements(node: El, out: El[] = []): El[] {
  if (node.tagName) out.push(node);
  for (const c of node.childNodes ?? []) elements(c, out);
  return out;
}

function text(node: El): string {
  if (node.nodeName === '#text') return node.value ?? '';
  return (node.childNodes ?? []).map(text).join('');
}

describe('mdText', () => {
  it('renders every hostile string as the same text and nothing else', () => {
    for (const s of [SCRIPT, ATTRIBUTE, MD_LINK, FORMULA, 'see https://evil.example/x', 'www.evil.example', 'mail a@b.example', '![img](http://evil.example/i.png)', '<img src=x onerror=alert(1)>', '**bold** _it_ ~~s~~ `code`', 'a | b', '&amp; &#60;', '$x$', 'line\nbreak', '- item', '+ item', '1. item', '---', '=== x', '> quote', '# heading']) {
      const html = toHtml(mdText(s));
      const root = parseFragment(html) as unknown as El;
      const tags = elements(root).map((e) => e.tagName);
      expect(tags, s).toEqual(['p']);
      expect(text(root).trim(), s).toBe(s.replace('\n', '\\u{000a}'));
    }
  });
});

describe('wordDiff', () => {
  it('strikes the removed words and bolds the added ones', () => {
    expect(wordDiff('Chronic renal failure', 'Chronic kidney disease')).toBe('Chronic ~~renal failure~~ **kidney disease**');
    const html = toHtml(wordDiff('Chronic renal failure', 'Chronic kidney disease'));
    expect(html).toBe('<p>Chronic <del>renal failure</del> <strong>kidney disease</strong></p>');
  });
});

describe('renderMarkdown', () => {
  it('makes a change log: caution, summary, mappings by change, changes by severity and kind, inputs', async () => {
    const md = renderMarkdown(await hostileCheck());
    const headings = md.split('\n').filter((l) => l.startsWith('#'));
    expect(headings.map((h) => h.replace(/ \(\d+\)$/, ''))).toEqual([
      '# Mapping check\\: old to new',
      '## Summary',
      '## Mappings needing action',
      `### 1. Retired: R1 ${mdText(ATTRIBUTE)}`,
      '### 2. Split: P1 Diabetes mellitus → P1 Diabetes mellitus, P2 Type 2 diabetes',
      '### 3. Not caused by a change between the releases',
      '## Changes that touch no mapping',
      '## Change log',
      '### Changes to what a code means',
      '#### Retired',
      '#### Split',
      '### Changes that keep the meaning',
      '#### Preferred term changed',
      '## Inputs',
      '## Parameters',
      '## Rejected rows',
    ]);
    expect(md).toContain(`> **Caution.** ${mdText(CAUTION)}`);
  });

  it('shows a split as a diff of term sets and a renamed concept as a word diff', async () => {
    const md = renderMarkdown(await hostileDiff());
    const block = /```diff\n([\s\S]*?)\n```/.exec(md.slice(md.indexOf('#### Split')))![1].split('\n');
    expect(block).toEqual([
      '@@ P1 Diabetes mellitus: 5 terms before, 3 after @@',
      `- ${SCRIPT}   (to P2)`,
      '  Diabetes mellitus',
      '  Juvenile diabetes',
      '  Type 1 diabetes',
      '- Type 2 diabetes   (to P2)',
      '@@ P2 Type 2 diabetes: 0 terms before, 2 after @@',
      `+ ${SCRIPT}   (from P1)`,
      '+ Type 2 diabetes   (from P1)',
    ]);
    expect(md).toContain('- word changes: Chronic ~~renal failure~~ **kidney disease**');
  });

  it('lets no input string make a link, an image, HTML or an extra table cell', async () => {
    const html = toHtml(renderMarkdown(await hostileCheck()));
    const root = parseFragment(html) as unknown as El;
    const tags = new Set(elements(root).map((e) => e.tagName));
    for (const t of ['a', 'img', 'script', 'iframe', 'style']) expect(tags.has(t), t).toBe(false);
    for (const e of elements(root)) expect(e.attrs?.filter((a) => a.name.startsWith('on')) ?? []).toEqual([]);
    // every row of every table has as many cells as its header
    for (const table of elements(root).filter((e) => e.tagName === 'table')) {
      const rows = elements(table).filter((e) => e.tagName === 'tr');
      const width = elements(rows[0]).filter((e) => e.tagName === 'th').length;
      for (const r of rows.slice(1)) expect(elements(r).filter((e) => e.tagName === 'td').length).toBe(width);
    }
    // and the hostile strings are there as text
    const all = text(root);
    for (const s of [SCRIPT, ATTRIBUTE, MD_LINK, FORMULA, 'A | B\\u{000a}C', 'www.evil.example and a@b.example']) expect(all).toContain(s);
  });

  it('keeps a term with backticks inside its code block', async () => {
    const { loadPair } = await import('../helpers/releases.js');
    const { diffReleases } = await import('../../src/pipeline.js');
    const pair = {
      old: 'P1 disorder: Fever with rash* | Exanthem ```` fever | Rash and fever | Febrile rash',
      new: 'P2 disorder: Fever with rash* | Exanthem ```` fever\nP3 disorder: Rash and fever* | Febrile rash',
    };
    const md = renderMarkdown(diffReleases(await loadPair(pair)).report);
    expect(md).toContain('`````diff\n');
    const html = toHtml(md);
    const pre = elements(parseFragment(html) as unknown as El).filter((e) => e.tagName === 'pre');
    expect(pre.map(text).join('')).toContain('Exanthem ```` fever');
  });

  it('is the same text twice, and carries no clock time unless the report does', async () => {
    const report = await hostileCheck();
    const a = renderMarkdown(report);
    expect(renderMarkdown(structuredClone(report))).toBe(a);
    expect(a).not.toMatch(/\d{4}-\d{2}-\d{2}T/);
    expect(renderMarkdown({ ...report, generated_at: '2026-12-01T09:00:00.000Z' })).toContain('on 2026-12-01T09\\:00\\:00\\.000Z');
  });
});
