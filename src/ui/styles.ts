/**
 * Shared styles. Colour and type tokens are custom properties set on the
 * sheet (they reach every shadow root); the rules below style the native
 * controls each component uses, so every component looks the same.
 */
import { css } from 'lit';

export const tokens = css`
  :host {
    --paper: #f4eee1;
    --paper-deep: #ebe2cf;
    --card: #fbf8f0;
    --field: #fffdf8;
    --ink: #1c2130;
    --muted: #545867;
    --rule: #d4c8b0;
    --teal: #0b6e69;
    --teal-deep: #08524e;
    --plum: #7b2d62;
    --ochre: #8a5800;
    --ochre-soft: #f3e2bd;
    --danger: #9c2f22;
    --danger-soft: #f6dcd4;
    --ok: #3f6a1c;
    --focus: #a66a00;
    --serif: 'Iowan Old Style', 'Palatino Linotype', Palatino, 'Book Antiqua', 'Charter', 'DejaVu Serif', Georgia, serif;
    --sans: system-ui, -apple-system, 'Segoe UI', 'Liberation Sans', 'DejaVu Sans', sans-serif;
    --mono: ui-monospace, 'SFMono-Regular', Menlo, Consolas, 'Liberation Mono', 'DejaVu Sans Mono', monospace;
  }
`;

export const controls = css`
  :host {
    color: var(--ink);
    font-family: var(--sans);
  }
  * {
    box-sizing: border-box;
  }
  input,
  select,
  textarea,
  button {
    font: inherit;
    color: inherit;
  }
  /* A select sizes itself to its longest option (a long arm name): never wider than its box. */
  select {
    max-width: 100%;
  }
  input,
  select,
  textarea {
    background: var(--field);
    border: 1px solid var(--rule);
    border-bottom: 1.5px solid #b9ab8f;
    border-radius: 3px;
    padding: 0.22em 0.4em;
    min-height: 1.9em;
  }
  input[type='number'],
  input.num {
    font-family: var(--mono);
    font-size: 0.92em;
    font-variant-numeric: tabular-nums;
  }
  input[aria-invalid='true'],
  select[aria-invalid='true'] {
    border-color: var(--danger);
    background: var(--danger-soft);
  }
  input:disabled,
  select:disabled,
  textarea:disabled {
    color: var(--muted);
    background: transparent;
  }
  :focus-visible {
    outline: 3px solid var(--focus);
    outline-offset: 2px;
  }
  button {
    border: 1.5px solid var(--ink);
    background: transparent;
    border-radius: 4px;
    padding: 0.3em 0.8em;
    cursor: pointer;
    line-height: 1.3;
  }
  button:hover:not(:disabled) {
    background: var(--paper-deep);
  }
  button.primary {
    background: var(--teal);
    border-color: var(--teal);
    color: #fff;
    font-weight: 600;
  }
  button.primary:hover:not(:disabled) {
    background: var(--teal-deep);
  }
  button.quiet {
    border-color: transparent;
    color: var(--muted);
    padding-inline: 0.45em;
  }
  button.quiet:hover:not(:disabled) {
    color: var(--ink);
  }
  button:disabled {
    opacity: 0.45;
    cursor: not-allowed;
  }
  .num {
    font-family: var(--mono);
    font-variant-numeric: tabular-nums;
  }
  .muted {
    color: var(--muted);
  }
  .visually-hidden {
    position: absolute;
    width: 1px;
    height: 1px;
    overflow: hidden;
    clip: rect(0 0 0 0);
    white-space: nowrap;
  }
`;

/** The margin label each section of the sheet carries ("§2 Arms"). */
export const sectionHead = css`
  .section-head {
    display: flex;
    align-items: baseline;
    gap: 0.6em;
    margin: 0 0 0.8em;
    font-family: var(--sans);
    font-size: 0.86em;
    font-weight: 700;
    letter-spacing: 0.12em;
    text-transform: uppercase;
    color: var(--ochre);
  }
  .section-head .mark {
    font-family: var(--serif);
    font-size: 1.25em;
    letter-spacing: 0;
  }
  .section-head .aside {
    font-weight: 400;
    letter-spacing: 0;
    text-transform: none;
    color: var(--muted);
    font-size: 1.05em;
  }
`;

/** The numbered figure frame (title, export buttons, plot, caption) shared by every figure of the evidence. */
export const figureFrame = css`
  :host {
    display: block;
    min-width: 0;
  }
  figure {
    margin: 0;
    background: var(--card);
    border: 1px solid var(--rule);
    border-radius: 4px;
    padding: 0.8em 1em 0.7em;
  }
  .top {
    display: flex;
    align-items: baseline;
    gap: 0.6em;
    justify-content: space-between;
    flex-wrap: wrap;
  }
  h3 {
    margin: 0;
    font-size: 1.05em;
    font-family: var(--serif);
  }
  h3 .no {
    color: var(--ochre);
    margin-right: 0.3em;
  }
  .tools {
    display: flex;
    gap: 0.3em;
  }
  .tools button {
    font-size: 0.78em;
    padding: 0.15em 0.55em;
  }
  .plot svg {
    width: 100%;
    height: auto;
    display: block;
  }
  figcaption {
    margin-top: 0.35em;
    font-size: 0.88em;
    color: var(--muted);
    line-height: 1.45;
  }
`;
