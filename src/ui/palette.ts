/**
 * Farfield's palette: deep ink, teal, plum and ochre on warm paper. Arm colours
 * are chosen to stay apart for common colour-vision deficiencies and on a
 * projector (no orange/blue pair; first two arms teal and plum).
 */
export const PAPER = '#f4eee1';
export const CARD = '#fbf8f0';
export const INK = '#1c2130';
export const MUTED = '#545867';
export const RULE = '#d4c8b0';
export const TRAIN_BAND = '#e3d8bf';
/** Runs that blew up and arms that missed the fit gate (always with a word or a shape beside it). */
export const DANGER = '#9c2f22';

export const ARM_COLORS = ['#0b6e69', '#7b2d62', '#a66a00', '#4d6b1f', '#a2372a', '#39456b', '#8a5a9e', '#2d7f9b'] as const;

export function armColor(index: number): string {
  return ARM_COLORS[index % ARM_COLORS.length]!;
}
