/**
 * Test records (app/record): build a record from service data, render it as
 * PDF, HTML, CSV or JSON, read JSON and CSV back. See DIGEST.md for the digest.
 */
export { buildRunRecord, type RunRecordContext } from './buildRunRecord';
export { buildComparisonRecord, type ComparisonRecordContext } from './buildComparisonRecord';
export { renderRecord, recordFileName, type RenderedRecord } from './renderRecord';
export { RECORD_FORMATS } from '../contract/contract';
export { recordFromJson, recordToJson, RECORD_SCHEMA } from './jsonRecord';
export { readCsv, writeCsv } from './csv';
export { runDigest, runDigestInput, comparisonDigest } from './digest';
export { sha256, sha256Hex } from './sha256';
export { canonicalJson } from './canonicalJson';
export type { AnyRecord, ComparisonRecord, RunRecord, RecordDcFit } from './model';
