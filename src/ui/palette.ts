/**
 * Farfield's palette: deep ink, teal, plum and ochre on warm paper.
 *
 * Every arm has four marks, so no reader depends on colour alone: a letter
 * code (A, B, … Z, AA, AB …), a colour, a marker shape and a dash pattern.
 * The eight arm colours were searched so that every pair stays at least
 * ΔE*ab (CIE76) 20 apart in normal vision and under simulated protanopia,
 * deuteranopia and tritanopia, and every colour reaches 3:1 against paper and
 * card (WCAG non-text contrast); test/ui/palette.test.ts checks both. The
 * first two arms are teal and plum (no orange-versus-blue pair). Shapes and
 * dashes cycle with other periods than the colours (8, 6, 5), so arms 9 and
 * up still differ from arm 1 in shape and dash.
 */
export const PAPER = '#f4eee1';
export const CARD = '#fbf8f0';
export const INK = '#1c2130';
export const MUTED = '#545867';
export const RULE = '#d4c8b0';
export const TRAIN_BAND = '#e3d8bf';
/** Runs that blew up and arms that missed the fit gate (always with a word or a shape beside it). */
export const DANGER = '#9c2f22';

export const ARM_COLORS = ['#27634d', '#5d205b', '#a67622', '#533a9d', '#841100', '#6d8a59', '#a672cf', '#0e928f'] as const;

/** Observable Plot symbol names (figure-key.ts draws the same shapes in keys). No diamond: the figures use it for in-distribution errors. */
export const ARM_SYMBOLS = ['circle', 'square', 'triangle', 'star', 'cross', 'wye'] as const;
export type ArmSymbol = (typeof ARM_SYMBOLS)[number];

/** SVG stroke-dasharray values; the first arm draws solid. */
export const ARM_DASHES = ['none', '6 3', '2 3', '9 3 2 3', '1 5'] as const;

export function armColor(index: number): string {
  return ARM_COLORS[index % ARM_COLORS.length]!;
}

export function armSymbol(index: number): ArmSymbol {
  return ARM_SYMBOLS[index % ARM_SYMBOLS.length]!;
}

export function armDash(index: number): string {
  return ARM_DASHES[index % ARM_DASHES.length]!;
}

/** A, B, … Z, AA, AB, … (spreadsheet column letters), so 32 arms stay one or two letters. */
export function armLetter(index: number): string {
  let n = index;
  let out = '';
  do {
    out = String.fromCharCode(65 + (n % 26)) + out;
    n = Math.floor(n / 26) - 1;
  } while (n >= 0);
  return out;
}

/** "A (max)": the code and the arm's own name, for keys, labels and messages. */
export function armLabel(index: number, name: string): string {
  return `${armLetter(index)} (${name})`;
}

export interface ArmMark {
  index: number;
  letter: string;
  color: string;
  symbol: ArmSymbol;
  dash: string;
}

export function armMark(index: number): ArmMark {
  return { index, letter: armLetter(index), color: armColor(index), symbol: armSymbol(index), dash: armDash(index) };
}
