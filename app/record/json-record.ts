/**
 * JSON form of a record: the record object itself, pretty-printed. Reading one
 * back validates it against record.schema.json, then checks what a schema
 * cannot (column lengths, the digest), so a file that passes rebuilds the record.
 *
 * Format 1 files (point keys amplitudeVpp and outputV) are read too: checked
 * as written, held in memory with format 2's keys so every writer renders them,
 * and written back with their own keys, so their digest still holds.
 */
import { ValidationError } from '../errors';
import { expectedComparisonDigestHex, expectedRunDigestHex, noiseRunDigest } from './digest';
import { OUTPUT_KEY, outputReadingOf } from '../contract/vocabulary';
import { RECORD_FORMAT_VERSION, type AnyRecord, type NoiseRunRecord, type RecordFormatVersion, type RunRecord } from './model';
import { validateAgainstSchema, type JsonSchema } from './schema-validator';
import recordSchema from './record.schema.json';

export const RECORD_SCHEMA = recordSchema as unknown as JsonSchema;

const KNOWN_FORMATS: RecordFormatVersion[] = [1, RECORD_FORMAT_VERSION];

export function recordToJson(record: AnyRecord): string {
  return JSON.stringify(asWritten(record), null, 2) + '\n';
}

type Points = Record<string, unknown>;

/** The output key of a run's points in memory (format 2's name for its reading). */
function outputKeyOf(run: Pick<RunRecord, 'run'>): string {
  return OUTPUT_KEY[outputReadingOf(run.run.kind, run.run.plan.measurement)];
}

/** Renames point keys of every run of a format-1 record; format 2 records pass unchanged. */
function mapRuns(record: AnyRecord, rename: (points: Points, outputKey: string) => Points): AnyRecord {
  if (record.formatVersion !== 1) return record;
  const run = (r: RunRecord): RunRecord => ({ ...r, points: rename(r.points as unknown as Points, outputKeyOf(r)) as unknown as RunRecord['points'] });
  return record.recordType === 'run' ? run(record) : { ...record, runs: record.runs.map(run) };
}

/** Format 1's keys, in the order format 1 wrote them. */
function asWritten(record: AnyRecord): AnyRecord {
  return mapRuns(record, (points, outputKey) => {
    const { stimulusSettingVpp, [outputKey]: output, ...others } = points;
    const { flags, measuredAt, ...columns } = others;
    const { step, stimulus, ...rest } = columns;
    return { step, stimulus, amplitudeVpp: stimulusSettingVpp, ...rest, outputV: output, flags, measuredAt };
  });
}

/** Format 2's keys for the points of a format-1 file. */
function inMemory(record: AnyRecord): AnyRecord {
  return mapRuns(record, (points, outputKey) => {
    const { amplitudeVpp, outputV, flags, measuredAt, ...others } = points;
    const { step, stimulus, ...rest } = others;
    return { step, stimulus, stimulusSettingVpp: amplitudeVpp, ...rest, [outputKey]: outputV, flags, measuredAt };
  });
}

/** Parses and checks a JSON record; `where` names the file for messages. */
export function recordFromJson(text: string, where = 'record'): AnyRecord {
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    throw new ValidationError(where, `is not valid JSON (${(error as Error).message})`, 'Export the record again; the file may be cut short or edited by hand.');
  }
  const version = (parsed as { formatVersion?: unknown })?.formatVersion;
  if (typeof version === 'number' && !KNOWN_FORMATS.includes(version as RecordFormatVersion)) {
    throw new ValidationError(`${where}.formatVersion`, `is ${version}; this Rolloff reads formats ${KNOWN_FORMATS.join(' and ')}`, 'It was written by a newer Rolloff: read it with that version, or export the run again with this one.');
  }
  const problems = validateAgainstSchema(parsed, RECORD_SCHEMA);
  if (problems.length > 0) {
    const list = problems.slice(0, 5).map((p) => `${p.path || '/'} ${p.message}`).join('; ');
    throw new ValidationError(where, `does not match the record schema: ${list}`, 'The file was not written by this version of Rolloff or was edited; see app/record/record.schema.json.');
  }
  const record = parsed as AnyRecord;
  if (record.recordType === 'noise-run') {
    checkNoiseRun(record, `${where} run ${record.run.id}`);
    return record;
  }
  const runs = record.recordType === 'run' ? [record] : record.runs;
  runs.forEach((run) => checkRun(run, `${where} run ${run.run.id}`));
  if (record.recordType === 'comparison') {
    const expected = expectedComparisonDigestHex(record.digest.method, record.reference, record.runs, record.runs.map((r) => r.digest.hex));
    if (expected !== record.digest.hex) throw new ValidationError(`${where}.digest`, 'does not match the runs it lists', 'The record was altered after export.');
  }
  return inMemory(record);
}

/** Checks a run as the file holds it (the digest covers the points under the file's own keys). */
function checkRun(run: RunRecord, where: string): void {
  const expected = run.formatVersion === 1 ? 'outputV' : outputKeyOf(run);
  if (!(expected in run.points)) throw new ValidationError(`${where}.points`, `has no ${expected}, the output of a ${run.run.kind} run read by the ${run.run.plan.measurement}`, 'The record was altered after export.');
  const length = run.points.step.length;
  for (const [name, values] of Object.entries(run.points)) {
    if ((values as unknown[]).length !== length) throw new ValidationError(`${where}.points.${name}`, `has ${(values as unknown[]).length} values where ${length} were expected`);
  }
  if (expectedRunDigestHex(run) !== run.digest.hex) {
    throw new ValidationError(`${where}.digest`, 'does not match the data in the record', 'The numbers or identifying fields were altered after export.');
  }
}

function checkNoiseRun(record: NoiseRunRecord, where: string): void {
  for (const [part, columns] of [['records', record.records], ['density', record.density]] as const) {
    const length = Object.values(columns)[0].length;
    for (const [name, values] of Object.entries(columns)) {
      if ((values as unknown[]).length !== length) throw new ValidationError(`${where}.${part}.${name}`, `has ${(values as unknown[]).length} values where ${length} were expected`);
    }
  }
  if (noiseRunDigest(record).hex !== record.digest.hex) {
    throw new ValidationError(`${where}.digest`, 'does not match the data in the record', 'The numbers or identifying fields were altered after export.');
  }
}
