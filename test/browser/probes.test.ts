/**
 * "Probe the networks" in real Chromium (built site, Debian's /usr/bin/chromium via
 * playwright-core, as in sheet.test.ts): the tiny probe fixture opened from a
 * share link, the probes run in a Web Worker, and the sheet shows the three
 * probe figures, the audit table and the alignment trace, whose step slider
 * works from the keyboard. Screenshot: test-output/probes.png.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser } from 'playwright-core';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { validateSpec } from '../../src/experiment/check.ts';
import { encodeSpecLink } from '../../src/share/link.ts';
import { buildSite, serveStatic, type StaticServer } from '../../bench/static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS as ARGS } from '../../bench/chromium.ts';

const ROOT = resolve(import.meta.dirname, '../..');
// Its own build directory: sheet.test.ts may be building test-output/site at the same time.
const SITE = join(ROOT, 'test-output', 'site-probes');
const SHOTS = join(ROOT, 'test-output');

describe.skipIf(!existsSync(CHROMIUM))('probe the networks: probes, audit and alignment trace in Chromium', () => {
  let site: StaticServer;
  let browser: Browser;

  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    await buildSite(SITE, 80_000);
    site = await serveStatic(SITE);
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS, headless: true });
  }, 90_000);

  afterAll(async () => {
    await browser?.close();
    await site?.close();
  });

  it('runs the probes in a worker and shows three probe figures, the audit and a trace with a working slider', async () => {
    const spec = validateSpec(JSON.parse(readFileSync(join(ROOT, 'test/fixtures/tiny-probe.json'), 'utf8')));
    const fragment = await encodeSpecLink(spec, { base: '' });
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    await page.goto(site.url + fragment);
    await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 30_000 });
    expect(await page.getByLabel('Question', { exact: true }).inputValue()).toBe(spec.question);

    const probes = page.locator('ff-probes');
    const look = page.getByRole('button', { name: /Probe the networks/ });
    await look.scrollIntoViewIfNeeded();
    await look.click();
    // Progress shows while the worker trains; the page keeps answering meanwhile.
    await page.waitForSelector('ff-probes [data-probe-progress], ff-probes [data-probe-doc]', { timeout: 20_000 });
    expect(await page.evaluate(() => 1 + 1)).toBe(2);

    await page.waitForSelector('ff-probes ff-audit-table tbody tr', { timeout: 60_000 });
    expect(await probes.locator('[data-probe-error]').count()).toBe(0);
    expect(await probes.locator('[data-probe]').count()).toBe(3);
    await expect.poll(() => probes.locator('[data-probe] ff-figure svg').count()).toBeGreaterThanOrEqual(3);
    // Each probe figure names its arms inside the SVG (letter, marker, dash), and its ticks are plain decimals, never "10m".
    const keys = probes.locator('[data-probe] ff-figure svg g[data-key="arms"]');
    expect(await keys.count()).toBe(3);
    for (const text of await keys.allTextContents()) expect(text.replace(/\s+/g, ' ')).toMatch(/A max.*B sum/);
    const texts = await probes.locator('[data-probe] ff-figure svg text').allTextContents();
    expect(texts.filter((t) => /^[−-]?\d+(\.\d+)?[mµμkMG]$/.test(t.trim()))).toEqual([]);
    // Every arm has audit rows, each with a pass mark.
    const rows = probes.locator('ff-audit-table tbody tr');
    expect(await rows.count()).toBeGreaterThanOrEqual(2);
    expect(await probes.locator('ff-audit-table tbody tr[data-arm="max"]').count()).toBeGreaterThan(0);
    expect(await probes.locator('ff-audit-table tbody tr[data-arm="sum"]').count()).toBeGreaterThan(0);
    for (const mark of await probes.locator('ff-audit-table td.pass').allTextContents()) expect(mark.trim()).toMatch(/^[✓✗—]$/);

    // The trace: a labelled slider, keyboard-driven; the step and its MAE follow.
    const slider = page.getByLabel('Message-passing step k');
    await slider.waitFor({ timeout: 10_000 });
    const now = probes.locator('ff-trace .now');
    const lastK = Number(await now.getAttribute('data-trace-step'));
    expect(lastK).toBeGreaterThan(0);
    expect(await probes.locator('ff-trace svg[role="img"] g[data-node]').count()).toBeGreaterThanOrEqual(5);
    await slider.focus();
    await page.keyboard.press('Home');
    await expect.poll(() => now.getAttribute('data-trace-step')).toBe('0');
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => now.getAttribute('data-trace-step')).toBe(String(Math.min(2, lastK)));
    expect(await now.textContent()).toMatch(/k = \d+ of \d+ · MAE/);

    // Exports like every figure: the trace as SVG.
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Export figure 7 as SVG' }).click()]);
    expect(download.suggestedFilename()).toMatch(/trace-max-k\d+\.svg$/);

    await probes.evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await page.waitForTimeout(300);
    const box = await probes.boundingBox();
    const scroll = await page.evaluate(() => window.scrollY);
    await page.setViewportSize({ width: 1360, height: Math.ceil((box?.height ?? 900) + 40) });
    await probes.evaluate((el) => el.scrollIntoView({ block: 'start' }));
    void scroll;
    await page.mouse.move(1, 1);
    await page.waitForTimeout(300);
    await probes.screenshot({ path: join(SHOTS, 'probes.png') });
    expect(errors).toEqual([]);
    await context.close();
  }, 85_000);
});
