/**
 * The report's one inline style sheet. System fonts only (no web fonts, no
 * network); widths in rem so it reads on a laptop; a print block that drops
 * the contents list, keeps tables and figures whole, and prints links as text.
 * Colours are a blue/orange pair that is colour-blind safe and still
 * separates in grayscale by lightness.
 */
export const reportStyles = `
:root { --ink: #1d2430; --muted: #5a6473; --rule: #d5dae1; --accent: #1f5fa6; --warm: #b55d00; --paper: #ffffff; --tint: #f4f6f9; --warn: #fff6e0; --warn-rule: #e0b84d; }
* { box-sizing: border-box; }
html { font-size: 16px; }
body { margin: 0; background: var(--paper); color: var(--ink); font: 1rem/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; }
main { max-width: 62rem; margin: 0 auto; padding: 1.5rem 1.5rem 4rem; }
h1 { font-size: 1.75rem; margin: 0.5rem 0 0.25rem; }
h2 { font-size: 1.35rem; margin: 2.5rem 0 0.75rem; padding-top: 0.5rem; border-top: 2px solid var(--ink); }
h3 { font-size: 1.1rem; margin: 1.5rem 0 0.5rem; }
p { margin: 0.5rem 0; }
.subtitle { color: var(--muted); margin: 0 0 1rem; }
nav.contents { background: var(--tint); padding: 0.75rem 1rem; border-radius: 6px; }
nav.contents ol { margin: 0.25rem 0 0; padding-left: 1.25rem; }
a { color: var(--accent); }
table { border-collapse: collapse; margin: 0.5rem 0 1rem; font-variant-numeric: tabular-nums; max-width: 100%; }
th, td { padding: 0.3rem 0.6rem; border-bottom: 1px solid var(--rule); text-align: left; vertical-align: top; }
th { font-weight: 600; border-bottom: 2px solid var(--ink); }
td.number, th.number { text-align: right; }
td.number { white-space: nowrap; }
th.number { white-space: normal; }
tr.best td { font-weight: 600; background: #eaf1fa; }
tr.not-compared td { color: var(--muted); font-style: italic; }
.bar-track { display: inline-block; position: relative; width: 6rem; height: 0.8rem; background: var(--tint); border: 1px solid var(--rule); vertical-align: middle; margin-left: 0.4rem; }
.bar { position: absolute; left: 0; top: 0; bottom: 0; background: var(--accent); min-width: 1px; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.2rem 1rem; margin: 0.5rem 0 1rem; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; }
.conclusion { border-left: 4px solid var(--accent); padding: 0.5rem 1rem; background: var(--tint); margin: 1rem 0; }
.cautions { border-left: 4px solid var(--warm); padding: 0.25rem 1rem; margin: 0.5rem 0 1rem; font-size: 0.95rem; }
.cautions ul { margin: 0.25rem 0; padding-left: 1.1rem; }
.warnings { background: var(--warn); border: 1px solid var(--warn-rule); padding: 0.5rem 1rem; border-radius: 4px; margin: 0.75rem 0; }
.warnings ul { margin: 0.25rem 0; padding-left: 1.1rem; }
figure { margin: 1rem 0; }
figure img, figure svg { display: block; max-width: 100%; height: auto; border: 1px solid var(--rule); background: #fff; }
figcaption { color: var(--muted); font-size: 0.9rem; margin-top: 0.3rem; }
.plain-text { white-space: pre-wrap; font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, monospace; font-size: 0.85rem; background: var(--tint); padding: 0.75rem; border: 1px solid var(--rule); }
ol.references li { margin: 0.3rem 0; }
.provenance td:first-child { color: var(--muted); white-space: nowrap; }
code { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, monospace; font-size: 0.85rem; white-space: nowrap; }
.provenance code { white-space: normal; word-break: break-all; }
.note { color: var(--muted); font-size: 0.9rem; }
.lineage { page-break-before: auto; }
@media print {
  html { font-size: 11pt; }
  main { max-width: none; padding: 0; }
  nav.contents, details.copy { display: none; }
  h2, h3 { page-break-after: avoid; break-after: avoid; }
  table, figure, .conclusion, .cautions, dl.facts { page-break-inside: avoid; break-inside: avoid; }
  section.lineage { break-before: page; }
  a { color: inherit; text-decoration: none; }
  tr.best td { background: none; }
  .bar { background: #555; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
`;
