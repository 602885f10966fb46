/**
 * The report's stylesheet, inlined into the file: the sheet's palette on
 * paper, system fonts only (nothing to download), and print rules for A4
 * (figures and table rows never split across pages, colours kept).
 */
import { CARD, DANGER, INK, MUTED, PAPER, RULE } from '../ui/palette.ts';
import { FIGURE_FONT } from '../ui/plots.ts';

export const REPORT_CSS = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0; background: ${PAPER}; color: ${INK}; font: 15px/1.5 ${FIGURE_FONT}; }
main { max-width: 800px; margin: 0 auto; padding: 24px 20px 48px; }
h1 { font-family: Georgia, 'DejaVu Serif', serif; font-size: 1.75em; line-height: 1.25; margin: 0.2em 0 0.4em; }
h2 { font-family: Georgia, 'DejaVu Serif', serif; font-size: 1.3em; margin: 1.6em 0 0.5em; padding-top: 0.4em; border-top: 2px solid ${INK}; }
h2 .mark { color: ${MUTED}; margin-right: 0.5em; font-size: 0.8em; }
h3 { font-size: 1.02em; margin: 1.1em 0 0.4em; }
.kicker { text-transform: uppercase; letter-spacing: 0.1em; font-size: 0.75em; font-weight: 700; color: ${MUTED}; margin: 0; }
.muted { color: ${MUTED}; }
.danger { color: ${DANGER}; font-weight: 600; }
.expectation { background: ${CARD}; border-left: 4px solid ${RULE}; padding: 0.5em 0.8em; margin: 0; }
.answer { background: ${INK}; color: ${PAPER}; padding: 0.8em 1.1em; border-radius: 4px; }
.answer .kicker { color: #e9c46a; }
.answer .lead { font-family: Georgia, 'DejaVu Serif', serif; font-size: 1.35em; font-weight: 600; margin: 0.1em 0; }
.answer p { margin: 0.2em 0; }
.answer .detail { opacity: 0.85; }
.partial { color: ${DANGER}; }
.arms { display: grid; grid-template-columns: repeat(auto-fit, minmax(220px, 1fr)); gap: 12px; }
.arm { background: ${CARD}; border: 1px solid ${RULE}; border-top: 5px solid; border-radius: 4px; padding: 0.4em 0.8em 0.6em; break-inside: avoid; }
.arm h3 { margin: 0.3em 0; font-size: 1.1em; }
.arm .note { font-style: italic; margin: 0.2em 0; }
.gate[data-gate='not-fitted'] strong { color: ${DANGER}; }
.arm-tag { white-space: nowrap; text-decoration: underline 3px; text-underline-offset: 3px; print-color-adjust: exact; -webkit-print-color-adjust: exact; }
dl.kv { display: grid; grid-template-columns: max-content minmax(0, 1fr); gap: 0.15em 0.9em; margin: 0.3em 0; font-size: 0.93em; }
dl.kv dt { color: ${MUTED}; }
dl.kv dd { margin: 0; overflow-wrap: anywhere; }
details.resolved summary { color: ${MUTED}; font-size: 0.88em; cursor: pointer; }
.legend { display: flex; flex-wrap: wrap; gap: 0.3em 1.2em; font-size: 0.92em; }
.key { font-weight: 600; }
figure.fig { margin: 1em 0; padding: 0.6em 0.8em; background: ${CARD}; border: 1px solid ${RULE}; border-radius: 4px; break-inside: avoid; }
figure.fig h3 { margin: 0 0 0.4em; }
figure.fig .no { color: ${MUTED}; margin-right: 0.6em; }
figure.fig svg { display: block; max-width: 100%; height: auto; }
figcaption { font-size: 0.86em; color: ${MUTED}; margin-top: 0.4em; }
table { border-collapse: collapse; width: 100%; font-size: 0.82em; background: ${CARD}; margin: 1em 0 0.3em; }
caption { text-align: left; font-weight: 700; padding: 0.3em 0; }
th, td { padding: 0.3em 0.45em; border-bottom: 1px solid ${RULE}; text-align: right; vertical-align: top; }
th { color: ${MUTED}; font-weight: 600; vertical-align: bottom; }
.l { text-align: left; }
.sub { display: block; color: ${MUTED}; font-size: 0.88em; font-weight: 400; }
td.verdict { font-weight: 700; }
tr[data-kind='not-fitted'] td.verdict, tr[data-kind='no-skill'] td.verdict { color: ${DANGER}; }
tr[data-kind='too-few-seeds'] td.verdict, tr[data-kind='not-tested'] td.verdict, tr[data-kind='no-difference'] td.verdict { color: ${MUTED}; }
tr { break-inside: avoid; }
.bang { color: ${DANGER}; font-weight: 800; }
.foot { font-size: 0.82em; color: ${MUTED}; margin: 0.2em 0 0.8em; }
ul.notes { list-style: none; padding: 0; margin: 0; display: grid; gap: 0.35em; }
ul.notes li { background: ${CARD}; border-left: 4px solid ${RULE}; padding: 0.35em 0.7em; font-size: 0.9em; break-inside: avoid; }
ul.notes li.few { border-left-color: #a66a00; }
ul.notes li.danger-note { border-left-color: ${DANGER}; }
code, pre, .link { font-family: ui-monospace, 'DejaVu Sans Mono', 'Liberation Mono', monospace; }
.fp { font-size: 1.2em; font-weight: 700; letter-spacing: 0.05em; }
.link { font-size: 0.78em; overflow-wrap: anywhere; background: ${CARD}; border: 1px solid ${RULE}; padding: 0.4em 0.6em; user-select: all; }
pre.spec { font-size: 0.75em; background: ${CARD}; border: 1px solid ${RULE}; padding: 0.6em; white-space: pre-wrap; overflow-wrap: anywhere; }
@media print {
  @page { size: A4; margin: 14mm 12mm; }
  body { background: #fff; font-size: 10pt; }
  main { max-width: none; padding: 0; }
  .answer { print-color-adjust: exact; -webkit-print-color-adjust: exact; }
  h2 { break-after: avoid; }
  figure.fig, table, .arm, ul.notes li { background: #fff; }
  details.resolved { display: none; }
  table { font-size: 8pt; }
}
`;
