/**
 * Test records (app/record): build a record from service data, render it as
 * PDF, HTML, CSV or JSON, read JSON and CSV back. See DIGEST.md for the digest.
 */
export { buildRunRecord, type RunRecordContext } from './build-run-record';
export { buildNoiseRunRecord } from './build-noise-record';
export { buildComparisonRecord, type ComparisonRecordContext } from './build-comparison-record';
export { renderRecord, recordFileName, type RenderedRecord } from './render-record';
export { RECORD_FORMATS } from '../contract/contract';
export { recordFromJson, recordToJson, RECORD_SCHEMA } from './json-record';
export { readCsv, writeCsv } from './csv';
export { runDigest, runDigestInput, comparisonDigest, noiseRunDigest, noiseRunDigestInput } from './digest';
export { sha256, sha256Hex } from './sha256';
export { canonicalJson } from './canonical-json';
export type { AnyRecord, ComparisonRecord, NoiseRunRecord, RunRecord, RecordDcFit } from './model';
