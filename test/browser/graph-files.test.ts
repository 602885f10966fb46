/**
 * Graph files in the sheet, in real Chromium (the built site, Debian's
 * /usr/bin/chromium through playwright-core): a share link that names a graph
 * file asks for it; a file whose hash differs is refused; the right file,
 * picked or dropped, stays in the page, runs go to the page's own workers, and
 * the file's rung appears in the verdict table and the figures. Also checks
 * that the GraphML reader (xmldom, no DOMParser needed) parses in the browser.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Page } from 'playwright-core';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { validateSpec } from '../../src/experiment/check.ts';
import { encodeSpecLink } from '../../src/share/link.ts';
import { contentHash } from '../../src/graphs/files/read.ts';
import { buildSite, serveStatic, type StaticServer } from '../../bench/static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS as ARGS } from '../../bench/chromium.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const SITE = join(ROOT, 'test-output', 'site-graph-files');

/** A ring of 20 nodes with one chord: a rung size (20) no generated rung of the fixture has. */
const RING = ['source,target,weight', ...Array.from({ length: 20 }, (_, i) => `r${i},r${(i + 1) % 20},${1 + (i % 4)}`), 'r0,r10,3', ''].join('\n');

describe.skipIf(!existsSync(CHROMIUM))('graph files in the sheet (Chromium, built site)', () => {
  let site: StaticServer;
  let browser: Browser;
  let fragment: string;
  const pageErrors: string[] = [];

  beforeAll(async () => {
    mkdirSync(SITE, { recursive: true });
    const raw = JSON.parse(readFileSync(join(ROOT, 'test/fixtures/browser-quick.json'), 'utf8')) as Record<string, unknown> & { test: Record<string, unknown> };
    const spec = validateSpec({
      ...raw,
      question: 'Browser test: graph files as rungs',
      seeds: { count: 2, base: 41 },
      test: { ...raw.test, files: [{ name: 'ring.csv', source: 'r0', sha256: await contentHash(RING) }] },
    });
    fragment = (await encodeSpecLink(spec, { base: '' })).replace(/^#/, '');
    await buildSite(SITE, 170_000);
    site = await serveStatic(SITE);
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS, headless: true });
  }, 180_000);

  afterAll(async () => {
    await browser?.close();
    await site?.close();
  });

  async function open(path: string): Promise<Page> {
    const page = await (await browser.newContext({ viewport: { width: 1360, height: 900 } })).newPage();
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.goto(site.url + path);
    await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 30_000 });
    return page;
  }

  it('a link asks for its file, refuses a different one, takes a dropped one and scores it as a rung', async () => {
    const page = await open(`#${fragment}`);
    const files = page.locator('ff-graph-files');
    const text = async (name: string) => (await files.locator(`li[data-file="${name}"]`).textContent())?.replace(/\s+/g, ' ');
    await expect.poll(() => text('ring.csv')).toMatch(/ring\.csv sha256 [0-9a-f]{12}… missing: drop or pick ring\.csv/);

    // Picking an edited file: refused, with both hashes.
    await page.getByLabel('Pick graph files').setInputFiles({ name: 'ring.csv', mimeType: 'text/csv', buffer: Buffer.from(RING.replace('r0,r10,3', 'r0,r10,4')) });
    await expect.poll(() => files.locator('[role="alert"]').textContent()).toMatch(/^ring\.csv does not match the file this experiment names: it records sha256 [0-9a-f]{12}…, this file is [0-9a-f]{12}…/);

    // Dropping the right file: kept, ready.
    const transfer = await page.evaluateHandle((text) => {
      const dt = new DataTransfer();
      dt.items.add(new File([text], 'ring.csv', { type: 'text/csv' }));
      return dt;
    }, RING);
    await files.locator('[data-testid="graph-drop"]').dispatchEvent('drop', { dataTransfer: transfer });
    await expect.poll(() => files.locator('[role="status"]').textContent()).toBe("ring.csv: 20 nodes, 21 edges; 20 reachable from source 'r0'. Kept in this page only.");
    expect(await text('ring.csv')).toContain('ready');

    await page.locator('ff-run-controls button[data-action="run"]').click();
    await page.waitForSelector('ff-sheet[data-state="done"]', { timeout: 120_000 });
    expect(await page.locator('ff-progress .cell[data-phase="ok"]').count()).toBe(4);
    // The file's rung (20 nodes) in the verdict table and on the figures' size axes.
    expect(await page.locator('ff-verdict-table tr[data-size="20"]').first().textContent()).toContain('ring.csv, n = 20');
    const ticks = await page.locator('ff-evidence ff-figure svg text').allTextContents();
    // Each of the three figures labels the rung: the file's name over "20" and "depth 5" on the two size axes
    // (the tick's lines read back joined), "n = 20" on the per-seed panels.
    expect(ticks.filter((t) => /^ring\.csv20depth /.test(t)).length).toBe(2);
    expect(ticks.filter((t) => t === 'n = 20').length).toBe(1);
    expect(pageErrors).toEqual([]);
  }, 180_000);

  it('a shipped preset that names shipped example graphs finds them in the page, hashed as the CLI hashes them', async () => {
    const page = await open('');
    await page.getByLabel('Preset experiment').selectOption('us-borders-max-vs-sum');
    const files = page.locator('ff-graph-files');
    for (const name of ['graphs/us-states.csv', 'graphs/us-counties.gr']) {
      const sha = await contentHash(readFileSync(join(ROOT, 'presets', name)));
      await expect.poll(async () => (await files.locator(`li[data-file="${name}"]`).textContent())?.replace(/\s+/g, ' '), { timeout: 15_000 }).toContain(`sha256 ${sha.slice(0, 12)}… ready`);
    }
    expect(pageErrors).toEqual([]);
  }, 60_000);

  it('the GraphML reader works in the page (no DOMParser needed; workers have none)', async () => {
    const page = await open('');
    const made = `<?xml version="1.0"?><graphml xmlns="http://graphml.graphdrawing.org/xmlns"><key id="w" for="edge" attr.name="weight" attr.type="double"/><graph edgedefault="undirected"><node id="a"/><node id="b"/><edge source="a" target="b"><data key="w">2</data></edge></graph></graphml>`;
    // The sheet bundles the readers; drive them through the component with a picked GraphML file.
    await page.getByLabel('Pick graph files').setInputFiles({ name: 'pair.graphml', mimeType: 'application/xml', buffer: Buffer.from(made) });
    await expect.poll(() => page.locator('ff-graph-files [role="status"]').textContent()).toBe("pair.graphml: 2 nodes, 1 edges; 2 reachable from source 'a'. Kept in this page only.");
    expect(pageErrors).toEqual([]);
  }, 60_000);
});
