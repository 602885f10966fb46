/**
 * An arm as the sheet's HTML shows it: a small swatch in the arm's dash
 * pattern and marker shape (the same as in the figures), its letter code and
 * its name. Text stays in ink (arm colours are for marks, at 3:1).
 */
import { html, svg, css } from 'lit';
import { armMark } from './palette.ts';
import { symbolPath } from './figure-key.ts';

export function armTag(index: number, name: string, suffix = '') {
  const m = armMark(index);
  return html`<span class="arm-tag" data-arm-letter=${m.letter}
    ><svg width="26" height="12" viewBox="0 0 26 12" aria-hidden="true" focusable="false">
      ${svg`<line x1="0" x2="26" y1="6" y2="6" stroke=${m.color} stroke-width="2.5" stroke-dasharray=${m.dash}></line>
      <path d=${symbolPath(m.symbol, 13, 6, 4)} fill=${m.color} stroke="#fff" stroke-width="0.8"></path>`}</svg
    ><b>${m.letter}</b> <span class="name">${name}${suffix}</span></span
  >`;
}

export const armTagStyles = css`
  .arm-tag {
    display: inline-flex;
    align-items: center;
    gap: 0.3em;
    max-width: 100%;
  }
  /* A long arm name wraps rather than widening the page. */
  .arm-tag .name {
    min-width: 0;
    overflow-wrap: anywhere;
  }
  .arm-tag svg {
    flex: none;
  }
`;
