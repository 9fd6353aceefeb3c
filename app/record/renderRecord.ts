/** One entry point from a record to the bytes of a file in any of the four formats. */
import { ValidationError } from '../errors';
import type { RecordFormat } from '../service/contract';
import { comparisonCsv, runCsv } from './csvRecord';
import { comparisonDocument } from './comparisonDocument';
import { htmlRecord } from './htmlRecord';
import { recordToJson } from './jsonRecord';
import type { AnyRecord } from './model';
import { pdfRecord, type PdfOptions } from './pdfRecord';
import { runDocument } from './runDocument';

export interface RenderedRecord {
  fileName: string;
  mimeType: string;
  bytes: Uint8Array;
}

export const RECORD_FORMATS: readonly RecordFormat[] = ['pdf', 'html', 'csv', 'json'];

const MIME_TYPES: Record<RecordFormat, string> = {
  pdf: 'application/pdf',
  html: 'text/html; charset=utf-8',
  csv: 'text/csv; charset=utf-8; header=present', // RFC 4180 §3
  json: 'application/json',
};

/** A file name that is safe on every common file system, e.g. "rolloff-run-12-board-A.pdf". */
export function recordFileName(record: AnyRecord, format: RecordFormat): string {
  const slug = (text: string) => text.normalize('NFKD').replace(/[\u0300-\u036f]/g, '').replace(/[^A-Za-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40);
  const base = record.recordType === 'run'
    ? ['rolloff-run', String(record.run.id), slug(record.build.label)]
    : ['rolloff-comparison', ...record.runs.map((r) => String(r.run.id)), record.reference === 'theory' ? 'vs-theory' : `vs-run-${record.reference}`];
  return `${base.filter(Boolean).join('-')}.${format}`;
}

export async function renderRecord(record: AnyRecord, format: RecordFormat, options: PdfOptions = {}): Promise<RenderedRecord> {
  if (!RECORD_FORMATS.includes(format)) {
    throw new ValidationError('format', `"${format}" is not a record format`, `Choose one of ${RECORD_FORMATS.join(', ')}.`);
  }
  const encoder = new TextEncoder();
  const document = () => (record.recordType === 'run' ? runDocument(record) : comparisonDocument(record));
  let bytes: Uint8Array;
  switch (format) {
    case 'pdf':
      bytes = await pdfRecord(document(), { createdAt: new Date(record.generatedAt), ...options });
      break;
    case 'html':
      bytes = encoder.encode(htmlRecord(document()));
      break;
    case 'csv':
      bytes = encoder.encode(record.recordType === 'run' ? runCsv(record) : comparisonCsv(record));
      break;
    case 'json':
      bytes = encoder.encode(recordToJson(record));
      break;
  }
  return { fileName: recordFileName(record, format), mimeType: MIME_TYPES[format], bytes };
}
