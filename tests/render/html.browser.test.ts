/**
 * The HTML page in a real browser: Debian's headless Chromium driven by playwright-core.
 * The page must load with no console error (a blocked inline script or style would log one, so
 * this also checks the CSP hashes), make no request but its own file, run no input as script,
 * and its filter box and verdict toggles must work. Screenshots go to a temporary folder whose
 * path is printed, for a person to look at.
 *
 * Skipped, with the reason in its name, when /usr/bin/chromium is absent (apt-get install -y chromium).
 */
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { renderHtml } from '../../src/render/html.js';
import { hostileCheck, FORMULA, SCRIPT } from '../helpers/hostileReport.js';
import { demoCheckReport } from '../helpers/demoCheck.js';

const CHROMIUM = '/usr/bin/chromium';
const HAVE_CHROMIUM = existsSync(CHROMIUM);
const why = HAVE_CHROMIUM ? '' : ` (skipped: ${CHROMIUM} is not installed; apt-get install -y chromium)`;
if (!HAVE_CHROMIUM) console.warn(`html.browser.test: ${CHROMIUM} not found, browser tests skipped; install it with apt-get install -y chromium`);

describe.skipIf(!HAVE_CHROMIUM)(`the HTML report in headless Chromium${why}`, () => {
  let context: BrowserContext;
  const shots = mkdtempSync(join(tmpdir(), 'termdrift-shots-'));
  const problems: string[] = [];

  beforeAll(async () => {
    const { chromium } = await import('playwright-core');
    context = await chromium.launchPersistentContext(mkdtempSync(join(tmpdir(), 'termdrift-chromium-')), {
      executablePath: CHROMIUM,
      headless: true,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
      viewport: { width: 1360, height: 900 },
    });
  });

  afterAll(async () => {
    await context?.close();
    console.log(`html.browser.test: screenshots in ${shots}`);
  });

  async function open(name: string, html: string): Promise<Page> {
    const file = join(shots, `${name}.html`);
    writeFileSync(file, html);
    const url = pathToFileURL(file).href;
    const page = await context.newPage();
    page.on('console', (m) => {
      if (m.type() === 'error' || m.type() === 'warning') problems.push(`${name}: console ${m.type()}: ${m.text()}`);
    });
    page.on('pageerror', (e) => problems.push(`${name}: page error: ${e.message}`));
    page.on('dialog', (d) => {
      problems.push(`${name}: a dialog opened: ${d.message()}`);
      void d.dismiss();
    });
    page.on('request', (r) => {
      if (r.url() !== url) problems.push(`${name}: request for ${r.url()}`);
    });
    await page.goto(url);
    return page;
  }

  it('loads a hostile report with no console error, no request, no script from input', async () => {
    problems.length = 0;
    const page = await open('hostile', renderHtml(await hostileCheck()));
    await page.waitForFunction(() => document.getElementById('shown')?.textContent !== '');
    expect(problems).toEqual([]);
    // the term "<script>alert(1)</script>" is on the page as text
    const asText = page.getByText(SCRIPT, { exact: false });
    expect(await asText.count()).toBeGreaterThan(0);
    expect(await page.locator('script').count()).toBe(1);
    await page.screenshot({ path: join(shots, 'hostile.png'), fullPage: true });
  });

  it('filters the rows by text and by verdict', async () => {
    problems.length = 0;
    const page = await open('filter', renderHtml(await hostileCheck()));
    const visibleRows = () => page.locator('details.m:visible').count();
    await expect.poll(() => page.locator('#shown').textContent()).toBe('4 of 4 shown');
    expect(await visibleRows()).toBe(4);
    await page.fill('#q', 'hyperlink');
    await expect.poll(visibleRows).toBe(1);
    expect(await page.locator('#shown').textContent()).toBe('1 of 4 shown');
    expect(await page.locator('details.m:visible summary').first().textContent()).toContain(FORMULA);
    // a group whose rows are all hidden is hidden with them
    expect(await page.locator('.group:visible').count()).toBe(1);
    await page.fill('#q', '');
    await page.locator('input[data-v="broken"]').uncheck();
    await expect.poll(visibleRows).toBe(2);
    expect(await page.locator('details.m[data-v="broken"]:visible').count()).toBe(0);
    await page.locator('input[data-v="broken"]').check();
    await expect.poll(visibleRows).toBe(4);
    // a row opens on its evidence
    const row = page.locator('details.m').first();
    await row.locator('summary').click();
    expect(await row.getAttribute('open')).not.toBeNull();
    await expect.poll(() => row.locator('.ev').isVisible()).toBe(true);
    expect(problems).toEqual([]);
  });

  it('renders the demo check for a person to look at, on screen and for print', async () => {
    problems.length = 0;
    const page = await open('demo', renderHtml(await demoCheckReport()));
    await page.screenshot({ path: join(shots, 'demo-top.png') });
    await page.locator('details.m').first().locator('summary').click();
    await page.locator('#actions').scrollIntoViewIfNeeded();
    await page.evaluate(() => document.getElementById('actions')!.scrollIntoView());
    await page.screenshot({ path: join(shots, 'demo-actions.png') });
    const flow = page.locator('#changes details.change:has(svg.flow)').last();
    await flow.screenshot({ path: join(shots, 'demo-flow.png') });
    // print: the tools are hidden and every row is opened for paper
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('.tools').isVisible()).toBe(false);
    await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')));
    expect(await page.locator('details:not([open])').count()).toBe(0);
    await page.screenshot({ path: join(shots, 'demo-print.png') });
    expect(problems).toEqual([]);
  });
});
