/**
 * A record as a PDF (pdfkit): A4 pages, the blocks of record-document.ts laid
 * out top to bottom, plots drawn as vector paths, tables split across pages
 * with their header repeated, and a footer with the digest on every page.
 */
import PDFDocument from 'pdfkit';
import type { Block, RecordDocument } from './record-document';
import { choosePdfFonts, type PdfFontSet } from './pdf-fonts';
import { drawPdfPlot, PDF_PLOT_HEIGHT } from './pdf-plot';

type Doc = InstanceType<typeof PDFDocument>;

const PAGE = { width: 595.28, height: 841.89 }; // A4 in points (ISO 216)
const MARGIN = 40;
const CONTENT_WIDTH = PAGE.width - 2 * MARGIN;
const BOTTOM = PAGE.height - MARGIN - 14; // room for the footer

export interface PdfOptions {
  /** Use the PDF standard fonts even when a Unicode font is installed. */
  standardFontsOnly?: boolean;
  /** Fixed creation date, so the same record gives the same file. */
  createdAt?: Date;
}

class PdfFlow {
  y = MARGIN;

  constructor(readonly doc: Doc, readonly fonts: PdfFontSet) {}

  /** Starts a new page unless `height` points still fit on this one. */
  ensure(height: number): void {
    if (this.y + height > BOTTOM) {
      this.doc.addPage();
      this.y = MARGIN;
    }
  }

  /**
   * Writes wrapped text at the cursor and moves the cursor below it. Text taller than
   * what is left of the page continues on the next page (pdfkit breaks it at the
   * bottom margin); the cursor follows to where the text ended.
   */
  text(text: string, options: { font?: string; size?: number; color?: string; x?: number; width?: number; gap?: number } = {}): void {
    const { doc } = this;
    const printable = this.fonts.printable(text);
    doc.font(options.font ?? this.fonts.regular).fontSize(options.size ?? 8.5).fillColor(options.color ?? '#000');
    const width = options.width ?? CONTENT_WIDTH;
    this.ensure(Math.min(doc.heightOfString(printable || ' ', { width }), 3 * doc.currentLineHeight(true)));
    doc.text(printable || ' ', options.x ?? MARGIN, this.y, { width });
    this.y = doc.y + (options.gap ?? 4);
  }
}

function columnWidths(doc: Doc, fonts: PdfFontSet, columns: string[], rows: string[][], total: number): number[] {
  // Each column gets at least its header and its longest word; the space left is shared in
  // proportion to how much more each column would like (its longest cell, capped).
  const minimum: number[] = [];
  const natural: number[] = [];
  columns.forEach((c, i) => {
    doc.font(fonts.bold);
    let least = doc.widthOfString(fonts.printable(c));
    doc.font(fonts.regular);
    let widest = least;
    for (const row of rows.slice(0, 400)) {
      const cell = fonts.printable(row[i] ?? '');
      widest = Math.max(widest, Math.min(doc.widthOfString(cell), 220));
      for (const word of cell.split(/\s+/)) least = Math.max(least, Math.min(doc.widthOfString(word), 60));
    }
    minimum.push(least + 6);
    natural.push(widest + 6);
  });
  const sumMinimum = minimum.reduce((a, b) => a + b, 0);
  const sumNatural = natural.reduce((a, b) => a + b, 0);
  if (sumNatural <= total || sumMinimum >= total) {
    const basis = sumNatural <= total ? natural : minimum;
    const sum = basis.reduce((a, b) => a + b, 0);
    return basis.map((w) => (w * total) / sum);
  }
  const spare = total - sumMinimum;
  const wanted = sumNatural - sumMinimum;
  return minimum.map((least, i) => least + ((natural[i] - least) * spare) / wanted);
}

