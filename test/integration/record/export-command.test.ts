/**
 * `rolloff export` end to end on real data: two builds swept on the simulated
 * bench over TCP on 127.0.0.1 (labelled simulated), stored in a real SQLite
 * file, then exported by the real CLI in a child process. Exporting must never
 * change the database: its bytes, modification time and row counts are compared
 * before and after.
 */
import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { readCsv, recordFromJson, type ComparisonRecord, type RunRecord } from '../../../app/record';
import { openServiceAt } from '../../../app/service/open-service';
import type { RunDetail, SweepRequest } from '../../../app/contract/contract';
import { main } from '../../../app/cli/main';
import { requireTool } from '../../helpers/required-tool';

const run = promisify(execFile);
const hasPdftotext = requireTool('pdftotext');
const ROOT = resolve(__dirname, '../../..');
const CLI = join(ROOT, 'app/cli/bin.mjs');

const folder = mkdtempSync(join(tmpdir(), 'rolloff-export-'));
const databasePath = join(folder, 'bench.sqlite');
const outFolder = join(folder, 'records');
const runIds: number[] = [];
const details: RunDetail[] = [];
let dcRunId = 0;

interface DatabaseState {
  file: { sha256: string; mtimeMs: number; size: number };
  /** SHA-256 of the write-ahead log's bytes; an absent log counts as empty. */
  walSha256: string;
  rows: Record<string, number>;
}

const sha256Of = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');

/**
 * The database file itself, the content of its write-ahead log, and every table's row count.
 * The -shm file is left out on purpose: it is SQLite's shared-memory index, which every
 * reader of a WAL database (read-only ones included) creates or updates and which holds no
 * data (sqlite.org/walformat.html, "the shm file ... does not contain persistent content").
 */
function databaseState(): DatabaseState {
  const walPath = `${databasePath}-wal`;
  const state = {
    file: { sha256: sha256Of(readFileSync(databasePath)), mtimeMs: statSync(databasePath).mtimeMs, size: statSync(databasePath).size },
    walSha256: sha256Of(existsSync(walPath) ? readFileSync(walPath) : Buffer.alloc(0)),
  };
  // Counted through a read-only connection so the count itself cannot write.
  const db = new Database(databasePath, { readonly: true, fileMustExist: true });
  const tables = db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name").all() as Array<{ name: string }>;
  const rows = Object.fromEntries(tables.map(({ name }) => [name, (db.prepare(`SELECT count(*) AS n FROM "${name}"`).get() as { n: number }).n]));
  db.close();
  return { ...state, rows };
}

async function cli(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(process.execPath, [CLI, ...args], { cwd: folder, encoding: 'utf8', env: { ...process.env, ROLLOFF_DB: join(folder, 'no-such.sqlite') } });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failure = error as { code: number; stdout: string; stderr: string };
    return { code: failure.code, stdout: failure.stdout, stderr: failure.stderr };
  }
}

/**
 * The same dispatcher in this process (app/cli/main.ts), output captured: much faster
 * than a child process on a busy machine. A few cases above still go through the real
 * `bin.mjs` in a child process.
 */
