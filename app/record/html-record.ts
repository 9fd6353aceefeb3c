/**
 * A record as one self-contained HTML file: inline CSS, inline SVG plots, no
 * scripts and no external resources (a Content-Security-Policy meta tag forbids
 * them as a second line of defence). Every string is escaped by escapeHtml.
 */
import { escapeHtml } from './html-escape';
import type { Block, RecordDocument } from './record-document';
import { SVG_MARKER_LABEL_FONT_PX, svgPlot } from './svg-plot';

const STYLE = `
body{font-family:system-ui,-apple-system,"Segoe UI",sans-serif;margin:24px auto;max-width:1000px;color:#111;padding:0 16px}
h1{font-size:1.4em;margin-bottom:4px}h2{font-size:1.1em;margin-top:28px;border-bottom:1px solid #ccc;padding-bottom:2px}
.banner{background:#fff3cd;border:1px solid #d6a700;padding:6px 10px;font-weight:600}
.verdict{font-size:1.2em;font-weight:700;padding:6px 10px;border-radius:4px;display:inline-block;margin-top:12px}
.verdict.pass{background:#d9f2de;color:#135e22}.verdict.fail{background:#f8d7d5;color:#8a1d14}.verdict.none{background:#eee}
table{border-collapse:collapse;margin:8px 0;font-size:0.85em}td,th{border:1px solid #ccc;padding:2px 6px;vertical-align:top}
th{background:#f3f3f3;text-align:left}td.num{text-align:right;font-variant-numeric:tabular-nums}
table.kv th{width:14em}caption{text-align:left;font-style:italic;padding:2px 0}
pre{background:#f7f7f7;border:1px solid #ddd;padding:8px;font-size:0.8em;max-height:24em;overflow:auto}
svg.plot{max-width:100%;height:auto;display:block;margin:8px 0}
svg .grid-major{stroke:#b5b5b5;stroke-width:0.8}svg .grid-minor{stroke:#e3e3e3;stroke-width:0.6}
svg text{font-family:sans-serif;font-size:11px}svg .plot-title{font-weight:700;font-size:13px}
svg .marker-label{font-size:${SVG_MARKER_LABEL_FONT_PX}px}svg .legend{font-size:10px}
footer{margin-top:32px;font-size:0.8em;color:#555;border-top:1px solid #ccc;padding-top:6px}
@media print{pre{max-height:none}}
`;

function renderBlock(block: Block): string {
  switch (block.kind) {
    case 'heading':
      return `<h2>${escapeHtml(block.text)}</h2>`;
    case 'paragraph':
      return `<p${block.emphasis === 'warning' ? ' class="banner"' : ''}>${escapeHtml(block.text)}</p>`;
    case 'keyValues':
      return `<table class="kv">${block.rows.map(([k, v]) => `<tr><th>${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`).join('')}</table>`;
    case 'table': {
      const head = `<tr>${block.columns.map((c) => `<th>${escapeHtml(c)}</th>`).join('')}</tr>`;
      const body = block.rows
        .map((row) => `<tr>${row.map((cell, i) => `<td${block.alignRight?.[i] ? ' class="num"' : ''}>${escapeHtml(cell)}</td>`).join('')}</tr>`)
        .join('\n');
      return `<table>${block.caption ? `<caption>${escapeHtml(block.caption)}</caption>` : ''}<thead>${head}</thead><tbody>\n${body}\n</tbody></table>`;
    }
    case 'plot':
      return svgPlot(block.spec);
    case 'list':
      return `<ul>${block.items.map((item) => `<li>${escapeHtml(item)}</li>`).join('')}</ul>`;
    case 'verdict': {
      const cls = block.pass === null ? 'none' : block.pass ? 'pass' : 'fail';
      const reasons = block.reasons.length ? `<ul>${block.reasons.map((r) => `<li>${escapeHtml(r)}</li>`).join('')}</ul>` : '';
      return `<div class="verdict ${cls}">Verdict: ${escapeHtml(block.headline)}</div>${reasons}`;
    }
    case 'code':
      return `<details><summary>${escapeHtml(block.caption)}</summary><pre>${escapeHtml(block.text)}</pre></details>`;
  }
}

export function htmlRecord(document: RecordDocument): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeHtml(document.title)}</title>`,
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    `<h1>${escapeHtml(document.title)}</h1>`,
    document.banner ? `<p class="banner">${escapeHtml(document.banner)}</p>` : '',
    ...document.blocks.map(renderBlock),
    `<footer>${escapeHtml(document.footer)}</footer>`,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
