/**
 * JSON form of a record: the record object itself, pretty-printed. Reading one
 * back validates it against record.schema.json, then checks what a schema
 * cannot (column lengths, the digest), so a file that passes rebuilds the record.
 */
import { ValidationError } from '../errors';
import { expectedComparisonDigestHex, expectedRunDigestHex } from './digest';
import type { AnyRecord, RunRecord } from './model';
import { validateAgainstSchema, type JsonSchema } from './schema-validator';
import recordSchema from './record.schema.json';

export const RECORD_SCHEMA = recordSchema as unknown as JsonSchema;

export function recordToJson(record: AnyRecord): string {
  return JSON.stringify(record, null, 2) + '\n';
}

/** Parses and checks a JSON record; `where` names the file for messages. */
export function recordFromJson(text: string, where = 'record'): AnyRecord {
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    throw new ValidationError(where, `is not valid JSON (${(error as Error).message})`, 'Export the record again; the file may be cut short or edited by hand.');
  }
  const problems = validateAgainstSchema(parsed, RECORD_SCHEMA);
  if (problems.length > 0) {
    const list = problems.slice(0, 5).map((p) => `${p.path || '/'} ${p.message}`).join('; ');
    throw new ValidationError(where, `does not match the record schema: ${list}`, 'The file was not written by this version of Rolloff or was edited; see app/record/record.schema.json.');
  }
  const record = parsed as AnyRecord;
  const runs = record.recordType === 'run' ? [record] : record.runs;
  runs.forEach((run) => checkRun(run, `${where} run ${run.run.id}`));
  if (record.recordType === 'comparison') {
    const expected = expectedComparisonDigestHex(record.digest.method, record.reference, record.runs, record.runs.map((r) => r.digest.hex));
    if (expected !== record.digest.hex) throw new ValidationError(`${where}.digest`, 'does not match the runs it lists', 'The record was altered after export.');
  }
  return record;
}

function checkRun(run: RunRecord, where: string): void {
  const length = run.points.step.length;
  for (const [name, values] of Object.entries(run.points)) {
    if ((values as unknown[]).length !== length) throw new ValidationError(`${where}.points.${name}`, `has ${(values as unknown[]).length} values where ${length} were expected`);
  }
  if (expectedRunDigestHex(run) !== run.digest.hex) {
    throw new ValidationError(`${where}.digest`, 'does not match the data in the record', 'The numbers or identifying fields were altered after export.');
  }
}