async function cliHere(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const capture = (sink: string[]) => ((chunk: string | Uint8Array) => {
    sink.push(typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8'));
    return true;
  }) as typeof process.stdout.write;
  const { write: stdoutWrite } = process.stdout;
  const { write: stderrWrite } = process.stderr;
  const cwd = process.cwd();
  const savedDb = process.env.ROLLOFF_DB;
  process.stdout.write = capture(out);
  process.stderr.write = capture(err);
  process.chdir(folder);
  process.env.ROLLOFF_DB = join(folder, 'no-such.sqlite');
  try {
    const code = await main(args);
    return { code, stdout: out.join(''), stderr: err.join('') };
  } finally {
    process.stdout.write = stdoutWrite;
    process.stderr.write = stderrWrite;
    process.chdir(cwd);
    if (savedDb === undefined) delete process.env.ROLLOFF_DB;
    else process.env.ROLLOFF_DB = savedDb;
  }
}

function request(buildId: number): SweepRequest {
  return {
    buildId, kind: 'ac', from: 100, to: 100e3, pointsPerDecade: 4, spacing: 'log', amplitude: { mode: 'auto' }, measurement: 'scope',
    minCycles: 5, averages: 1, refine: false, operator: 'integration test', notes: 'Simulated bench run for the export test <b>&</b>.',
    limits: { maxDeviationDb: 1, cornerTolerance: 0.1 },
  };
}

let before: DatabaseState;

beforeAll(async () => {
  const service = await openServiceAt(databasePath, { maxStimulusVpp: 1, simulatedBench: { timeScale: 50, noiseVrms: 1e-4, link: 'tcp' } });
  try {
    // Inverting low-pass, gain −10, corner 1/(2π·10 kΩ·15 nF) ≈ 1.06 kHz (template defaults).
    const design = await service.saveDesign(makeDesignFromTemplate('inverting-lowpass', {}));
    const builds = [
      await service.createBuild({ designId: design.id, label: 'Board A <script>alert(1)</script>', notes: 'first board', actualValues: { RF: 10.1e3 } }),
      await service.createBuild({ designId: design.id, label: 'Board B', notes: 'second board, CF from another reel', actualValues: { CF: 16e-9 } }),
    ];
    for (const build of builds) {
      await service.startSimulatedBenchForBuild(build.id);
      const started = await service.startRun(request(build.id));
      expect(await service.waitForRun(started.id)).toBe('done');
      runIds.push(started.id);
      details.push(await service.getRun(started.id));
    }
    // A DC transfer run of the log-stage template on the meter, for the log-stage record.
    const logDesign = await service.saveDesign(makeDesignFromTemplate('log-stage', {}));
    const logBuild = await service.createBuild({ designId: logDesign.id, label: 'Log board', notes: '', actualValues: {} });
    await service.startSimulatedBenchForBuild(logBuild.id);
    await service.setMaxStimulus(12); // a 5 V DC level is a 10 Vpp excursion for the stimulus ceiling
    const dcRun = await service.startRun({
      buildId: logBuild.id, kind: 'dc', from: 1e-3, to: 5, pointsPerDecade: 3, spacing: 'log', amplitude: { mode: 'fixed', vpp: 0 },
      measurement: 'meter', minCycles: 1, averages: 1, refine: false, operator: 'integration test', notes: '',
    });
    expect(await service.waitForRun(dcRun.id)).toBe('done');
    dcRunId = dcRun.id;
  } finally {
    await service.close();
  }
  mkdirSync(outFolder);
  before = databaseState();
}, 120_000);

afterAll(() => rmSync(folder, { recursive: true, force: true }));

describe('rolloff export on a real simulated-bench run', () => {
  it.skipIf(!hasPdftotext)('writes a PDF that names the build, the instruments, the digest and the verdict', async () => {
    const result = await cli('export', String(runIds[0]), '--pdf', '--db', databasePath, '--out', outFolder);
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    const path = /Wrote (.+\.pdf) /.exec(result.stdout)![1];
    expect(path.startsWith(outFolder)).toBe(true);
    const text = (await run('pdftotext', [path, '-'])).stdout.replace(/\s+/g, '');
    expect(text).toContain('BoardA<script>alert(1)</script>');
    for (const instrument of details[0].bench) expect(text).toContain(`${instrument.identity.manufacturer},${instrument.identity.model}`.replace(/\s+/g, ''));
    expect(text).toMatch(/Verdict:(PASS|FAIL)/);
    const json = await cliHere('export', String(runIds[0]), '--json', '--db', databasePath, '--out', '-');
    const record = recordFromJson(json.stdout, 'stdout') as RunRecord;
    expect(text).toContain(record.digest.hex);
  });

  it('JSON and CSV carry the stored numbers exactly', async () => {
    const json = await cliHere('export', String(runIds[1]), '--json', '--db', databasePath, '--out', join(outFolder, 'run.json'));
    expect(json.code).toBe(0);
    const record = recordFromJson(readFileSync(join(outFolder, 'run.json'), 'utf8'), 'run.json') as RunRecord;
    expect(record.run.simulated).toBe(true);
    expect(record.points.gainDb).toEqual(details[1].points.gainDb.map((v) => (Number.isFinite(v) ? v : null)));
    const csv = await cliHere('export', String(runIds[1]), '--csv', '--db', databasePath, '--out', '-');
    const [header, ...rows] = readCsv(csv.stdout);
    expect(rows.map((r) => Number(r[header.indexOf('frequency_hz')]))).toEqual(details[1].points.stimulus);
    expect(rows.map((r) => Number(r[header.indexOf('gain_db')]))).toEqual(details[1].points.gainDb);
  });

  it.skipIf(!hasPdftotext)('a DC log-stage run gives a record with the fitted curve and the fit figures', async () => {
    const result = await cliHere('export', String(dcRunId), '--json', '--db', databasePath, '--out', '-');
    expect(result.code).toBe(0);
    const record = recordFromJson(result.stdout) as RunRecord;
    expect(record.run.kind).toBe('dc');
    expect(record.dcFit?.inputV.length).toBeGreaterThan(10);
    // Log stage: the output falls by about n·V_T·ln 10 ≈ 59 mV per decade of input at 25 °C (DEVELOPERS.md "Theory").
    const fit = record.dcFit!;
    const perDecadeV = (fit.outputV[0] - fit.outputV.at(-1)!) / Math.log10(fit.inputV.at(-1)! / fit.inputV[0]);
    expect(perDecadeV).toBeGreaterThan(0.05);
    expect(perDecadeV).toBeLessThan(0.07);
    expect(record.figures.logFit?.n).toBeGreaterThan(0.9);
    const pdf = await cliHere('export', String(dcRunId), '--pdf', '--db', databasePath, '--out', outFolder);
    expect(pdf.code).toBe(0);
    const path = /Wrote (.+\.pdf) /.exec(pdf.stdout)![1];
    const text = (await run('pdftotext', [path, '-'])).stdout.replace(/\s+/g, '');
    expect(text).toContain('DCtransfer');
    expect(text).toContain('Diodeidealityfactorn');
  });

  it('several runs give a comparison record against the chosen reference', async () => {
    const result = await cliHere('export', String(runIds[1]), '--json', '--reference', String(runIds[0]), '--db', databasePath, '--out', '-');
    expect(result.code).toBe(0);
    const record = recordFromJson(result.stdout) as ComparisonRecord;
    expect(record.recordType).toBe('comparison');
    expect(record.reference).toBe(runIds[0]);
    expect(record.runs.map((r) => r.run.id).sort()).toEqual([...runIds].sort());
    const html = await cli('export', ...runIds.map(String), '--html', '--db', databasePath, '--out', outFolder);
    expect(html.code).toBe(0);
    const file = readdirSync(outFolder).find((f) => f.startsWith('rolloff-comparison-') && f.endsWith('.html'))!;
    const content = readFileSync(join(outFolder, file), 'utf8');
    expect(content).toContain('Board A &lt;script&gt;alert(1)&lt;/script&gt;');
    expect(content).not.toContain('<script>');
  });

  it('refuses bad input with a clear message and writes nothing', async () => {
    const cases: Array<[string[], RegExp]> = [
      [['export', '999', '--pdf', '--db', databasePath], /999/],
      [['export', String(runIds[0]), '--db', databasePath], /no output format/],
      [['export', String(runIds[0]), '--pdf', '--csv', '--db', databasePath], /choose only one format/],
      [['export', 'twelve', '--pdf', '--db', databasePath], /"twelve" is not a run id/],
      [['export', String(runIds[0]), '--pdf', '--reference', 'best', '--db', databasePath], /neither a run id nor "theory"/],
      [['export', String(runIds[0]), '--pdf', '--db', join(folder, 'missing.sqlite')], /no database at this path/],
      [['export', String(runIds[0]), '--pdf', '--db', databasePath, '--out', join(folder, 'nowhere', 'x.pdf')], /does not exist/],
    ];
    const filesBefore = readdirSync(folder).sort();
    for (const [index, [args, message]] of cases.entries()) {
      // The first case through the real bin.mjs (exit code of the process), the rest in-process.
      const result = index === 0 ? await cli(...args) : await cliHere(...args);
      expect(result.code, args.join(' ')).toBe(2);
      expect(result.stderr).toMatch(message);
      expect(result.stderr).not.toMatch(/internal error|    at /);
    }
    expect(readdirSync(folder).sort()).toEqual(filesBefore);
    expect(existsSync(join(folder, 'missing.sqlite'))).toBe(false);
  });

  it('does not replace an existing file unless --force is given', async () => {
    const target = join(outFolder, 'keep.csv');
    writeFileSync(target, 'precious');
    const refused = await cliHere('export', String(runIds[0]), '--csv', '--db', databasePath, '--out', target);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/already exists; nothing was written[\s\S]*--force/);
    expect(readFileSync(target, 'utf8')).toBe('precious');
    const forced = await cliHere('export', String(runIds[0]), '--csv', '--db', databasePath, '--out', target, '--force');
    expect(forced.code).toBe(0);
    expect(readFileSync(target, 'utf8')).toMatch(/^run_id,build_label,step,frequency_hz/);
    expect(readdirSync(outFolder).filter((f) => f.endsWith('.part'))).toEqual([]);
  });

  it('left the database exactly as it was: file bytes, modification time, log content and row counts', () => {
    const after = databaseState();
    expect(after.file).toEqual(before.file);
    expect(after.walSha256).toBe(before.walSha256);
    expect(after.rows).toEqual(before.rows);
    expect(Object.values(after.rows).reduce((a, b) => a + b, 0)).toBeGreaterThan(0);
  });
});

describe('the unchanged-database check', () => {
  it('does notice a write (guards against a vacuous pass)', async () => {
    const service = await openServiceAt(databasePath);
    try {
      await service.createBuild({ designId: details[0].request.buildId ? (await service.listBuilds())[0].designId : 1, label: 'written after the exports', notes: '', actualValues: {} });
    } finally {
      await service.close();
    }
    const after = databaseState();
    expect(after.rows).not.toEqual(before.rows);
  });
});
