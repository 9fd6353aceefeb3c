/**
 * The window-safe entry to app/record: everything except the PDF writer (which
 * needs pdfkit and Node). Nothing in the window imports it yet (the Record
 * view asks the service for the file); record-layering.test.ts keeps it
 * bundleable for the browser. The service and the CLI use index.ts.
 */
export { buildRunRecord, type RunRecordContext } from './build-run-record';
export { buildComparisonRecord, type ComparisonRecordContext } from './build-comparison-record';
export { buildNoiseRunRecord } from './build-noise-record';
export { renderTextRecord, recordDocument, TEXT_MIME_TYPES, type TextRecordFormat } from './text-record';
export { recordFromJson, recordToJson, RECORD_SCHEMA } from './json-record';
export { readCsv, writeCsv } from './csv';
export { runDigest, runDigestInput, comparisonDigest, noiseRunDigest, noiseRunDigestInput } from './digest';
export { offlinePeriodsText } from './record-formatting';
export { sha256, sha256Hex } from './sha256';
export { canonicalJson } from './canonical-json';
export { runPlots, comparisonPlots, noisePlots } from './record-plots';
export { svgPlot } from './svg-plot';
export { recordFileName } from './record-file-name';
export type { AnyRecord, ComparisonRecord, NoiseRunRecord, RunRecord, RecordDcFit } from './model';
