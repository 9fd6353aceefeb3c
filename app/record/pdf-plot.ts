/** Draws a laid-out plot (plot-spec.ts) on a PDF page as vector paths, with its legend. */
import type PDFDocument from 'pdfkit';
import { layoutPlot, type Frame, type PlotSpec, type XY } from './plot-spec';
import type { PdfFontSet } from './pdf-fonts';
import { TOLERANCE_BAND_OPACITY } from '../contract/plot-palette';

type Doc = InstanceType<typeof PDFDocument>;

export const PDF_PLOT_HEIGHT = 250;
const MARKER_LABEL_FONT_PT = 5.5;

function polyline(doc: Doc, path: XY[]): void {
  doc.moveTo(path[0].x, path[0].y);
  for (let i = 1; i < path.length; i++) doc.lineTo(path[i].x, path[i].y);
}

function label(doc: Doc, fonts: PdfFontSet, text: string, x: number, y: number, align: 'left' | 'center' | 'right' = 'left'): void {
  const printable = fonts.printable(text);
  const width = doc.widthOfString(printable);
  const left = align === 'center' ? x - width / 2 : align === 'right' ? x - width : x;
  doc.text(printable, left, y, { lineBreak: false });
}

/** Draws the plot with its top-left corner at (left, top) in a box `width` wide. */
export function drawPdfPlot(doc: Doc, fonts: PdfFontSet, spec: PlotSpec, left: number, top: number, width: number): void {
  const legendWidth = 150;
  const frame: Frame = { left: left + 46, top: top + 18, width: width - legendWidth - 60, height: PDF_PLOT_HEIGHT - 58 };
  doc.save();
  // Marker labels are measured in the font they are drawn in, so the placement holds on the page.
  doc.font(fonts.regular).fontSize(MARKER_LABEL_FONT_PT);
  const layout = layoutPlot(spec, frame, { widthOf: (text) => doc.widthOfString(fonts.printable(text)), lineHeight: doc.currentLineHeight() });
  doc.font(fonts.bold).fontSize(9).fillColor('#000');
  label(doc, fonts, spec.title, frame.left, top + 2);

  doc.lineWidth(0.4);
  for (const line of layout.grid) {
    doc.moveTo(line.from.x, line.from.y).lineTo(line.to.x, line.to.y).strokeColor(line.major ? '#b0b0b0' : '#e0e0e0').stroke();
  }
  for (const band of layout.bands) {
    for (const polygon of band.polygons) {
      doc.save();
      doc.fillOpacity(TOLERANCE_BAND_OPACITY);
      polyline(doc, polygon);
      doc.closePath().fill(band.color);
      doc.restore();
    }
  }
  doc.lineWidth(1);
  for (const line of layout.lines) {
    if (line.dashed) doc.dash(4, { space: 2 });
    for (const path of line.paths) {
      polyline(doc, path);
      doc.strokeColor(line.color).stroke();
    }
    if (line.dashed) doc.undash();
  }
  doc.lineWidth(0.6).dash(2, { space: 2 });
  doc.font(fonts.regular).fontSize(MARKER_LABEL_FONT_PT);
  for (const marker of layout.markers) {
    doc.moveTo(marker.from.x, marker.from.y).lineTo(marker.to.x, marker.to.y).strokeColor(marker.color).stroke();
    doc.fillColor(marker.color);
    label(doc, fonts, marker.label, marker.labelBox.left, marker.labelBox.top);
  }
  doc.undash().lineWidth(0.6);
  for (const series of layout.points) {
    for (const [a, b] of series.errorBars) doc.moveTo(a.x, a.y).lineTo(b.x, b.y).strokeColor(series.color).stroke();
    for (const dot of series.dots) doc.circle(dot.x, dot.y, 1.6).fill(series.color);
  }
  doc.lineWidth(0.8).rect(frame.left, frame.top, frame.width, frame.height).strokeColor('#000').stroke();

  doc.font(fonts.regular).fontSize(6.5).fillColor('#000');
  for (const l of layout.xLabels) label(doc, fonts, l.text, l.at.x, l.at.y + 3, 'center');
  for (const l of layout.yLabels) label(doc, fonts, l.text, l.at.x - 3, l.at.y - 3, 'right');
  doc.fontSize(7.5);
  label(doc, fonts, spec.x.title, frame.left + frame.width / 2, frame.top + frame.height + 14, 'center');
  doc.save();
  doc.rotate(-90, { origin: [left + 6, frame.top + frame.height / 2] });
  label(doc, fonts, spec.y.title, left + 6, frame.top + frame.height / 2 - 4, 'center');
  doc.restore();

  const legendLeft = frame.left + frame.width + 10;
  doc.fontSize(6.5);
  layout.legend.forEach((entry, i) => {
    const y = frame.top + 6 + i * 11;
    doc.save();
    if (entry.style === 'band') doc.fillOpacity(TOLERANCE_BAND_OPACITY).rect(legendLeft, y - 3, 14, 6).fill(entry.color);
    else if (entry.style === 'points') doc.circle(legendLeft + 7, y, 1.8).fill(entry.color);
    else {
      doc.lineWidth(1);
      if (entry.style !== 'line') doc.dash(entry.style === 'marker' ? 2 : 4, { space: 2 });
      doc.moveTo(legendLeft, y).lineTo(legendLeft + 14, y).strokeColor(entry.color).stroke();
      doc.undash();
    }
    doc.restore();
    doc.fillColor('#000');
    const name = fonts.printable(entry.name);
    doc.text(name, legendLeft + 18, y - 3, { width: width - (legendLeft + 18 - left), lineBreak: false, ellipsis: true, height: 9 });
  });
  doc.restore();
}