function drawTable(flow: PdfFlow, block: Extract<Block, { kind: 'table' }>): void {
  const { doc, fonts } = flow;
  if (block.caption) flow.text(block.caption, { size: 7.5, color: '#444', gap: 2 });
  const size = block.columns.length > 8 ? 5.5 : 7;
  doc.fontSize(size);
  const widths = columnWidths(doc, fonts, block.columns, block.rows, CONTENT_WIDTH);
  const rowHeight = (cells: string[], font: string) => {
    doc.font(font).fontSize(size);
    return Math.max(...cells.map((cell, i) => doc.heightOfString(fonts.printable(cell) || ' ', { width: widths[i] - 4 }))) + 3;
  };
  const drawRow = (cells: string[], font: string, shade: boolean) => {
    const height = rowHeight(cells, font);
    let x = MARGIN;
    if (shade) doc.rect(MARGIN, flow.y, CONTENT_WIDTH, height).fill('#efefef');
    doc.font(font).fontSize(size).fillColor('#000');
    cells.forEach((cell, i) => {
      const align = block.alignRight?.[i] ? 'right' : 'left';
      doc.text(fonts.printable(cell), x + 2, flow.y + 1.5, { width: widths[i] - 4, align });
      x += widths[i];
    });
    doc.moveTo(MARGIN, flow.y + height).lineTo(MARGIN + CONTENT_WIDTH, flow.y + height).lineWidth(0.3).strokeColor('#c8c8c8').stroke();
    flow.y += height;
  };
  const headerHeight = rowHeight(block.columns, fonts.bold);
  flow.ensure(headerHeight + (block.rows[0] ? rowHeight(block.rows[0], fonts.regular) : 0));
  drawRow(block.columns, fonts.bold, true);
  for (const row of block.rows) {
    const height = rowHeight(row, fonts.regular);
    if (flow.y + height > BOTTOM) {
      doc.addPage();
      flow.y = MARGIN;
      drawRow(block.columns, fonts.bold, true);
    }
    drawRow(row, fonts.regular, false);
  }
  flow.y += 6;
}

function drawKeyValues(flow: PdfFlow, rows: Array<[string, string]>): void {
  const { doc, fonts } = flow;
  const keyWidth = 150;
  for (const [key, value] of rows) {
    const printableValue = fonts.printable(value);
    doc.font(fonts.regular).fontSize(8);
    const height = Math.max(doc.heightOfString(printableValue || ' ', { width: CONTENT_WIDTH - keyWidth }), doc.font(fonts.bold).heightOfString(fonts.printable(key), { width: keyWidth - 6 }));
    flow.ensure(Math.min(height, 3 * doc.currentLineHeight(true)) + 2);
    doc.font(fonts.bold).fontSize(8).fillColor('#333').text(fonts.printable(key), MARGIN, flow.y, { width: keyWidth - 6 });
    const keyBottom = doc.y;
    const pagesBefore = doc.bufferedPageRange().count;
    // A value taller than the page (very long notes) continues on the next page.
    doc.font(fonts.regular).fontSize(8).fillColor('#000').text(printableValue || ' ', MARGIN + keyWidth, flow.y, { width: CONTENT_WIDTH - keyWidth });
    const samePage = doc.bufferedPageRange().count === pagesBefore;
    flow.y = (samePage ? Math.max(keyBottom, doc.y) : doc.y) + 2;
  }
  flow.y += 4;
}

