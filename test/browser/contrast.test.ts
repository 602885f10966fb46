/**
 * Text colours of the sheet against its backgrounds reach WCAG 2.x contrast
 * 4.5:1 for normal text (W3C, Web Content Accessibility Guidelines 2.1,
 * success criterion 1.4.3; relative luminance and contrast ratio as defined
 * in the WCAG 2.1 glossary). Reads the custom properties from src/ui/styles.ts.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';

const css = readFileSync(new URL('../../src/ui/styles.ts', import.meta.url), 'utf8');
function prop(name: string): string {
  const m = new RegExp(`--${name}:\\s*(#[0-9a-fA-F]{6})`).exec(css);
  if (!m) throw new Error(`no --${name} in styles.ts`);
  return m[1]!;
}
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r! + 0.7152 * g! + 0.0722 * b!;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

describe('text contrast', () => {
  it('matches the WCAG definition on its own extremes', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 10);
    expect(contrast('#777777', '#ffffff')).toBeCloseTo(4.48, 2); // the well-known "#777 on white just fails 4.5:1" (common practice)
  });
  for (const text of ['ink', 'muted', 'teal', 'plum', 'ochre', 'danger', 'ok']) {
    for (const ground of ['paper', 'card', 'field']) {
      it(`--${text} on --${ground} reaches 4.5:1`, () => {
        expect(contrast(prop(text), prop(ground))).toBeGreaterThanOrEqual(4.5);
      });
    }
  }
});
