/**
 * `farfield report`: a real results file from the tiny fixture becomes one
 * self-contained HTML file (no address to fetch anything from, every figure
 * as inline SVG, the verdict table), and bad results files are refused with
 * the field named.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { farfield, tiny } from './spawn.ts';

/** Every place a file could make a browser fetch something. */
function externalReferences(html: string): string[] {
  const patterns = [
    /\b(?:src|href|xlink:href|action|poster|data)\s*=\s*["']?\s*(?:https?:)?\/\//gi,
    /url\(\s*["']?\s*(?:https?:)?\/\//gi,
    /@import/gi,
    /<script\b/gi,
    /<link\b/gi,
    /<iframe\b/gi,
  ];
  return patterns.flatMap((re) => html.match(re) ?? []);
}

describe('farfield report', () => {
  const dir = mkdtempSync(join(tmpdir(), 'ff-report-'));
  const results = join(dir, 'results.json');
  const ran = farfield('run', tiny, '--quiet', '--workers', '2', '--out', results);
  const out = join(dir, 'report.html');
  const made = farfield('report', results, '--out', out);
  const html = made.code === 0 ? readFileSync(out, 'utf8') : '';
  const doc = JSON.parse(readFileSync(results, 'utf8')) as { fingerprint: string; specHash: string; spec: { question: string } };

  it('writes one self-contained HTML file: nothing to fetch, no script', () => {
    expect(ran.code).toBe(0);
    expect(made.code, made.stderr).toBe(0);
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(externalReferences(html)).toEqual([]);
    // A policy that forbids loading anything, should a future change slip something in.
    expect(html).toContain(`content="default-src 'none'`);
    // No dates, no random ids: the same results give the same file, byte for byte.
    expect(farfield('report', results).stdout).toBe(html);
  });

  it('holds every figure as inline SVG, the verdict table, the question, fingerprint and share link', () => {
    const figures = [...html.matchAll(/<figure class="fig" data-figure="(\w+)">([\s\S]*?)<\/figure>/g)];
    expect(figures.map((f) => f[1])).toEqual(['curves', 'differences', 'seeds']);
    for (const f of figures) expect(f[2]).toMatch(/<svg[^>]*viewBox/);
    expect(html).toContain('data-verdict-table');
    expect([...html.matchAll(/<tr data-kind="too-few-seeds">/g)]).toHaveLength(2);
    expect(html).toContain('Too few seeds to tell.');
    expect(html).toContain('not fitted');
    expect(html).toContain('data-baselines');
    expect(html).toContain(doc.spec.question);
    expect(html).toContain(`<code class="fp" data-fingerprint>${doc.fingerprint}</code>`);
    expect(html).toMatch(new RegExp(`data-share-link>[^<]*#ff1\\.[A-Za-z0-9_-]+&amp;fp=${doc.fingerprint}<`));
    expect(html).toContain('@media print');
    expect(html).toContain('size: A4');
  });

  it('escapes untrusted text from the results file', () => {
    const raw = JSON.parse(readFileSync(results, 'utf8')) as { spec: { question: string }; fingerprint: string };
    raw.spec.question = '<script>alert(1)</script> & "quoted"';
    const bad = join(dir, 'hostile.json');
    writeFileSync(bad, JSON.stringify(raw));
    const r = farfield('report', bad);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).not.toContain('<script');
    expect(r.stdout).toContain('&lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;quoted&quot;');
  });

  it('refuses a malformed results file, naming the field and what is allowed', () => {
    const raw = JSON.parse(readFileSync(results, 'utf8')) as { runs: Array<{ status: string }> };
    raw.runs[1]!.status = 'exploded';
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify(raw));
    const r = farfield('report', bad);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/runs\[1\]\.status/);
    expect(r.stderr).toMatch(/ok.*diverged.*failed.*cancelled/);
    const notResults = farfield('report', tiny);
    expect(notResults.code).toBe(1);
    expect(notResults.stderr).toMatch(/kind: got null, allowed "farfield-results"/);
    expect(farfield('report').code).toBe(2);
  });
});
