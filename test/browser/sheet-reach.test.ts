/**
 * The sheet for every reader, in real Chromium (Debian's /usr/bin/chromium
 * through playwright-core, the BUILT site): no sideways scrolling at 360 and
 * 390 px (idle, running, done; the verdict table turns into one card per
 * rung), an axe-core scan with no serious or critical violations in the idle,
 * running, done and error states, skip links to Run and to the evidence, and
 * Run again (every run afresh, same fingerprint; after an edit only the runs
 * the edit changed).
 *
 * axe-core's script is copied into the served site and added with a script
 * tag, so the page's Content-Security-Policy ('self' scripts only) holds.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { copyFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join, resolve } from 'node:path';
import { validateSpec } from '../../src/experiment/check.ts';
import type { ExperimentSpec } from '../../src/experiment/spec.ts';
import { encodeSpecLink } from '../../src/share/link.ts';
import { buildSite, serveStatic, type StaticServer } from '../../bench/static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS as ARGS } from '../../bench/chromium.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const SITE = join(ROOT, 'test-output', 'site-reach');
const AXE = createRequire(import.meta.url).resolve('axe-core/axe.min.js');

/** The quick fixture (2 arms × 2 seeds × 20 steps), with per-test changes so kept runs never leak between tests. */
function fixture(change: { base: number; question: string; steps?: number; arms?: number }): ExperimentSpec {
  const raw = JSON.parse(readFileSync(join(ROOT, 'test/fixtures/browser-quick.json'), 'utf8')) as Record<string, unknown> & {
    seeds: { count: number; base: number };
    budget: Record<string, unknown>;
    arms: Array<{ name: string; model: Record<string, unknown> }>;
  };
  const aggregators = ['max', 'sum', 'mean', 'min', 'smooth-max', 'smooth-min'];
  const arms = change.arms ? aggregators.slice(0, change.arms).map((a) => ({ name: `${a} aggregation, a long arm name`, model: { aggregator: a } })) : raw.arms;
  return validateSpec({ ...raw, question: change.question, seeds: { ...raw.seeds, base: change.base }, budget: { ...raw.budget, steps: change.steps ?? 20 }, arms });
}

interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: Array<{ target: unknown[] }>;
}

