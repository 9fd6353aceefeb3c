/**
 * The text formats of a record (HTML, CSV, JSON) without the PDF writer, so the
 * window can render them too: this file and everything it imports are pure.
 */
import type { AnyRecord } from './model';
import { comparisonCsv, noiseCsv, runCsv } from './csv-record';
import { noiseDocument } from './noise-document';
import { comparisonDocument } from './comparison-document';
import { htmlRecord } from './html-record';
import { recordToJson } from './json-record';
import { runDocument } from './run-document';
import type { RecordDocument } from './record-document';

export type TextRecordFormat = 'html' | 'csv' | 'json';

export const TEXT_MIME_TYPES: Record<TextRecordFormat, string> = {
  html: 'text/html; charset=utf-8',
  csv: 'text/csv; charset=utf-8; header=present', // RFC 4180 §3
  json: 'application/json',
};

/** The blocks a record shows, in order (shared by HTML and PDF). */
export function recordDocument(record: AnyRecord): RecordDocument {
  if (record.recordType === 'noise-run') return noiseDocument(record);
  return record.recordType === 'run' ? runDocument(record) : comparisonDocument(record);
}

export function renderTextRecord(record: AnyRecord, format: TextRecordFormat): string {
  switch (format) {
    case 'html':
      return htmlRecord(recordDocument(record));
    case 'csv':
      if (record.recordType === 'noise-run') return noiseCsv(record);
      return record.recordType === 'run' ? runCsv(record) : comparisonCsv(record);
    case 'json':
      return recordToJson(record);
  }
}
