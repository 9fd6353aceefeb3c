/** One entry point from a record to the bytes of a file in any of the four formats. */
import { ValidationError } from '../errors';
import { RECORD_FORMATS, type RecordFormat } from '../contract/contract';
import type { AnyRecord } from './model';
import { pdfRecord, type PdfOptions } from './pdf-record';
import { recordDocument, renderTextRecord, TEXT_MIME_TYPES } from './text-record';
import { recordFileName } from './record-file-name';

export { recordFileName };

export interface RenderedRecord {
  fileName: string;
  mimeType: string;
  bytes: Uint8Array;
}

export async function renderRecord(record: AnyRecord, format: RecordFormat, options: PdfOptions = {}): Promise<RenderedRecord> {
  if (!RECORD_FORMATS.includes(format)) {
    throw new ValidationError('format', `"${format}" is not a record format`, `Choose one of ${RECORD_FORMATS.join(', ')}.`);
  }
  const fileName = recordFileName(record, format);
  if (format === 'pdf') {
    const bytes = await pdfRecord(recordDocument(record), { createdAt: new Date(record.generatedAt), ...options });
    return { fileName, mimeType: 'application/pdf', bytes };
  }
  return { fileName, mimeType: TEXT_MIME_TYPES[format], bytes: new TextEncoder().encode(renderTextRecord(record, format)) };
}
