import type { RecordFormat } from '../contract/contract';
import type { AnyRecord } from './model';

/** A file name that is safe on every common file system, e.g. "rolloff-run-12-board-A.pdf". */
export function recordFileName(record: AnyRecord, format: RecordFormat): string {
  const slug = (text: string) => text.normalize('NFKD').replace(/[\u0300-\u036f]/g, '').replace(/[^A-Za-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40);
  const base = record.recordType === 'run' || record.recordType === 'noise-run'
    ? [record.recordType === 'run' ? 'rolloff-run' : 'rolloff-noise-run', String(record.run.id), slug(record.build.label)]
    : ['rolloff-comparison', ...record.runs.map((r) => String(r.run.id)), record.reference === 'theory' ? 'vs-theory' : `vs-run-${record.reference}`];
  return `${base.filter(Boolean).join('-')}.${format}`;
}
