/** The report's stylesheet: calm on screen, clean on paper (no dark backgrounds, sensible page breaks). */
export const REPORT_CSS = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0; background: #f6f6f4; color: #1c1c1c; font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; }
main { max-width: 62rem; margin: 0 auto; padding: 2rem 2.25rem 3rem; background: #ffffff; }
header.cover { border-bottom: 2px solid #1f4e79; padding-bottom: 1rem; margin-bottom: 1.5rem; }
header.cover h1 { margin: 0 0 .25rem; font-size: 1.7rem; font-weight: 650; color: #1f4e79; }
header.cover p { margin: .15rem 0; color: #444; }
h2 { font-size: 1.2rem; margin: 2rem 0 .6rem; padding-bottom: .2rem; border-bottom: 1px solid #d7dbe0; color: #1f3550; }
h3 { font-size: 1rem; margin: 1.2rem 0 .4rem; color: #1f3550; }
p, ul { margin: .4rem 0 .7rem; }
code, pre, .mono { font-family: ui-monospace, "SF Mono", Menlo, Consolas, "Liberation Mono", monospace; font-size: .86em; }
pre { white-space: pre-wrap; word-break: break-all; background: #f3f5f7; border: 1px solid #d7dbe0; border-radius: 4px; padding: .7rem .8rem; }
table { border-collapse: collapse; margin: .5rem 0 1rem; font-size: .88rem; }
th, td { border: 1px solid #d7dbe0; padding: .28rem .5rem; text-align: left; vertical-align: top; }
th { background: #eef1f4; font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
table.matrix td { text-align: right; min-width: 2.2rem; font-variant-numeric: tabular-nums; }
table.matrix td.diag { background: #eef4ea; }
table.matrix td.off { background: #fbeee6; font-weight: 600; }
.hash { font-family: ui-monospace, Menlo, Consolas, monospace; font-size: .8rem; word-break: break-all; }
.note { color: #555; font-size: .88rem; }
.callout { border-left: 4px solid #1f4e79; background: #f3f6fa; padding: .55rem .8rem; margin: .8rem 0; }
.callout.warn { border-left-color: #b35c00; background: #fdf5ec; }
.status-pass { color: #1d6b2f; font-weight: 600; }
.status-warn { color: #9a4a00; font-weight: 600; }
.status-skip { color: #555; }
.chart { margin: .5rem 0 1rem; max-width: 100%; }
.chart svg { max-width: 100%; height: auto; }
.gallery { display: grid; grid-template-columns: repeat(auto-fill, minmax(13.5rem, 1fr)); gap: .8rem; }
.gallery figure { margin: 0; border: 1px solid #d7dbe0; border-radius: 4px; padding: .5rem; }
.gallery .pair { display: flex; gap: .4rem; }
.gallery .pair div { text-align: center; font-size: .72rem; color: #555; }
.gallery img { width: 6rem; height: 6rem; object-fit: contain; image-rendering: pixelated; border: 1px solid #ccc; background: #fff; display: block; }
.gallery figcaption { font-size: .78rem; margin-top: .35rem; line-height: 1.35; word-break: break-word; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: .2rem 1rem; margin: .5rem 0 1rem; }
dl.facts dt { font-weight: 600; color: #333; }
dl.facts dd { margin: 0; }
footer { margin-top: 2.5rem; padding-top: .6rem; border-top: 1px solid #d7dbe0; color: #666; font-size: .8rem; }
@page { size: A4; margin: 15mm 14mm; }
@media print {
  body { background: #ffffff; font-size: 10pt; }
  main { max-width: none; padding: 0; }
  h2 { break-after: avoid; page-break-after: avoid; }
  h3 { break-after: avoid; page-break-after: avoid; }
  table, figure, .chart, pre, .callout, dl.facts { break-inside: avoid; page-break-inside: avoid; }
  section.major { break-before: auto; }
  section.page { break-before: page; page-break-before: always; }
  pre { background: #ffffff; }
  th { background: #f0f0f0; }
  a { color: inherit; text-decoration: none; }
}
`;
