/**
 * Refreshes the README's screenshots (docs/screenshots/*.png) from a real run:
 * builds the site, opens a shipped preset's share link in Debian's Chromium
 * (never a downloaded browser), presses Run, waits until every run is done,
 * then photographs the sheet's top (question, setup, arms), the evidence, and
 * the probes after "Probe the networks".
 *
 *   npx tsx scripts/screenshots.ts [preset-name] [--log]     (default: quick-demo; --log: errors on a log scale)
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium } from 'playwright-core';
import { validateSpec } from '../src/experiment/check.ts';
import { encodeSpecLink } from '../src/share/link.ts';
import { buildSite, serveStatic } from '../bench/static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS } from '../bench/chromium.ts';

const ROOT = resolve(import.meta.dirname, '..');
const OUT = join(ROOT, 'docs', 'screenshots');
const preset = process.argv.slice(2).find((a) => !a.startsWith('--')) ?? 'quick-demo';

const spec = validateSpec(JSON.parse(readFileSync(join(ROOT, 'presets', `${preset}.json`), 'utf8')));
const fragment = await encodeSpecLink(spec, { base: '' });
const dir = mkdtempSync(join(tmpdir(), 'farfield-shots-'));
await buildSite(dir, 300_000);
const site = await serveStatic(dir);
const browser = await chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
try {
  const page = await browser.newPage({ viewport: { width: 1360, height: 1000 } });
  await page.goto(`${site.url}${fragment.startsWith('#') ? fragment : `#${fragment}`}`);
  await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 60_000 });
  await page.screenshot({ path: join(OUT, 'sheet.png') });
  await page.locator('ff-run-controls button[data-action="run"]').click();
  await page.waitForSelector('ff-sheet[data-state="done"]', { timeout: 30 * 60_000 });
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
  console.log(`screenshots of ${preset} written to ${OUT}`);
} finally {
  await browser.close();
  await site.close();
  rmSync(dir, { recursive: true, force: true });
}
