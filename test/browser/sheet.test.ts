/**
 * The experiment sheet in real Chromium: the BUILT site (vite build once,
 * served by a small static server with COOP/COEP headers), driven through
 * playwright-core with Debian's /usr/bin/chromium. Each test gets a fresh
 * browser context, so IndexedDB starts empty unless the test reloads.
 *
 * The share-link test also runs the CLI on the same link and compares
 * fingerprints: one engine, two hosts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { execFile } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { validateSpec } from '../../src/experiment/check.ts';
import type { ExperimentSpec } from '../../src/experiment/spec.ts';
import { encodeSpecLink } from '../../src/share/link.ts';
import { buildSite, serveStatic, type StaticServer } from '../../bench/static-server.ts';
import { CHROMIUM, CHROMIUM_ARGS as ARGS } from '../../bench/chromium.ts';
import { MAX_START_FAILURES } from '../../src/experiment/worker-pool-core.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const SITE = join(ROOT, 'test-output', 'site');
const SHOTS = join(ROOT, 'test-output');

/** The quick fixture (2 arms × 2 seeds × 20 steps on tiny graphs), with a few fields changed per test so kept runs never leak between tests. */
function quickSpec(change: { base?: number; count?: number; question?: string } = {}): ExperimentSpec {
  const raw = JSON.parse(readFileSync(join(ROOT, 'test/fixtures/browser-quick.json'), 'utf8')) as Record<string, unknown> & { seeds: { count: number; base: number }; question: string };
  return validateSpec({
    ...raw,
    question: change.question ?? raw.question,
    seeds: { count: change.count ?? raw.seeds.count, base: change.base ?? raw.seeds.base },
  });
}

function run(command: string, args: string[], timeoutMs: number): Promise<string> {
  return new Promise((ok, fail) => {
    execFile(command, args, { cwd: ROOT, timeout: timeoutMs, maxBuffer: 64 * 1024 * 1024 }, (error, stdout, stderr) => {
      if (error) fail(new Error(`${command} ${args.join(' ').slice(0, 80)} failed: ${error.message}\n${stderr}`));
      else ok(stdout);
    });
  });
}