describe.skipIf(!existsSync(CHROMIUM))('the sheet at every width and for every reader (Chromium)', () => {
  let site: StaticServer;
  let browser: Browser;
  const contexts: BrowserContext[] = [];

  beforeAll(async () => {
    mkdirSync(SITE, { recursive: true });
    await buildSite(SITE, 170_000);
    copyFileSync(AXE, join(SITE, 'axe.min.js'));
    site = await serveStatic(SITE);
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS, headless: true });
  }, 180_000);

  afterAll(async () => {
    for (const c of contexts) await c.close().catch(() => undefined);
    await browser?.close();
    await site?.close();
  });

  async function open(path: string, width = 1360): Promise<Page> {
    const ctx = await browser.newContext({ viewport: { width, height: 850 } });
    contexts.push(ctx);
    const page = await ctx.newPage();
    await page.goto(site.url + path);
    await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 30_000 });
    return page;
  }

  const link = async (spec: ExperimentSpec) => encodeSpecLink(spec, { base: '' });
  const waitState = (page: Page, wanted: string, timeout = 90_000) => page.waitForSelector(`ff-sheet[data-state="${wanted}"]`, { timeout });
  const runButton = (page: Page) => page.locator('ff-run-controls button[data-action="run"]');
  const fingerprint = (page: Page) => page.locator('ff-evidence').getAttribute('data-fingerprint');
  const pageWidth = (page: Page) => page.evaluate(() => ({ scroll: document.scrollingElement!.scrollWidth, inner: window.innerWidth }));

  async function expectNoSidewaysScroll(page: Page, when: string) {
    const { scroll, inner } = await pageWidth(page);
    expect(scroll, `${when}: page is ${scroll} px wide in a ${inner} px window`).toBeLessThanOrEqual(inner);
  }

  async function axeScan(page: Page, state: string): Promise<void> {
    if (!(await page.evaluate(() => 'axe' in window))) await page.addScriptTag({ url: `${site.url}axe.min.js` });
    const violations = (await page.evaluate(async () => {
      const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: unknown[] }> } }).axe;
      return (await axe.run(document, { resultTypes: ['violations'] })).violations;
    })) as AxeViolation[];
    const severe = violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
    const report = severe.map((v) => `${v.impact} ${v.id}: ${v.help} — ${v.nodes.map((n) => JSON.stringify(n.target)).slice(0, 3).join(', ')}`);
    expect(report, `axe-core in the ${state} state`).toEqual([]);
  }

  it('never scrolls sideways at 360 and 390 px: idle, running, done, many arms, and the verdicts as one card per rung', async () => {
    for (const width of [390, 360]) {
      const idle = await open('', width);
      await expectNoSidewaysScroll(idle, `quick demo, idle, ${width} px`);
      // The run bar stays in view while the reader scrolls.
      await idle.evaluate(() => window.scrollTo(0, 3000));
      const top = await idle.locator('ff-run-controls').evaluate((el) => el.getBoundingClientRect().top);
      expect(top).toBeLessThanOrEqual(1);
      await idle.close();
    }
    const page = await open(await link(fixture({ base: 31, question: 'Browser test: narrow', arms: 6 })), 390);
    await expectNoSidewaysScroll(page, 'six arms, idle');
    await runButton(page).click();
    await waitState(page, 'running', 10_000);
    await expectNoSidewaysScroll(page, 'six arms, running');
    await waitState(page, 'done');
    await page.waitForSelector('ff-evidence ff-verdict-table');
    await expectNoSidewaysScroll(page, 'six arms, done, 390 px');
    // Every figure carries its own key of the six arms (letter, marker, dash), so an exported figure still says which is which.
    const keys = page.locator('ff-evidence ff-figure svg g[data-key="arms"]');
    expect(await keys.count()).toBe(3);
    for (const text of await keys.allTextContents()) expect(text.replace(/\s+/g, ' ')).toMatch(/A max aggregation.*F smooth-min aggregation/);
    // Narrow: each rung's verdict is a card whose values are labelled, not a wide table.
    const cell = page.locator('ff-verdict-table table.verdicts td[data-p-raw]').first();
    expect(await cell.evaluate((el) => getComputedStyle(el).display)).toBe('grid');
    expect(await cell.evaluate((el) => getComputedStyle(el, '::before').content)).toBe('"p (raw)"');
    // Arms C–F wear the lighter palette colours: names stay in ink, so six arms pass the scan too.
    await axeScan(page, 'six arms, done, 390 px');
    await page.setViewportSize({ width: 360, height: 850 });
    await expect.poll(() => pageWidth(page).then((w) => w.scroll <= w.inner)).toBe(true);
    await page.setViewportSize({ width: 1360, height: 850 });
    await expect.poll(() => cell.evaluate((el) => getComputedStyle(el).display)).toBe('table-cell');
    await page.screenshot({ path: join(ROOT, 'test-output', 'sheet-six-arms.png'), fullPage: true });
  }, 150_000);

  it('passes an axe-core scan (no serious or critical violations) idle, running, done and in error', async () => {
    const page = await open(await link(fixture({ base: 41, question: 'Browser test: axe', steps: 3000 })));
    await axeScan(page, 'idle');
    await runButton(page).click();
    await waitState(page, 'running', 10_000);
    await axeScan(page, 'running');
    await page.locator('ff-run-controls button[data-action="cancel"]').click();
    await waitState(page, 'cancelled', 5_000);

    const done = await open(await link(fixture({ base: 43, question: 'Browser test: axe, done' })));
    await runButton(done).click();
    await waitState(done, 'done');
    await done.waitForSelector('ff-evidence ff-verdict-table');
    await axeScan(done, 'done');

    const broken = await open('#ff9.AAAA');
    await broken.waitForSelector('ff-notice [role="alert"]');
    await axeScan(broken, 'error (a broken share link)');
    const failing = await open(`?fault=1:throw${await link(fixture({ base: 45, question: 'Browser test: axe, failed run' }))}`);
    await runButton(failing).click();
    await waitState(failing, 'done');
    await axeScan(failing, 'error (a failed run)');
  }, 180_000);

  it('offers skip links to Run and to the evidence as the first stops of the keyboard', async () => {
    const page = await open('');
    const deepFocus = () =>
      page.evaluate(() => {
        let a = document.activeElement;
        while (a && a.shadowRoot && a.shadowRoot.activeElement) a = a.shadowRoot.activeElement;
        return a ? `${a.tagName}|${a.getAttribute('data-skip') ?? a.getAttribute('data-action') ?? a.id}|${a.textContent?.trim()}` : '';
      });
    await page.keyboard.press('Tab');
    expect(await deepFocus()).toMatch(/^BUTTON\|run\|Skip to Run$/);
    await page.keyboard.press('Enter');
    expect(await deepFocus()).toMatch(/^BUTTON\|run\|▶ Run 20 runs$/);
    await page.reload();
    await page.waitForSelector('ff-sheet[data-ready="yes"]');
    await page.keyboard.press('Tab');
    await page.keyboard.press('Tab');
    expect(await deepFocus()).toMatch(/Skip to the evidence$/);
    await page.keyboard.press('Enter');
    expect(await deepFocus()).toMatch(/^H2\|h-evidence\|/);
  }, 30_000);

  it('says what is wrong in the sheet\'s own words, once each, and tells the truth about storage', async () => {
    const page = await open('');
    const hidden = page.getByLabel('Hidden width, arm max', { exact: true });
    await hidden.fill('0');
    await hidden.blur();
    const problems = page.locator('ff-run-options [data-problems] li');
    await expect.poll(() => problems.allTextContents()).toEqual(['Arm A (max) › Hidden width: got 0, allowed at least 1']);
    expect(await page.locator('ff-run-controls [data-action="show-problems"]').textContent()).toMatch(/fix 1 problem first/);
    expect(await runButton(page).isDisabled()).toBe(true);

    // A preset file with three problems: the box lists each once, in on-screen labels, and the message only counts them.
    const raw = JSON.parse(readFileSync(join(ROOT, 'presets/quick-demo.json'), 'utf8')) as { arms: Array<{ model: Record<string, unknown> }>; budget: Record<string, unknown>; seeds: Record<string, unknown> };
    raw.arms[1]!.model.hidden = 0;
    raw.budget.steps = 0;
    raw.seeds.count = 100;
    await page.getByLabel('Open a preset file').setInputFiles({ name: 'broken.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(raw)) });
    const notice = page.locator('ff-notice [role="alert"]');
    await expect.poll(() => notice.textContent()).toMatch(/Could not open broken\.json/);
    expect((await notice.locator('.message').textContent())?.trim()).toBe('3 problems in this file:');
    const listed = await notice.locator('li').allTextContents();
    expect(listed).toHaveLength(3);
    expect(listed).toContain('Arm B (sum) › Hidden width: got 0, allowed at least 1');
    expect(listed).toContain('Setup › Training steps: got 0, allowed at least 1');
    const text = (await notice.textContent()) ?? '';
    for (const item of listed) expect(text.split(item).length - 1, item).toBe(1);

    // Storage: kept runs are promised only where the browser lets the page keep them.
    expect(await page.locator('ff-sheet footer').textContent()).toMatch(/kept in this browser \(IndexedDB\)/);
    const ctx = await browser.newContext({ viewport: { width: 1360, height: 850 } });
    contexts.push(ctx);
    await ctx.addInitScript(() => Object.defineProperty(window, 'indexedDB', { value: undefined }));
    const closed = await ctx.newPage();
    await closed.goto(site.url);
    await closed.waitForSelector('ff-sheet[data-ready="yes"]');
    const footer = (await closed.locator('ff-sheet footer').textContent()) ?? '';
    expect(footer).not.toMatch(/kept in this browser/);
    expect(footer).toMatch(/does not let the page keep runs between visits/);
    expect(await closed.locator('ff-run-options [data-storage-note]').textContent()).toMatch(/last until the tab closes/);
  }, 60_000);

  it('runs again: every run afresh with the same fingerprint; after an edit, only the runs the edit changed', async () => {
    const page = await open(await link(fixture({ base: 51, question: 'Browser test: run again' })));
    await runButton(page).click();
    await waitState(page, 'done');
    const first = await fingerprint(page);
    expect(first).toMatch(/^[0-9a-f]{12}$/);
    // Done is not a dead end: the button invites another run and is enabled.
    expect(await runButton(page).textContent()).toMatch(/Run again/);
    expect(await runButton(page).isEnabled()).toBe(true);
    await runButton(page).click();
    await waitState(page, 'running', 10_000);
    await waitState(page, 'done');
    expect(await page.locator('ff-progress .cell[data-phase="ok"]').count()).toBe(4);
    expect(await page.locator('ff-progress .cell[data-kept="yes"]').count()).toBe(0);
    expect(await fingerprint(page)).toBe(first);

    // One more seed: the four runs the edit left unchanged are reused, only the two new ones run.
    const seeds = page.getByLabel('Seeds per arm', { exact: true });
    await seeds.fill('3');
    await seeds.blur();
    await expect.poll(() => runButton(page).textContent(), { timeout: 5_000 }).toMatch(/Run the 2 missing runs/);
    expect(await page.locator('ff-run-options [data-reused]').getAttribute('data-reused')).toBe('4');
    await runButton(page).click();
    await waitState(page, 'done');
    expect(await page.locator('ff-progress .cell[data-phase="ok"]').count()).toBe(6);
    const details = await page.locator('ff-progress .cell [data-reason]').allTextContents();
    expect(details.filter((d) => /reused/.test(d))).toHaveLength(4);
  }, 150_000);
});
