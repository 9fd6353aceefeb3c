/** Renders a laid-out plot (plot-spec.ts) as inline SVG: vector paths, decade grid, legend. */
import { escapeHtml } from './html-escape';
import { TOLERANCE_BAND_OPACITY } from '../contract/plot-palette';
import { layoutPlot, type PlotSpec, type XY } from './plot-spec';

const WIDTH = 800;
/** Legend entries longer than this are shortened; the full name is the entry's tooltip. */
const LEGEND_CHARACTERS = 34;
const HEIGHT = 360;
const FRAME = { left: 64, top: 28, width: 500, height: 280 };

/** Marker labels' font size (px); the record's style sheet sets it from here. */
export const SVG_MARKER_LABEL_FONT_PX = 9;
/**
 * The SVG is drawn by whatever the reader opens it with, in whatever sans-serif
 * it has, so a label's width cannot be measured here. Each label is given a
 * width from its length, generous for common sans-serif faces (about 0.5 em a
 * character on average; common practice, no source), and is drawn to exactly
 * that width (textLength), so the boxes placed are the boxes drawn.
 */
const SVG_MARKER_LABEL_EM_PER_CHARACTER = 0.56;
/** Line box of a label: ascent plus descent of common sans-serif faces, about 1.17 em (common practice, no source). */
const SVG_MARKER_LABEL_LINE_PX = Math.ceil(SVG_MARKER_LABEL_FONT_PX * 1.2);
/** Baseline below the top of the line box: the ascent, about 0.93 em. */
const SVG_MARKER_LABEL_BASELINE_PX = SVG_MARKER_LABEL_FONT_PX * 0.93;
const SVG_MARKER_LABEL_METRICS = {
  widthOf: (text: string) => [...text].length * SVG_MARKER_LABEL_FONT_PX * SVG_MARKER_LABEL_EM_PER_CHARACTER,
  lineHeight: SVG_MARKER_LABEL_LINE_PX,
};

const num = (v: number) => Number(v.toFixed(2)).toString();
const pointsAttr = (path: XY[]) => path.map((p) => `${num(p.x)},${num(p.y)}`).join(' ');

export function svgPlot(spec: PlotSpec): string {
  const layout = layoutPlot(spec, FRAME, SVG_MARKER_LABEL_METRICS);
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" class="plot" viewBox="0 0 ${WIDTH} ${HEIGHT}" width="${WIDTH}" height="${HEIGHT}" role="img" aria-label="${escapeHtml(spec.title)}">`);
  out.push(`<text x="${FRAME.left}" y="16" class="plot-title">${escapeHtml(spec.title)}</text>`);
  for (const line of layout.grid) {
    out.push(`<line x1="${num(line.from.x)}" y1="${num(line.from.y)}" x2="${num(line.to.x)}" y2="${num(line.to.y)}" class="${line.major ? 'grid-major' : 'grid-minor'}"/>`);
  }
  for (const band of layout.bands) {
    for (const polygon of band.polygons) out.push(`<polygon points="${pointsAttr(polygon)}" fill="${band.color}" fill-opacity="${TOLERANCE_BAND_OPACITY}" stroke="none"/>`);
  }
  for (const line of layout.lines) {
    for (const path of line.paths) out.push(`<polyline points="${pointsAttr(path)}" fill="none" stroke="${line.color}" stroke-width="1.5"${line.dashed ? ' stroke-dasharray="5 3"' : ''}/>`);
  }
  for (const marker of layout.markers) {
    out.push(`<line x1="${num(marker.from.x)}" y1="${num(marker.from.y)}" x2="${num(marker.to.x)}" y2="${num(marker.to.y)}" stroke="${marker.color}" stroke-width="1" stroke-dasharray="2 2"/>`);
    const box = marker.labelBox;
    out.push(
      `<text x="${num(box.left)}" y="${num(box.top + SVG_MARKER_LABEL_BASELINE_PX)}" textLength="${num(box.width)}" lengthAdjust="spacing" class="marker-label" fill="${marker.color}">${escapeHtml(marker.label)}</text>`,
    );
  }
  for (const series of layout.points) {
    for (const [a, b] of series.errorBars) out.push(`<line x1="${num(a.x)}" y1="${num(a.y)}" x2="${num(b.x)}" y2="${num(b.y)}" stroke="${series.color}" stroke-width="1"/>`);
    for (const dot of series.dots) out.push(`<circle cx="${num(dot.x)}" cy="${num(dot.y)}" r="2.5" fill="${series.color}"/>`);
  }
  out.push(`<rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.width}" height="${FRAME.height}" fill="none" stroke="#000" stroke-width="1"/>`);
  for (const label of layout.xLabels) out.push(`<text x="${num(label.at.x)}" y="${num(label.at.y + 14)}" text-anchor="middle" class="tick">${escapeHtml(label.text)}</text>`);
  for (const label of layout.yLabels) out.push(`<text x="${num(label.at.x - 4)}" y="${num(label.at.y + 3)}" text-anchor="end" class="tick">${escapeHtml(label.text)}</text>`);
  out.push(`<text x="${FRAME.left + FRAME.width / 2}" y="${FRAME.top + FRAME.height + 32}" text-anchor="middle" class="axis-title">${escapeHtml(spec.x.title)}</text>`);
  out.push(`<text transform="translate(14 ${FRAME.top + FRAME.height / 2}) rotate(-90)" text-anchor="middle" class="axis-title">${escapeHtml(spec.y.title)}</text>`);
  const legendX = FRAME.left + FRAME.width + 14;
  layout.legend.forEach((entry, i) => {
    const y = FRAME.top + 8 + i * 16;
    if (entry.style === 'band') out.push(`<rect x="${legendX}" y="${y - 5}" width="18" height="10" fill="${entry.color}" fill-opacity="${TOLERANCE_BAND_OPACITY}"/>`);
    else if (entry.style === 'points') out.push(`<circle cx="${legendX + 9}" cy="${y}" r="3" fill="${entry.color}"/>`);
    else out.push(`<line x1="${legendX}" y1="${y}" x2="${legendX + 18}" y2="${y}" stroke="${entry.color}" stroke-width="1.5"${entry.style === 'line' ? '' : ' stroke-dasharray="4 2"'}/>`);
    const shown = entry.name.length > LEGEND_CHARACTERS ? `${entry.name.slice(0, LEGEND_CHARACTERS - 1)}…` : entry.name;
    out.push(`<text x="${legendX + 24}" y="${y + 3}" class="legend"><title>${escapeHtml(entry.name)}</title>${escapeHtml(shown)}</text>`);
  });
  out.push('</svg>');
  return out.join('\n');
}
