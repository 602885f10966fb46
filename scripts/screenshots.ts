/**
 * Refreshes the README's screenshots (docs/screenshots/*.png) from a real run:
 * builds the site, opens the sheet in Debian's Chromium (never a downloaded
 * browser), picks a shipped preset as a reader would, presses Run, waits until every run is done,
 * then photographs the sheet's top (run bar, question, setup, arms), the
 * evidence, and the probes after "Probe the networks"; and the same sheet on
 * a 390 px phone screen once the runs are in (kept runs: nothing reruns).
 *
 *   npx tsx scripts/screenshots.ts [preset-name] [--log]     (default: shortest-path-max-vs-sum; --log: errors on a log scale)
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium } from 'playwright-core';
import { validateSpec } from '../src/experiment/check.ts';
import { buildSite, serveStatic } from '../bench/static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS } from '../bench/chromium.ts';

const ROOT = resolve(import.meta.dirname, '..');
const OUT = join(ROOT, 'docs', 'screenshots');
const preset = process.argv.slice(2).find((a) => !a.startsWith('--')) ?? 'shortest-path-max-vs-sum';

// Checked here so a misspelt name fails before the build.
validateSpec(JSON.parse(readFileSync(join(ROOT, 'presets', `${preset}.json`), 'utf8')));
const dir = mkdtempSync(join(tmpdir(), 'farfield-shots-'));
await buildSite(dir, 300_000);
const site = await serveStatic(dir);
const browser = await chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
try {
  const context = await browser.newContext({ viewport: { width: 1360, height: 1000 } });
  const page = await context.newPage();
  await page.goto(site.url);
  await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 60_000 });
  await page.getByLabel('Preset experiment').selectOption(preset);
  await page.waitForFunction((id) => document.querySelector('ff-sheet')?.shadowRoot?.querySelector('ff-masthead')?.getAttribute('selected') === id, preset);
  await page.screenshot({ path: join(OUT, 'sheet.png') });
  await page.locator('ff-run-controls button[data-action="run"]').click();
  await page.waitForSelector('ff-sheet[data-state="done"]', { timeout: 30 * 60_000 });
  // The run bar stays in view while scrolling; for pictures of single sections let it scroll away with the page.
  await page.locator('ff-run-controls').evaluate((bar) => ((bar as HTMLElement).style.position = 'static'));
  const evidence = page.locator('ff-evidence');
  await evidence.scrollIntoViewIfNeeded();
  // Errors of a blown-up seed span decades: the log scale keeps every arm's curve readable.
  if (process.argv.includes('--log')) await page.getByLabel('Log scale for errors').check();
  await page.waitForTimeout(300);
  await evidence.screenshot({ path: join(OUT, 'evidence.png') });
  await page.getByRole('button', { name: /Probe the networks/ }).click();
  await page.waitForSelector('ff-probes ff-audit-table tbody tr', { timeout: 10 * 60_000 });
  await page.waitForTimeout(500);
  await page.locator('ff-probes').screenshot({ path: join(OUT, 'probes.png') });
  // A phone: the same address in a 390 px window of the same browser context shares the kept runs, so the evidence shows at once.
  const phone = await context.newPage();
  await phone.setViewportSize({ width: 390, height: 844 });
  await phone.goto(page.url());
  await phone.waitForSelector('ff-sheet[data-ready="yes"][data-state="done"]', { timeout: 60_000 });
  await phone.locator('ff-evidence [data-headline]').first().scrollIntoViewIfNeeded();
  await phone.waitForTimeout(500);
  await phone.screenshot({ path: join(OUT, 'sheet-narrow.png') });
  console.log(`screenshots of ${preset} written to ${OUT}`);
} finally {
  await browser.close();
  await site.close();
  rmSync(dir, { recursive: true, force: true });
}