describe.skipIf(!existsSync(CHROMIUM))('experiment sheet in Chromium (built site)', () => {
  let site: StaticServer;
  let browser: Browser;
  let quickFragment: string;
  let cliFingerprint: Promise<string>;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[] = [];

  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    quickFragment = (await encodeSpecLink(quickSpec(), { base: '' })).replace(/^#/, '');
    // The CLI run starts now and overlaps the build; the share-link test awaits it.
    cliFingerprint = run(process.execPath, ['bin/farfield.mjs', 'run', `#${quickFragment}`, '--json', '--quiet'], 170_000).then(
      (out) => (JSON.parse(out) as { fingerprint: string }).fingerprint,
    );
    cliFingerprint.catch(() => undefined);
    await buildSite(SITE, 170_000);
    site = await serveStatic(SITE);
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS, headless: true });
  }, 180_000);

  afterAll(async () => {
    for (const c of contexts) await c.close().catch(() => undefined);
    await browser?.close();
    await site?.close();
  });

  async function open(path: string, context?: BrowserContext): Promise<Page> {
    const ctx = context ?? (await browser.newContext({ viewport: { width: 1360, height: 900 } }));
    if (!context) contexts.push(ctx);
    const page = await ctx.newPage();
    page.on('pageerror', (e) => pageErrors.push(`${path}: ${e.message}`));
    // A Content-Security-Policy refusal is only a console message: count it as an error too.
    page.on('console', (m) => {
      if (m.type() === 'error' && /Content Security Policy|Refused to/i.test(m.text())) pageErrors.push(`${path}: ${m.text()}`);
    });
    await page.goto(site.url + path);
    await page.waitForSelector('ff-sheet[data-ready="yes"]', { timeout: 30_000 });
    return page;
  }

  const state = (page: Page) => page.locator('ff-sheet').getAttribute('data-state');
  const waitState = (page: Page, wanted: string, timeout = 90_000) => page.waitForSelector(`ff-sheet[data-state="${wanted}"]`, { timeout });
  const fingerprint = (page: Page) => page.locator('ff-evidence').getAttribute('data-fingerprint');
  const runButton = (page: Page) => page.locator('ff-run-controls button[data-action="run"]');
  const cells = (page: Page, phase: string) => page.locator(`ff-progress .cell[data-phase="${phase}"]`);

  async function setField(page: Page, label: string, value: string) {
    const field = page.getByLabel(label, { exact: true });
    await field.fill(value);
    await field.blur();
  }

  it('loads the quick demo, runs a quick setup made in the sheet, and shows curves and a verdict', async () => {
    const page = await open('');
    // A first visit gets the quick demo; the full experiment is one click away in the run bar, and back.
    expect(await page.getByLabel('Question', { exact: true }).inputValue()).toMatch(/^Quick demo: .*max aggregation hold up better than sum/);
    await page.locator('ff-run-controls button[data-action="switch-preset"]').click();
    await expect.poll(() => page.getByLabel('Question', { exact: true }).inputValue()).toMatch(/max aggregation extrapolate better than sum/);
    expect(await page.locator('ff-run-controls [data-estimate]').textContent()).toMatch(/^≈ \d+ (s|min) on \d+ workers?$/);
    await page.locator('ff-run-controls button[data-action="switch-preset"]').click();
    await expect.poll(() => page.getByLabel('Question', { exact: true }).inputValue()).toMatch(/^Quick demo/);
    expect(await state(page)).toBe('idle');
    // Every presets/*.json is offered.
    const presetFiles = readdirSync(join(ROOT, 'presets')).filter((f) => f.endsWith('.json'));
    const offered = await page.getByLabel('Preset experiment').locator('option').allTextContents();
    for (const f of presetFiles) expect(offered.map((o) => o.trim())).toContain(f.replace(/\.json$/, ''));

    // Shrink the default experiment through the sheet itself.
    await setField(page, 'Smallest training graph (nodes)', '5');
    await setField(page, 'Largest training graph (nodes)', '8');
    await setField(page, 'Training graphs per seed', '32');
    await setField(page, 'Test sizes (nodes, comma-separated)', '8, 12, 16');
    await setField(page, 'Test graphs per size', '4');
    await setField(page, 'Validation graphs', '8');
    await setField(page, 'Seeds per arm', '2');
    await setField(page, 'Training steps', '20');
    await setField(page, 'Graphs per batch', '8');
    await setField(page, 'Validate every k steps (0: keep the last weights)', '10');
    for (const arm of ['max', 'sum']) {
      await setField(page, `Hidden width, arm ${arm}`, '8');
      await setField(page, `Training step jitter, arm ${arm}`, '2');
    }
    await expect.poll(() => runButton(page).textContent(), { timeout: 5_000 }).toMatch(/Run 4 runs/);
    await runButton(page).click();
    await waitState(page, 'running', 10_000);
    await waitState(page, 'done');

    const evidence = page.locator('ff-evidence');
    expect(await evidence.locator('ff-figure svg[role], ff-figure svg').count()).toBeGreaterThanOrEqual(3);
    expect(await evidence.locator('ff-verdict-table tbody tr').count()).toBe(3);
    // Two seeds cannot reach significance: the caveat is on screen, with its reason.
    const caveat = evidence.locator('[data-caveat="too-few-seeds"]');
    await expect.poll(() => caveat.textContent()).toMatch(/Too few seeds to tell.*smallest possible two-sided signed-rank p is 0\.5/s);
    expect(await fingerprint(page)).toMatch(/^[0-9a-f]{12}$/);
    // What shifted, next to the node counts.
    expect(await evidence.locator('ff-verdict-table tbody tr').first().textContent()).toMatch(/depth [\d.]+ · degree [\d.]+/);
    // The fit gate per arm, in words, above the verdicts; raw and Holm-adjusted p side by side.
    const gates = evidence.locator('ff-fit-gate li[data-gate]');
    expect(await gates.count()).toBe(2);
    for (const text of await gates.allTextContents()) expect(text).toMatch(/^\s*(max|sum): (fitted|not fitted) — in-distribution relative error [\d.]+%/);
    expect(await evidence.locator('ff-verdict-table thead').textContent()).toMatch(/best constant.*p \(raw\).*p \(Holm, 3 tests\)/s);
    expect(await evidence.locator('ff-verdict-table [data-adjustment-note]').textContent()).toMatch(/Holm–Bonferroni/);
    await page.screenshot({ path: join(SHOTS, 'sheet-quick-run.png'), fullPage: true });

    // Exports: every figure as SVG and PNG; results as the CLI's JSON document and as CSV.
    const saved = async (click: () => Promise<void>) => {
      const [download] = await Promise.all([page.waitForEvent('download'), click()]);
      const path = join(SHOTS, download.suggestedFilename());
      await download.saveAs(path);
      return { name: download.suggestedFilename(), bytes: readFileSync(path) };
    };
    const svg = await saved(() => page.getByRole('button', { name: 'Export figure 1 as SVG' }).click());
    expect(svg.name).toMatch(/-curves\.svg$/);
    expect(svg.bytes.toString('utf8')).toMatch(/^<svg[^>]*xmlns="http:\/\/www.w3.org\/2000\/svg"/);
    const png = await saved(() => page.getByRole('button', { name: 'Export figure 2 as PNG' }).click());
    expect([...png.bytes.subarray(0, 4)]).toEqual([0x89, 0x50, 0x4e, 0x47]);
    const json = await saved(() => page.locator('ff-share button[data-action="export-json"]').click());
    const doc = JSON.parse(json.bytes.toString('utf8')) as { kind: string; engine: { host: string }; fingerprint: string; runs: unknown[]; complete: boolean };
    expect(doc.kind).toBe('farfield-results');
    expect(doc.engine.host).toBe('browser');
    expect(doc.complete).toBe(true);
    expect(doc.runs).toHaveLength(4);
    expect(doc.fingerprint).toBe(await fingerprint(page));
    const csv = await saved(() => page.locator('ff-share button[data-action="export-csv"]').click());
    const lines = csv.bytes.toString('utf8').trim().split('\n');
    expect(lines[0]).toMatch(/^spec_hash,run,arm,seed,status/);
    // Per run: an in-distribution row, a validation row and one row per rung.
    expect(lines).toHaveLength(1 + 4 * (2 + 3));
    expect(lines[0]).toMatch(/,best_constant_mae,.*,arm_fitted$/);
  }, 150_000);

  it('opens a share link without running it, and its run gives the CLI fingerprint', async () => {
    const cli = await cliFingerprint;
    expect(cli).toMatch(/^[0-9a-f]{12}$/);
    const page = await open(`#${quickFragment}&fp=${cli}`);
    expect(await page.getByLabel('Question', { exact: true }).inputValue()).toBe(quickSpec().question);
    await expect.poll(() => page.locator('[data-link-banner]').textContent()).toMatch(/Nothing runs until you press/);
    // Nothing starts by itself.
    await page.waitForTimeout(1_500);
    expect(await state(page)).toBe('idle');
    expect(await cells(page, 'running').count()).toBe(0);
    expect(await runButton(page).textContent()).toMatch(/Run 4 runs/);

    await runButton(page).click();
    await waitState(page, 'done');
    expect(await fingerprint(page)).toBe(cli);
    expect(await page.locator('ff-share [data-fingerprint-check]').getAttribute('data-fingerprint-check')).toBe('match');
    // The sheet's own share link now carries the fingerprint.
    await expect.poll(() => page.getByLabel('Share link').inputValue()).toContain(`&fp=${cli}`);
  }, 200_000);

  it('cancels mid-run at once, keeps finished runs across a reload, and runs only the missing ones', async () => {
    const spec = quickSpec({ base: 11, count: 3, question: 'Browser test: cancel and keep' });
    const fragment = await encodeSpecLink(spec, { base: '' });
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    contexts.push(context);
    const page = await open(fragment, context);
    await page.getByLabel('Workers (runs at a time)').selectOption('1');
    await runButton(page).click();
    await expect.poll(() => cells(page, 'ok').count(), { timeout: 60_000, interval: 100 }).toBeGreaterThanOrEqual(2);
    await page.locator('ff-run-controls button[data-action="cancel"]').click();
    await waitState(page, 'cancelled', 2_000);
    const kept = await cells(page, 'ok').count();
    expect(kept).toBeGreaterThanOrEqual(2);
    expect(kept).toBeLessThan(6);
    expect(await cells(page, 'running').count()).toBe(0);
    // Cancelled means stopped: no run finishes afterwards.
    await page.waitForTimeout(2_500);
    expect(await cells(page, 'ok').count()).toBe(kept);

    await page.reload();
    await page.waitForSelector('ff-sheet[data-ready="yes"]');
    await expect.poll(() => page.locator('ff-progress .cell[data-kept="yes"]').count(), { timeout: 10_000 }).toBe(kept);
    expect(await page.locator('ff-run-options [data-kept]').getAttribute('data-kept')).toBe(String(kept));
    expect(await runButton(page).textContent()).toContain(`Run the ${6 - kept} missing run`);
    // Kept runs already show as evidence before anything runs.
    expect(await page.locator('ff-evidence [data-headline]').count()).toBe(1);

    await runButton(page).click();
    await waitState(page, 'done');
    expect(await cells(page, 'ok').count()).toBe(6);
    expect(await page.locator('ff-progress .cell[data-kept="yes"]').count()).toBe(kept);
    expect(await fingerprint(page)).toMatch(/^[0-9a-f]{12}$/);
  }, 150_000);

  it('gives every control an accessible name', async () => {
    const page = await open('');
    // Walks every shadow root: inputs, selects, textareas and buttons need a label, aria-label(ledby) or text.
    const unnamed = (await page.evaluate(`(() => {
      const missing = [];
      function walk(root) {
        for (const el of root.querySelectorAll('input, select, textarea, button')) {
          const text = el.tagName === 'BUTTON' ? el.textContent.trim() : '';
          const labelled = el.getAttribute('aria-label') || el.getAttribute('aria-labelledby') || (el.labels && el.labels.length > 0) || text;
          if (!labelled) missing.push(el.outerHTML.slice(0, 120));
        }
        for (const el of root.querySelectorAll('*')) if (el.shadowRoot) walk(el.shadowRoot);
      }
      walk(document);
      return missing;
    })()`)) as string[];
    expect(unnamed).toEqual([]);
    // Keyboard: Tab reaches the Run button through the setup and arm fields.
    const deepFocus = `(() => { let a = document.activeElement; while (a && a.shadowRoot && a.shadowRoot.activeElement) a = a.shadowRoot.activeElement; return a ? (a.getAttribute('data-action') || a.tagName) : ''; })()`;
    let reached = false;
    for (let i = 0; i < 120 && !reached; i++) {
      await page.keyboard.press('Tab');
      reached = (await page.evaluate(deepFocus)) === 'run';
    }
    expect(reached).toBe(true);
    expect(await state(page)).toBe('idle');
  }, 30_000);

  it('shows a clear error and the default sheet for a corrupted share link', async () => {
    for (const bad of [`#${quickFragment.slice(0, 60)}`, '#ff1.this-is-not-a-farfield-link!', '#ff9.AAAA']) {
      const page = await open(bad);
      const notice = page.locator('ff-notice [role="alert"]');
      await expect.poll(() => notice.textContent()).toMatch(/This share link could not be opened/);
      expect(await notice.textContent()).toMatch(/default experiment is shown below/);
      expect(await page.getByLabel('Question', { exact: true }).inputValue()).toMatch(/^Quick demo/);
      expect(await state(page)).toBe('idle');
      expect(await runButton(page).isEnabled()).toBe(true);
      await page.close();
    }
  }, 60_000);

  it('reports a worker that throws, and one that dies, as failed runs while the others complete', async () => {
    const spec = quickSpec({ base: 21, question: 'Browser test: faults' });
    const fragment = await encodeSpecLink(spec, { base: '' });
    const page = await open(`?fault=1:throw,2:exit${fragment}`);
    await runButton(page).click();
    await waitState(page, 'done');
    const thrown = page.locator('ff-progress .cell[data-run="1"]');
    const died = page.locator('ff-progress .cell[data-run="2"]');
    expect(await thrown.getAttribute('data-phase')).toBe('failed');
    expect(await thrown.locator('[data-reason]').textContent()).toMatch(/deliberate fault injected into run 1/);
    expect(await died.getAttribute('data-phase')).toBe('failed');
    expect(await died.locator('[data-reason]').textContent()).toMatch(/worker crashed/);
    expect(await cells(page, 'ok').count()).toBe(2);
    expect(await page.locator('ff-evidence [data-failure]').count()).toBe(2);
    // A failed run is not kept: the sheet offers to run exactly those two again.
    expect(await runButton(page).textContent()).toContain('Run the 2 missing runs');
  }, 120_000);

  it('gives up on workers that die before they are ready: every run fails with the reason and the sheet settles', async () => {
    const spec = quickSpec({ base: 23, question: 'Browser test: workers that die while loading' });
    const runs = spec.arms.length * spec.seeds.count;
    const fragment = await encodeSpecLink(spec, { base: '' });
    // `?fault=load` (test mode, query only): every run worker throws while loading.
    const page = await open(`?fault=load${fragment}`);
    expect(await page.locator('[data-fault-banner]').textContent()).toMatch(/throw while loading/);
    let starts = 0;
    page.on('worker', (worker) => {
      if (/browser-worker/.test(worker.url())) starts++;
    });
    await runButton(page).click();
    // The pool gives up after MAX_START_FAILURES deaths; without that rule it would start workers forever.
    await waitState(page, 'done', 30_000);
    expect(await cells(page, 'failed').count()).toBe(runs);
    expect(await cells(page, 'ok').count()).toBe(0);
    const reasons = await page.locator('ff-progress .cell[data-phase="failed"] [data-reason]').allTextContents();
    expect(reasons).toHaveLength(runs);
    for (const reason of reasons) {
      expect(reason).toMatch(new RegExp(`workers die before they are ready \\(${MAX_START_FAILURES} tries\\)`));
      expect(reason).toMatch(/worker crashed/);
    }
    // Bounded starts: at most one per run at first, plus a replacement for each death before the limit.
    expect(starts).toBeLessThanOrEqual(Math.min(runs, 16) + MAX_START_FAILURES - 1);
    // The sheet stays settled, and the failed runs can be tried again.
    await page.waitForTimeout(1_000);
    expect(await state(page)).toBe('done');
    expect(await runButton(page).isEnabled()).toBe(true);
    expect(await runButton(page).textContent()).toMatch(new RegExp(`Run (the )?${runs} (missing )?runs`));
    console.log(`load-fault test: ${starts} worker starts seen for ${runs} runs; reason: ${reasons[0]}`);
  }, 60_000);

  it('raised no uncaught page errors and no Content-Security-Policy refusals', () => {
    expect(pageErrors).toEqual([]);
  });
});