function drawBlock(flow: PdfFlow, block: Block, next: Block | undefined): void {
  const { doc, fonts } = flow;
  switch (block.kind) {
    case 'heading':
      flow.ensure(next?.kind === 'plot' ? PDF_PLOT_HEIGHT + 30 : 60); // keep a heading with what follows it
      flow.y += 6;
      flow.text(block.text, { font: fonts.bold, size: 11, gap: 2 });
      doc.moveTo(MARGIN, flow.y).lineTo(MARGIN + CONTENT_WIDTH, flow.y).lineWidth(0.5).strokeColor('#999').stroke();
      flow.y += 5;
      return;
    case 'paragraph':
      flow.text(block.text, { color: block.emphasis === 'warning' ? '#8a5a00' : '#000' });
      return;
    case 'keyValues':
      drawKeyValues(flow, block.rows);
      return;
    case 'table':
      drawTable(flow, block);
      return;
    case 'plot':
      flow.ensure(PDF_PLOT_HEIGHT);
      drawPdfPlot(doc, fonts, block.spec, MARGIN, flow.y, CONTENT_WIDTH);
      flow.y += PDF_PLOT_HEIGHT + 6;
      return;
    case 'list':
      for (const item of block.items) flow.text(`•  ${item}`, { x: MARGIN + 6, width: CONTENT_WIDTH - 6, gap: 2 });
      flow.y += 4;
      return;
    case 'verdict': {
      const color = block.pass === null ? '#555555' : block.pass ? '#135e22' : '#8a1d14';
      const fill = block.pass === null ? '#eeeeee' : block.pass ? '#d9f2de' : '#f8d7d5';
      flow.ensure(26);
      doc.rect(MARGIN, flow.y, CONTENT_WIDTH, 20).fill(fill);
      doc.font(fonts.bold).fontSize(12).fillColor(color).text(fonts.printable(`Verdict: ${block.headline}`), MARGIN + 6, flow.y + 5, { width: CONTENT_WIDTH - 12, lineBreak: false });
      flow.y += 24;
      for (const reason of block.reasons) flow.text(`–  ${reason}`, { color, x: MARGIN + 6, width: CONTENT_WIDTH - 6, gap: 1 });
      flow.y += 4;
      return;
    }
    case 'code':
      flow.text(block.caption, { size: 7.5, color: '#444', gap: 2 });
      flow.text(block.text, { font: fonts.mono, size: 6, color: '#222' });
      return;
  }
}

/** Renders a record document to PDF bytes. */
export function pdfRecord(document: RecordDocument, options: PdfOptions = {}): Promise<Uint8Array> {
  const fonts = choosePdfFonts(!options.standardFontsOnly);
  const doc = new PDFDocument({
    size: 'A4',
    // The bottom margin leaves room for the footer; pdfkit breaks long text there.
    margins: { top: MARGIN, bottom: PAGE.height - BOTTOM, left: MARGIN, right: MARGIN },
    bufferPages: true,
    autoFirstPage: true,
    info: { Title: fonts.printable(document.title), Creator: 'Rolloff', Producer: 'Rolloff (pdfkit)', CreationDate: options.createdAt ?? new Date() },
  });
  const chunks: Uint8Array[] = [];
  const done = new Promise<Uint8Array>((resolve, reject) => {
    doc.on('data', (chunk: Uint8Array) => chunks.push(chunk));
    doc.on('end', () => {
      const total = chunks.reduce((n, c) => n + c.length, 0);
      const bytes = new Uint8Array(total);
      let at = 0;
      for (const c of chunks) {
        bytes.set(c, at);
        at += c.length;
      }
      resolve(bytes);
    });
    doc.on('error', reject);
  });

  const flow = new PdfFlow(doc, fonts);
  flow.text(document.title, { font: fonts.bold, size: 15, gap: 4 });
  if (document.banner) flow.text(document.banner, { font: fonts.bold, size: 9, color: '#8a5a00', gap: 6 });
  document.blocks.forEach((block, i) => drawBlock(flow, block, document.blocks[i + 1]));

  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    doc.page.margins.bottom = 0; // writing into the margin must not start a new page
    doc.font(fonts.regular).fontSize(6.5).fillColor('#555');
    const footer = fonts.printable(`${document.footer}   page ${i + 1} of ${range.count}`);
    doc.text(footer, MARGIN, PAGE.height - MARGIN + 4, { width: CONTENT_WIDTH, lineBreak: false, ellipsis: true });
  }
  doc.end();
  return done;
}
