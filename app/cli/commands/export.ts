/**
 * `rolloff export`: writes the test record of one run, or the comparison
 * record of several, as PDF, HTML, CSV or JSON. The database is opened
 * read-only, so exporting can never change it; the file is written whole to a
 * temporary name and renamed, so an interrupted export leaves no half file.
 */
import { existsSync, renameSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { UserError, ValidationError } from '../../errors';
import type { RecordFormat } from '../../contract/contract';
import { openStore, resolveDatabasePath } from '../../store';
import { exportRecordFor } from '../../service/export';
import { RECORD_FORMATS } from '../../record';
import { runDetail } from '../../read-model/run-detail';
import { compareDetails } from '../../read-model/compare';
import { runOwnerOf, STALE_AFTER_MS } from '../../service/run-ownership';
import { noiseRunDetail } from '../../read-model/noise-run-detail';
import { optionFlag, optionString, type CommandSpec, type ParsedArgs } from '../args';
import { DATABASE_OPTION } from '../common-options';

/** A file that already exists and is not ours to replace. */
export class ExportTargetExistsError extends UserError {}

function runIdsOf(parsed: ParsedArgs): number[] {
  if (parsed.positionals.length === 0) {
    throw new ValidationError('RUN', 'is missing', 'Give one run id for a run record, or several for a comparison (see "rolloff runs" or the History view).');
  }
  const ids = parsed.positionals.map((text, i) => {
    if (!/^[1-9]\d*$/.test(text)) throw new ValidationError(`RUN ${i + 1}`, `"${text}" is not a run id`, 'Run ids are whole numbers such as 12.');
    return Number(text);
  });
  const repeated = ids.find((id, i) => ids.indexOf(id) !== i);
  if (repeated !== undefined) throw new ValidationError('RUN', `run ${repeated} is given twice`, 'List each run once.');
  return ids;
}

function formatOf(parsed: ParsedArgs): RecordFormat {
  const chosen = RECORD_FORMATS.filter((f) => optionFlag(parsed, f));
  if (chosen.length === 1) return chosen[0];
  throw new ValidationError(
    chosen.length === 0 ? 'format' : chosen.map((f) => `--${f}`).join(' '),
    chosen.length === 0 ? 'no output format was chosen' : 'choose only one format',
    'Add exactly one of --pdf, --html, --csv or --json.',
  );
}

function referenceOf(parsed: ParsedArgs): number | 'theory' | undefined {
  const text = optionString(parsed, 'reference');
  if (text === undefined) return undefined;
  if (text === 'theory') return 'theory';
  if (/^[1-9]\d*$/.test(text)) return Number(text);
  throw new ValidationError('--reference', `"${text}" is neither a run id nor "theory"`, 'Use --reference theory or --reference 12.');
}

export interface ExportedBytes {
  fileName: string;
  mimeType: string;
  bytes: Uint8Array;
}

/**
 * The record of runs in a database opened read-only: the service's own export
 * path (app/service/export.ts) over a read-only store, so the CLI, the window
 * and the web host write the same records.
 */
export async function exportFromDatabase(databaseLocation: string, runIds: number[], format: RecordFormat, reference: number | 'theory'): Promise<ExportedBytes> {
  const store = await openStore(databaseLocation, { readonly: true });
  const judgeOwner = (ownership: Parameters<typeof runOwnerOf>[0]) => runOwnerOf(ownership, STALE_AFTER_MS);
  try {
    const source = {
      store,
      getRun: async (runId: number) => runDetail(store, runId, judgeOwner),
      getNoiseRun: async (runId: number) => noiseRunDetail(store, runId, judgeOwner),
      compareRuns: async (ids: number[], ref: number | 'theory') => compareDetails(await Promise.all(ids.map((id) => runDetail(store, id, judgeOwner))), ref),
    };
    const exported = await exportRecordFor(source, runIds, format, reference);
    const bytes = exported.encoding === 'base64' ? new Uint8Array(Buffer.from(exported.content, 'base64')) : new TextEncoder().encode(exported.content);
    return { fileName: exported.fileName, mimeType: exported.mimeType, bytes };
  } finally {
    await store.close();
  }
}

/**
 * Where to write, checked before any work is done: --out as a file, or as an existing
 * folder that receives the record's own file name (known only after rendering).
 */
function targetFor(out: string | undefined, force: boolean): (fileName: string) => string {
  const refuseExisting = (path: string) => {
    if (existsSync(path) && !force) {
      throw new ExportTargetExistsError(`${path} already exists; nothing was written.`, 'Give another --out, or add --force to replace it.');
    }
    return path;
  };
  if (out === undefined) return (fileName) => refuseExisting(resolve(fileName));
  const full = resolve(out);
  if (existsSync(full) && statSync(full).isDirectory()) return (fileName) => refuseExisting(join(full, fileName));
  if (out.endsWith('/') || out.endsWith('\\')) {
    throw new ValidationError('--out', `folder ${out} does not exist`, 'Create the folder first, or give a file name.');
  }
  if (!existsSync(dirname(full))) throw new ValidationError('--out', `folder ${dirname(full)} does not exist`, 'Create the folder first, or write somewhere else.');
  refuseExisting(full);
  return () => refuseExisting(full);
}

function writeWhole(path: string, bytes: Uint8Array): void {
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.part`);
  try {
    writeFileSync(temporary, bytes, { flag: 'wx' });
    renameSync(temporary, path);
  } catch (error) {
    if (existsSync(temporary)) unlinkSync(temporary);
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'EACCES' || code === 'EROFS' || code === 'ENOSPC' || code === 'EISDIR' || code === 'EEXIST') {
      throw new UserError(`cannot write ${path}: ${(error as Error).message}`, 'Choose a folder you may write to with --out.');
    }
    throw error;
  }
}

export const exportCommand: CommandSpec = {
  name: 'export',
  summary: 'Write the test record of a run (or a comparison of several) as PDF, HTML, CSV or JSON',
  usage: 'RUN... (--pdf | --html | --csv | --json) [options]',
  options: [
    { name: 'pdf', kind: 'flag', description: 'PDF with vector Bode plots, tables, digest and safety notice' },
    { name: 'html', kind: 'flag', description: 'one self-contained HTML file (inline SVG plots, no scripts)' },
    { name: 'csv', kind: 'flag', description: 'the points as RFC 4180 CSV, units in the column names: frequency_hz or input_v_dc, stimulus_setting_vpp (the generator setting), output_v_peak (scope), output_v_rms (meter) or output_v_dc (DC runs, which carry no gain or phase columns)' },
    { name: 'json', kind: 'flag', description: 'everything needed to rebuild the record (schema: app/record/record.schema.json)' },
    { name: 'out', kind: 'string', placeholder: 'PATH', description: 'file to write, or an existing folder; "-" writes to standard output (default: record name in the current folder)' },
    { name: 'force', kind: 'flag', description: 'replace the --out file if it exists' },
    { ...DATABASE_OPTION, description: `${DATABASE_OPTION.description}; only read` },
    { name: 'reference', kind: 'string', placeholder: 'RUN|theory', description: 'comparisons: difference against this run or against each run\'s own theory (default theory)' },
  ],
  details: `
One RUN gives a run record (measured over theory); several give a comparison
record (overlay, difference from the reference, figures with deltas and
verdicts). --reference with a run not listed adds that run. The database is
only read.
The record carries a SHA-256 digest of the run data; app/record/DIGEST.md says
exactly what is hashed so anyone can recompute it.
Examples:
  rolloff export 12 --pdf
  rolloff export 12 15 --html --reference 12 --out records/
  rolloff export 12 --csv --out - > run12.csv`,
  async run(parsed) {
    const format = formatOf(parsed);
    let runIds = runIdsOf(parsed);
    const reference = referenceOf(parsed);
    if (typeof reference === 'number' && !runIds.includes(reference)) runIds = [reference, ...runIds];
    const databasePath = resolveDatabasePath(optionString(parsed, 'db'));
    const out = optionString(parsed, 'out');
    const target = out === '-' ? undefined : targetFor(out, optionFlag(parsed, 'force'));
    const exported = await exportFromDatabase(databasePath, runIds, format, reference ?? 'theory');
    if (!target) {
      process.stdout.write(exported.bytes);
      return 0;
    }
    const path = target(exported.fileName);
    writeWhole(path, exported.bytes);
    process.stdout.write(`Wrote ${path} (${exported.bytes.length} bytes, ${exported.mimeType.split(';')[0]})\n`);
    return 0;
  },
};
