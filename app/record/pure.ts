/**
 * The window-safe entry to app/record: everything except the PDF writer (which
 * needs pdfkit and Node). Nothing in the window imports it yet (the Record
 * view asks the service for the file); recordLayering.test.ts keeps it
 * bundleable for the browser. The service and the CLI use index.ts.
 */
export { buildRunRecord, type RunRecordContext } from './buildRunRecord';
export { buildComparisonRecord, type ComparisonRecordContext } from './buildComparisonRecord';
export { renderTextRecord, recordDocument, TEXT_MIME_TYPES, type TextRecordFormat } from './textRecord';
export { recordFromJson, recordToJson, RECORD_SCHEMA } from './jsonRecord';
export { readCsv, writeCsv } from './csv';
export { runDigest, runDigestInput, comparisonDigest } from './digest';
export { sha256, sha256Hex } from './sha256';
export { canonicalJson } from './canonicalJson';
export { runPlots, comparisonPlots } from './recordPlots';
export { svgPlot } from './svgPlot';
export { recordFileName } from './recordFileName';
export type { AnyRecord, ComparisonRecord, RunRecord, RecordDcFit } from './model';
