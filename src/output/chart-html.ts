// A self-contained HTML page around inline SVG figures: one inline style sheet, no scripts, no
// external requests (fonts, images and data are all inside the file).
import { escapeXml } from './chart-render.js';

/** One figure: its SVG, caption and text alternative (and an optional data table in HTML). */
export interface Figure {
  readonly id: string;
  readonly title: string;
  readonly svg: string;
  /** Vega-Lite compile warnings (none expected; tests check). */
  readonly warnings?: readonly string[];
  readonly textAlternative: string;
  readonly dataTableHtml?: string;
}

export const PAGE_CSS = `
body{font-family:system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:#222;max-width:1100px;margin:1.5rem auto;padding:0 1rem;line-height:1.4}
h1{font-size:1.5rem;margin-bottom:.25rem}h2{font-size:1.2rem;border-bottom:1px solid #ccc;padding-bottom:.2rem;margin-top:2rem}h3{font-size:1.05rem}
table{border-collapse:collapse;margin:.5rem 0;font-size:.9rem}th,td{border:1px solid #ccc;padding:.2rem .45rem;text-align:left;vertical-align:top}
th{background:#f2f2f2}td.num{text-align:right;font-variant-numeric:tabular-nums}
figure{margin:1rem 0;border:1px solid #ddd;padding:.5rem;overflow-x:auto}figcaption{font-size:.85rem;color:#444;margin-top:.3rem}
.verdict-ok{color:#005a87;font-weight:600}.verdict-flagged{color:#b34700;font-weight:600}.verdict-none{color:#555;font-weight:600}
.muted{color:#555}details{font-size:.85rem}code{font-size:.9em}
`;

/** A figure element with caption, text alternative and, when given, its data in a collapsed table. */
export function figureHtml(figure: Figure): string {
  return (
    `<figure class="chart" id="${escapeXml(figure.id)}" data-chart="${escapeXml(figure.id)}">\n${figure.svg}\n` +
    `<figcaption><strong>${escapeXml(figure.title)}.</strong> <span class="text-alternative">${escapeXml(figure.textAlternative)}</span></figcaption>\n` +
    (figure.dataTableHtml === undefined ? '' : `<details><summary>data</summary>${figure.dataTableHtml}</details>\n`) +
    '</figure>'
  );
}

/** A complete HTML document (UTF-8, inline CSS, a CSP forbidding any request outside the page). */
export function standalonePage(title: string, bodyHtml: string): string {
  return (
    '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n' +
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">\n` +
    '<meta name="viewport" content="width=device-width, initial-scale=1">\n' +
    `<title>${escapeXml(title)}</title>\n<style>${PAGE_CSS}</style>\n</head>\n<body>\n${bodyHtml}\n</body>\n</html>\n`
  );
}

/** An HTML table from a header row and body rows (cells escaped; numeric-looking cells right-aligned). */
export function tableHtml(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const cell = (text: string): string =>
    /^[−+-]?\d[\d.,]*(e[+-]?\d+)?( [^\s\d]{1,4})?( \/ \d+)?$/i.test(text)
      ? `<td class="num">${escapeXml(text)}</td>`
      : `<td>${escapeXml(text)}</td>`;
  return (
    `<table><thead><tr>${header.map((h) => `<th scope="col">${escapeXml(h)}</th>`).join('')}</tr></thead>` +
    `<tbody>${rows.map((row) => `<tr>${row.map(cell).join('')}</tr>`).join('')}</tbody></table>`
  );
}
