"""The report's stylesheet: plain, print-first (A4 or Letter), readable without colour."""

#: Inlined into every report's <head>; no web fonts, nothing fetched.
STYLESHEET = """
@page { margin: 14mm 13mm 16mm 13mm; }
:root { --ink: #1d1d1f; --muted: #5a5a60; --rule: #c8c8cc; --soft: #f3f3f5; --accent: #36506e; }
* { box-sizing: border-box; }
html { font-size: 10.5pt; }
body {
  margin: 0 auto; max-width: 190mm; padding: 8mm 6mm; color: var(--ink); background: #fff;
  font-family: "Source Sans 3", "Segoe UI", "Noto Sans", "DejaVu Sans", Helvetica, Arial, sans-serif;
  line-height: 1.4;
}
h1 { font-size: 1.7rem; margin: 0 0 0.3rem; color: var(--accent); letter-spacing: 0.01em; }
h2 { font-size: 1.25rem; margin: 1.2rem 0 0.5rem; border-bottom: 1.5px solid var(--accent); padding-bottom: 0.15rem; }
h3 { font-size: 1.05rem; margin: 0.8rem 0 0.3rem; }
.smiles, code { font-family: "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 0.9em; }
/* SMILES break only at the <wbr> points the report puts in (after ')', ring digits, between atoms). */
.smiles { word-break: normal; overflow-wrap: normal; hyphens: none; }
.lede { color: var(--muted); margin: 0 0 0.8rem; }
.caution {
  border: 2.5px solid #111; background: #fff8e1; padding: 0.6rem 0.8rem; margin: 0.8rem 0; font-size: 1rem;
  page-break-inside: avoid; break-inside: avoid;
}
.caution strong { text-transform: uppercase; letter-spacing: 0.04em; margin-right: 0.3rem; }
.warnings { border-left: 4px solid #8a5a00; background: var(--soft); padding: 0.4rem 0.8rem; margin: 0.6rem 0; }
.warnings p { margin: 0.2rem 0; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.15rem 1rem; margin: 0.6rem 0; }
dl.facts dt { font-weight: 600; }
dl.facts dd { margin: 0; }
.sources ol { margin: 0.2rem 0 0.2rem 1.2rem; padding: 0; color: var(--muted); }
table { border-collapse: collapse; width: 100%; table-layout: auto; margin: 0.4rem 0 0.6rem; font-size: 0.95rem; }
th, td { border-bottom: 1px solid var(--rule); padding: 0.22rem 0.45rem; text-align: left; vertical-align: top; }
th { background: var(--soft); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
table.counts { width: auto; min-width: 55%; }
table.products { font-size: 0.85rem; }
table.products td, table.products th { padding: 0.2rem 0.3rem; }
.charts { display: grid; grid-template-columns: minmax(0, 1fr) minmax(0, 1fr); gap: 0.6rem 1rem; margin: 0.6rem 0; }
figure { margin: 0; page-break-inside: avoid; break-inside: avoid; }
figure svg.chart { width: 100%; height: auto; display: block; }
figcaption { font-size: 0.85rem; color: var(--muted); }
.note { border: 1px dashed var(--muted); padding: 0.4rem 0.7rem; margin: 0.8rem 0; }
.key { page-break-inside: avoid; break-inside: avoid; }
.key dt { font-weight: 600; }
.key dd { margin: 0 0 0.3rem 1rem; }
section.substrate {
  border-top: 2px solid var(--accent); padding-top: 0.4rem; margin-top: 1rem;
  page-break-inside: avoid; break-inside: avoid;
}
section.substrate h3 { margin-top: 0.2rem; }
.verdict {
  display: inline-block; border: 1.5px solid var(--ink); border-radius: 3px; padding: 0 0.4rem;
  font-weight: 600; font-size: 0.9rem; margin-left: 0.4rem;
}
.verdict-by-symmetry { border-style: double; border-width: 3px; }
.verdict-ruled-out { border-style: dotted; }
.verdict-mixture { border-style: dashed; }
.verdict-inert { border-style: dotted; color: var(--muted); }
/* The drawing keeps its natural size (fixed bond length, so the site letters keep one print size); a large one
   takes the full width and the tables flow below it. */
.substrate-body { display: flex; flex-wrap: wrap; gap: 0.8rem; align-items: flex-start; }
.substrate-body > figure { flex: 0 1 auto; max-width: 100%; }
.substrate-body > div { flex: 1 1 90mm; min-width: 0; }
svg.structure { max-width: 100%; height: auto; border: 1px solid var(--rule); display: block; }
table.products caption { text-align: left; font-weight: 600; padding: 0.2rem 0; }
.flags { border-left: 4px solid var(--accent); padding: 0.2rem 0.8rem; margin: 0.4rem 0; font-size: 0.9rem; }
.flags p { margin: 0.1rem 0; font-weight: 600; }
.flags ul { margin: 0.1rem 0 0.1rem 1.1rem; padding: 0; }
h2.group { margin-top: 1.6rem; }
.legend { list-style: none; padding: 0; margin: 0.3rem 0; font-size: 0.85rem; }
.legend li { display: inline-block; margin: 0 0.8rem 0.2rem 0; }
.swatch { display: inline-block; width: 0.9em; height: 0.9em; border: 1px solid #777; vertical-align: -0.1em; margin-right: 0.25em; }
.meta { color: var(--muted); font-size: 0.9rem; margin: 0.1rem 0; }
footer { margin-top: 1.5rem; border-top: 1px solid var(--rule); padding-top: 0.5rem; font-size: 0.85rem; color: var(--muted); }
table.appendix { font-size: 0.8rem; margin: 0.2rem 0 0.6rem; }
table.appendix td, table.appendix th { padding: 0 0.4rem; }
.appendix h3 { font-size: 0.95rem; margin: 0.6rem 0 0.2rem; }
@media print {
  html { font-size: 9.5pt; }
  body { max-width: none; padding: 0; }
  a { color: inherit; text-decoration: none; }
}
@media screen and (max-width: 700px) {
  .charts { grid-template-columns: 1fr; }
}
"""
