/**
 * The target A/B preset in headless Chromium, as a user runs it: the built
 * site (vite build), served with the cross-origin isolation headers, opened
 * on the preset's share link, then the sheet's Run button; timed from the
 * click to the sheet's "done" state. The fingerprint is read from the
 * evidence, so the document also shows whether the browser reproduced the
 * CLI's numbers. Uses Debian's /usr/bin/chromium through playwright-core;
 * never downloads a browser.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { validateSpec } from '../src/experiment/check.ts';
import { encodeSpecLink } from '../src/share/link.ts';
import { PRESET_DIR } from './presets.ts';
import { buildSite, serveStatic } from './static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS as ARGS } from './chromium.ts';


export interface BrowserTiming {
  file: string;
  /** Seconds from pressing Run to the sheet's "done" state. */
  wall: number | null;
  /** Seconds to build the site and open the sheet (not part of `wall`). */
  setupSeconds: number | null;
  fingerprint: string | null;
  /** The browser's reported core count (the sheet runs one worker per core by default). */
  hardwareConcurrency: number | null;
  /** Chromium's version string. */
  browser: string | null;
  /** Whether the sheet's workers ran Farfield's SIMD kernels (its engine line). */
  simdKernels: boolean | null;
  error?: string;
}

/** Run `file` (a presets/ name) in headless Chromium and time it; errors are reported in the result, not thrown. */
export async function timePresetInBrowser(file: string, timeoutSeconds: number, log: (line: string) => void): Promise<BrowserTiming> {
  const result: BrowserTiming = { file, wall: null, setupSeconds: null, fingerprint: null, hardwareConcurrency: null, browser: null, simdKernels: null };
  if (!existsSync(CHROMIUM)) return { ...result, error: `no browser at ${CHROMIUM} (install Debian's chromium)` };
  const t0 = performance.now();
  const dir = mkdtempSync(join(tmpdir(), 'farfield-bench-site-'));
  let close: (() => Promise<void>) | null = null;
  try {
    const spec = validateSpec(JSON.parse(readFileSync(join(PRESET_DIR, file), 'utf8')));
    const fragment = await encodeSpecLink(spec, { base: '' });
    log(`browser: building the site`);
    await buildSite(dir, 300_000);
    const site = await serveStatic(dir);
    const { chromium } = await import('playwright-core');
    const browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS, headless: true });
    close = async () => {
      await browser.close().catch(() => undefined);
      await site.close().catch(() => undefined);
    };
    result.browser = browser.version();
    const page = await browser.newPage();
    await page.goto(`${site.url}${fragment.startsWith("#") ? fragment : `#${fragment}`}`);
    await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 60_000 });
    result.hardwareConcurrency = await page.evaluate(() => navigator.hardwareConcurrency);
    result.setupSeconds = (performance.now() - t0) / 1000;
    log(`browser: running ${file} in Chromium ${result.browser}`);
    const start = performance.now();
    await page.locator('ff-run-controls button[data-action="run"]').click();
    await page.waitForSelector('ff-sheet[data-state="done"]', { timeout: timeoutSeconds * 1000 });
    result.wall = (performance.now() - start) / 1000;
    result.fingerprint = await page.locator('ff-evidence').getAttribute('data-fingerprint');
    const simd = await page.locator('[data-engine-simd]').first().getAttribute('data-engine-simd', { timeout: 5_000 }).catch(() => null);
    result.simdKernels = simd == null ? null : simd === 'on';
    return result;
  } catch (error) {
    return { ...result, error: error instanceof Error ? error.message.split('\n')[0] : String(error) };
  } finally {
    if (close) await close();
    rmSync(dir, { recursive: true, force: true });
  }
}
