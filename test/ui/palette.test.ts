/**
 * The arm colours stay apart for readers with a colour-vision deficiency.
 *
 * Simulation: Machado, Oliveira & Fernandes, "A Physiologically-based Model
 * for Simulation of Color Vision Deficiency", IEEE TVCG 15(6), 2009 — the
 * severity-1.0 matrices for protanopia, deuteranopia and tritanopia from the
 * authors' supplementary table of precomputed matrices, applied to linear
 * sRGB (numbers checked against EmilHvitfeldt/prismatic R/color-blindness.R,
 * which copies the same table).
 * Colour difference: CIE76, ΔE*ab = Euclidean distance in CIELAB (CIE 15:2004
 * Colorimetry, 3rd ed., 2004, §8.2.1 and §8.3), D65 white; sRGB to XYZ by IEC
 * 61966-2-1:1999 (the sRGB matrix and transfer function).
 * Non-text contrast: WCAG 2.1 success criterion 1.4.11 (3:1), relative
 * luminance and contrast ratio from the WCAG 2.1 glossary.
 */
import { describe, expect, it } from 'vitest';
import { ARM_COLORS, ARM_DASHES, ARM_SYMBOLS, CARD, PAPER, armLabel, armLetter, armMark } from '../../src/ui/palette.ts';

type Vec = [number, number, number];
type Mat = [Vec, Vec, Vec];

// Machado et al. 2009, supplementary table, severity 1.0 (rows map linear RGB to simulated linear RGB).
const MACHADO: Record<'protanopia' | 'deuteranopia' | 'tritanopia', Mat> = {
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
};
const IDENTITY: Mat = [
  [1, 0, 0],
  [0, 1, 0],
  [0, 0, 1],
];
const VISIONS: Array<[string, Mat]> = [['normal vision', IDENTITY], ...Object.entries(MACHADO)];

function linearRgb(hex: string): Vec {
  // IEC 61966-2-1 sRGB transfer function.
  return [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4)) as Vec;
}

function apply(m: Mat, v: Vec): Vec {
  return m.map((row) => Math.min(1, Math.max(0, row[0] * v[0] + row[1] * v[1] + row[2] * v[2]))) as Vec;
}

function lab(rgb: Vec): Vec {
  // IEC 61966-2-1 linear sRGB → XYZ (D65), then CIE 15:2004 CIELAB with the D65 white.
  const x = 0.4124 * rgb[0] + 0.3576 * rgb[1] + 0.1805 * rgb[2];
  const y = 0.2126 * rgb[0] + 0.7152 * rgb[1] + 0.0722 * rgb[2];
  const z = 0.0193 * rgb[0] + 0.1192 * rgb[1] + 0.9505 * rgb[2];
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  const [fx, fy, fz] = [f(x / 0.95047), f(y / 1), f(z / 1.08883)];
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

function deltaE76(a: Vec, b: Vec): number {
  return Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
}

function seen(hex: string, vision: Mat): Vec {
  return lab(apply(vision, linearRgb(hex)));
}

function contrast(a: string, b: string): number {
  const lum = (hex: string) => {
    const [r, g, bl] = linearRgb(hex);
    return 0.2126 * r + 0.7152 * g + 0.0722 * bl;
  };
  const [hi, lo] = [lum(a), lum(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

describe('colour science helpers', () => {
  it('converts sRGB to CIELAB like the published values', () => {
    // sRGB red (255, 0, 0) is L* 53.24, a* 80.09, b* 67.20 under D65 (widely tabulated; from memory).
    const red = lab(linearRgb('#ff0000'));
    expect(red[0]).toBeCloseTo(53.24, 1);
    expect(red[1]).toBeCloseTo(80.09, 0);
    expect(red[2]).toBeCloseTo(67.2, 0);
    // White is L* 100 with no chroma; greys stay grey under every simulation (each Machado row sums to 1).
    expect(lab(linearRgb('#ffffff'))[0]).toBeCloseTo(100, 1);
    for (const [, m] of VISIONS) for (const row of m) expect(row[0] + row[1] + row[2]).toBeCloseTo(1, 5);
  });

  it('reproduces the problem the issue found: the old teal/plum pair nearly merges under deuteranopia', () => {
    // Issue 17 measured ΔE ≈ 7 for the old first two arm colours; the simulation must find them too close.
    const d = deltaE76(seen('#0b6e69', MACHADO.deuteranopia), seen('#7b2d62', MACHADO.deuteranopia));
    expect(d).toBeLessThan(20);
  });
});

describe('arm palette', () => {
  for (let size = 2; size <= ARM_COLORS.length; size++) {
    it(`keeps every pair of a ${size}-colour palette at ΔE*ab (CIE76) ≥ 20 in normal vision and under simulated protanopia, deuteranopia and tritanopia (Machado et al. 2009)`, () => {
      const colors = ARM_COLORS.slice(0, size);
      for (const [vision, m] of VISIONS) {
        for (let i = 0; i < colors.length; i++) {
          for (let j = i + 1; j < colors.length; j++) {
            const d = deltaE76(seen(colors[i]!, m), seen(colors[j]!, m));
            expect(d, `${colors[i]} vs ${colors[j]} under ${vision}`).toBeGreaterThanOrEqual(20);
          }
        }
      }
    });
  }

  it('reaches 3:1 against paper and card (WCAG 2.1 SC 1.4.11, non-text contrast) for every arm colour', () => {
    for (const c of ARM_COLORS) for (const ground of [PAPER, CARD]) expect(contrast(c, ground), `${c} on ${ground}`).toBeGreaterThanOrEqual(3);
  });

  it('gives every arm of the largest experiment its own letter, and a colour/shape/dash triple that differs from each of the first arms', () => {
    const letters = Array.from({ length: 32 }, (_, i) => armLetter(i));
    expect(letters.slice(0, 3)).toEqual(['A', 'B', 'C']);
    expect(letters[25]).toBe('Z');
    expect(letters[26]).toBe('AA');
    expect(new Set(letters).size).toBe(32);
    expect(armLabel(0, 'max')).toBe('A (max)');
    const triples = new Set(Array.from({ length: 32 }, (_, i) => armMark(i)).map((m) => `${m.color}|${m.symbol}|${m.dash}`));
    expect(triples.size).toBe(32);
    expect(ARM_SYMBOLS.length).not.toBe(ARM_COLORS.length);
    expect(ARM_DASHES.length).not.toBe(ARM_COLORS.length);
  });
});
