/**
 * The standalone report in real Chromium, as a reader gets it: a file opened
 * from disk with the network cut off. Every request that is not the file
 * itself is aborted and recorded, and none may be attempted; every figure must
 * be drawn with a real size, the verdict table present, and the page must fit
 * an A4 sheet when printed. The sheet's Report button gives the same kind of
 * file from a run made in the page (the built site, as users get it).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Download } from 'playwright-core';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createRequire } from 'node:module';
import { CHROMIUM, CHROMIUM_ARGS } from '../../bench/chromium.ts';
import { buildSite, serveStatic, type StaticServer } from '../../bench/static-server.ts';
import { validateSpec } from '../../src/experiment/check.ts';
import { encodeSpecLink } from '../../src/share/link.ts';
import { farfield, root, tiny } from '../cli/spawn.ts';

/** A4's width at 96 CSS pixels per inch, less the report's 12 mm print margins. */
const A4_PRINT_WIDTH_PX = Math.floor(((210 - 2 * 12) / 25.4) * 96);

describe.skipIf(!existsSync(CHROMIUM))('standalone report in Chromium, offline', () => {
  let browser: Browser;
  let reportUrl: string;
  let site: Promise<StaticServer>;
  const dir = mkdtempSync(join(tmpdir(), 'ff-report-browser-'));

  beforeAll(async () => {
    // Its own build folder, so this file never races the sheet tests' build.
    const siteDir = join(root, 'test-output', 'site-report');
    site = buildSite(siteDir, 170_000).then(() => serveStatic(siteDir));
    site.catch(() => undefined);
    const results = join(dir, 'results.json');
    const report = join(dir, 'report.html');
    const ran = farfield('run', tiny, '--quiet', '--workers', '2', '--out', results);
    if (ran.code !== 0) throw new Error(`run failed: ${ran.stderr}`);
    const made = farfield('report', results, '--out', report);
    if (made.code !== 0) throw new Error(`report failed: ${made.stderr}`);
    reportUrl = pathToFileURL(report).href;
    browser = await chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
  }, 90_000);

  afterAll(async () => {
    await browser?.close();
    await (await site.catch(() => null))?.close();
  });

  /** Open a report file offline; every request that is not the file is aborted and recorded. */
  async function openOffline(url: string) {
    const context = await browser.newContext({ viewport: { width: 1100, height: 900 }, offline: true });
    const attempted: string[] = [];
    const problems: string[] = [];
    await context.route('**/*', (route) => {
      const requested = route.request().url();
      if (requested.startsWith('file:')) return route.continue();
      attempted.push(requested);
      return route.abort();
    });
    const page = await context.newPage();
    page.on('request', (request) => {
      if (!request.url().startsWith('file:')) attempted.push(request.url());
    });
    page.on('pageerror', (error) => problems.push(error.message));
    page.on('console', (message) => {
      if (message.type() === 'error') problems.push(message.text());
    });
    await page.goto(url, { waitUntil: 'load' });
    const figures = await page.$$eval('figure[data-figure]', (nodes) =>
      nodes.map((node) => {
        const svg = node.querySelector('svg');
        const box = svg?.getBoundingClientRect();
        return { name: node.getAttribute('data-figure'), width: box?.width ?? 0, height: box?.height ?? 0, marks: svg?.querySelectorAll('circle, path, line, rect').length ?? 0 };
      }),
    );
    return { context, page, attempted, problems, figures };
  }

  function expectFigures(figures: Array<{ name: string | null; width: number; height: number; marks: number }>) {
    expect(figures.map((f) => f.name)).toEqual(['curves', 'differences', 'seeds']);
    for (const f of figures) {
      expect(f.width, f.name!).toBeGreaterThan(300);
      expect(f.height, f.name!).toBeGreaterThan(150);
      expect(f.marks, f.name!).toBeGreaterThan(5);
    }
  }

  it('opens from a file URL without a single network request, with every figure and the verdict table', async () => {
    const { context, page, attempted, problems, figures } = await openOffline(reportUrl);
    expectFigures(figures);
    expect(await page.locator('table[data-verdict-table] tbody tr').count()).toBe(2);
    expect(await page.locator('[data-fingerprint]').textContent()).toMatch(/^[0-9a-f]{12}$/);
    expect(await page.locator('h1[data-question]').textContent()).toMatch(/Fixture/);
    expect(attempted).toEqual([]);
    expect(problems).toEqual([]);
    await context.close();
  }, 60_000);

  it('passes an axe-core scan with no serious or critical violations', async () => {
    // The report's policy forbids every script, the scanner's too: this context alone sets it aside.
    const context = await browser.newContext({ viewport: { width: 1100, height: 900 }, offline: true, bypassCSP: true });
    const page = await context.newPage();
    await page.goto(reportUrl, { waitUntil: 'load' });
    await page.addScriptTag({ content: readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8') });
    const violations = await page.evaluate(async () => {
      const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: Array<{ id: string; impact: string | null; nodes: unknown[] }> }> } }).axe;
      return (await axe.run(document, { resultTypes: ['violations'] })).violations.map((v) => ({ id: v.id, impact: v.impact, nodes: v.nodes.length }));
    });
    expect(violations.filter((v) => v.impact === 'serious' || v.impact === 'critical')).toEqual([]);
    await context.close();
  }, 60_000);

  it('fits an A4 page when printed', async () => {
    const context = await browser.newContext({ viewport: { width: A4_PRINT_WIDTH_PX, height: 1000 }, offline: true });
    const page = await context.newPage();
    await page.goto(reportUrl, { waitUntil: 'load' });
    await page.emulateMedia({ media: 'print' });
    const widths = await page.evaluate(() => ({ page: document.documentElement.clientWidth, content: document.documentElement.scrollWidth }));
    expect(widths.content).toBeLessThanOrEqual(widths.page);
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(readFileSync(new URL(reportUrl)).toString()).toContain('size: A4');
    await context.close();
  }, 60_000);

  it('the sheet\'s Report button downloads the same kind of file from a run in the page, and a trained network that the CLI rescores exactly', async () => {
    const served = await site;
    const spec = validateSpec(JSON.parse(readFileSync(tiny, 'utf8')));
    const fragment = await encodeSpecLink(spec, { base: '' });
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, acceptDownloads: true });
    const page = await context.newPage();
    await page.goto(`${served.url}${fragment}`);
    await page.locator('button[data-action="run"]').first().click();
    await page.waitForSelector('ff-sheet[data-state="done"]', { timeout: 120_000 });
    const [download] = await Promise.all([page.waitForEvent('download'), page.locator('button[data-action="export-report"]').click()]);
    expect(download.suggestedFilename()).toMatch(/^farfield-[0-9a-f]{16}-report\.html$/);
    const saved = join(dir, download.suggestedFilename());
    await download.saveAs(saved);

    // A trained network of this run, in TensorFlow.js's weights format: the manifest, then its shard.
    const downloads: Download[] = [];
    page.on('download', (d) => downloads.push(d));
    await page.locator('select[aria-label="Trained network (arm and seed)"]').selectOption({ label: 'sum, seed 4' });
    await page.locator('button[data-action="download-network"]').click();
    await expect.poll(() => downloads.length, { timeout: 10_000 }).toBe(2);
    expect(downloads.map((d) => d.suggestedFilename())).toEqual(['run3-sum-seed4.json', 'run3-sum-seed4.bin']);
    const nets = mkdtempSync(join(dir, 'nets-'));
    for (const d of downloads) await d.saveAs(join(nets, d.suggestedFilename()));
    await context.close();
    // Trained in the page, scored in Node: the same numbers to the last bit.
    const scored = farfield('score', join(nets, 'run3-sum-seed4.json'), '--json');
    expect(scored.code, scored.stderr).toBe(0);
    expect(JSON.parse(scored.stdout)).toMatchObject({ ownLadder: true, reproduces: true });

    const offline = await openOffline(pathToFileURL(saved).href);
    expectFigures(offline.figures);
    expect(await offline.page.locator('table[data-verdict-table] tbody tr').count()).toBe(2);
    // The same spec and engine as the CLI's run: the same fingerprint.
    expect(await offline.page.locator('[data-fingerprint]').textContent()).toBe(JSON.parse(readFileSync(join(dir, 'results.json'), 'utf8')).fingerprint);
    expect(offline.attempted).toEqual([]);
    expect(offline.problems).toEqual([]);
    await offline.context.close();
  }, 180_000);
});
