/**
 * The SQLite store against real database files in a temp folder: migrations,
 * version refusal, damaged files left untouched, crash durability of a point,
 * idempotent resume, and the row ↔ contract conversion.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import type { SweepPlanSummary, SweepRequest } from '../../../app/contract/contract';
import { SOFTWARE_VERSION } from '../../../app/contract/version';
import {
  DEFAULT_MIGRATIONS_DIR,
  DuplicateStepError,
  RecordNotFoundError,
  SqliteStore,
  StoreDamagedError,
  StoreUnavailableError,
  StoreVersionError,
  loadMigrations,
  type NewPoint,
} from '../../../app/store';
import { ValidationError } from '../../../app/errors';

let folder: string;
const open: SqliteStore[] = [];

beforeEach(() => {
  folder = mkdtempSync(join(tmpdir(), 'rolloff-store-'));
});

afterEach(async () => {
  for (const store of open.splice(0)) await store.close();
  rmSync(folder, { recursive: true, force: true });
});

function openStore(name = 'test.sqlite', options: Parameters<typeof SqliteStore.open>[1] = {}): SqliteStore {
  const store = SqliteStore.open(join(folder, name), options);
  open.push(store);
  return store;
}

function sha256(path: string): string {
  return createHash('sha256').update(readFileSync(path)).digest('hex');
}

const request: SweepRequest = {
  buildId: 1,
  kind: 'ac',
  from: 10,
  to: 100e3,
  pointsPerDecade: 10,
  spacing: 'log',
  amplitude: { mode: 'fixed', vpp: 1 },
  measurement: 'scope',
  minCycles: 5,
  averages: 1,
  refine: false,
  operator: 'demo operator (invented)',
  notes: '',
};
const plan: SweepPlanSummary = {
  steps: Array.from({ length: 41 }, (_, index) => ({ index, stimulus: 10 * 10 ** (index / 10), amplitudeVpp: 1, settleS: 0.1, integrateS: 0.2 })),
  estimatedDurationS: 60,
  warnings: [],
};

function point(step: number, overrides: Partial<NewPoint> = {}): NewPoint {
  return {
    step,
    stimulus: 10 * 10 ** (step / 10),
    amplitudeVpp: 1,
    inputReading: 0.5,
    outputReading: 5,
    gainDb: 20 - step * 0.1,
    gainUncertaintyDb: 0.01,
    phaseDeg: 180 - step,
    phaseUncertaintyDeg: 0.1,
    outputV: Number.NaN,
    flags: 0,
    measuredAt: `2026-01-01T00:00:${String(step % 60).padStart(2, '0')}.000Z`,
    ...overrides,
  };
}

async function seedRun(store: SqliteStore, label = 'board 1', notes = 'first light') {
  const design = await store.saveDesign({ name: 'inverting ×10 (demo, invented)', design: { parts: [{ id: 'R1', value: 1e3 }] } });
  const build = await store.createBuild({ designId: design.id, label, notes: 'hand soldered', actualValues: { R1: 998.2 } });
  const run = await store.createRun({
    buildId: build.id,
    kind: 'ac',
    request: { ...request, buildId: build.id },
    plan,
    softwareVersion: SOFTWARE_VERSION,
    bench: [],
    operator: 'demo operator (invented)',
    notes,
    simulated: true,
  });
  return { design, build, run };
}

describe('opening and migrations', () => {
  it('creates the file, applies every migration once, and sets WAL, FULL sync and foreign keys', async () => {
    const store = openStore('nested/folder/new.sqlite');
    const migrations = loadMigrations();
    expect(store.appliedMigrations).toEqual(migrations.map((m) => m.version));
    expect(await store.schemaVersion()).toBe(migrations.length);
    await store.close();

    const raw = new Database(join(folder, 'nested/folder/new.sqlite'), { readonly: true });
    expect(raw.pragma('user_version', { simple: true })).toBe(migrations.length);
    expect(raw.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(raw.pragma('page_size', { simple: true })).toBe(16384);
    const rows = raw.prepare('SELECT version, name, app_version FROM schema_migrations ORDER BY version').all();
    expect(rows).toEqual(migrations.map((m) => ({ version: m.version, name: m.name, app_version: SOFTWARE_VERSION })));
    raw.close();

    const again = openStore('nested/folder/new.sqlite');
    expect(again.appliedMigrations).toEqual([]);
  });

  it('runs each connection with synchronous=FULL and foreign_keys=ON', async () => {
    const store = openStore();
    // Read through the store's own connection: these pragmas are per connection.
    const db = (store as unknown as { db: Database.Database }).db;
    expect(db.pragma('synchronous', { simple: true })).toBe(2); // 2 = FULL (SQLite PRAGMA synchronous documentation)
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
  });

  it('applies a later migration to an existing database in order, keeping its data', async () => {
    const migrationsDir = join(folder, 'migrations');
    mkdirSync(migrationsDir);
    for (const name of readdirSync(DEFAULT_MIGRATIONS_DIR)) copyFileSync(join(DEFAULT_MIGRATIONS_DIR, name), join(migrationsDir, name));
    const first = openStore('upgrade.sqlite', { migrationsDir });
    const { run } = await seedRun(first);
    await first.close();
    const next = loadMigrations().length + 1;
    writeFileSync(join(migrationsDir, `${String(next).padStart(4, '0')}_add_run_tag.sql`), "ALTER TABLE runs ADD COLUMN tag TEXT NOT NULL DEFAULT '';\n");
    const upgraded = openStore('upgrade.sqlite', { migrationsDir });
    expect(upgraded.appliedMigrations).toEqual([next]);
    expect(await upgraded.schemaVersion()).toBe(next);
    expect((await upgraded.getRun(run.id)).notes).toBe('first light');
  });

  it('rolls back a failing migration completely and leaves the version where it was', async () => {
    const migrationsDir = join(folder, 'migrations');
    mkdirSync(migrationsDir);
    for (const name of readdirSync(DEFAULT_MIGRATIONS_DIR)) copyFileSync(join(DEFAULT_MIGRATIONS_DIR, name), join(migrationsDir, name));
    await openStore('broken.sqlite', { migrationsDir }).close();
    const next = loadMigrations().length + 1;
    writeFileSync(join(migrationsDir, `${String(next).padStart(4, '0')}_broken.sql`), 'CREATE TABLE half_done (x INTEGER);\nTHIS IS NOT SQL;\n');
    expect(() => SqliteStore.open(join(folder, 'broken.sqlite'), { migrationsDir })).toThrow();
    const raw = new Database(join(folder, 'broken.sqlite'), { readonly: true });
    expect(raw.pragma('user_version', { simple: true })).toBe(next - 1);
    expect(raw.prepare("SELECT name FROM sqlite_master WHERE name = 'half_done'").get()).toBeUndefined();
    raw.close();
  });

  it('migrates a new file once when two processes open it at the same moment', async () => {
    const path = join(folder, 'shared.sqlite');
    const openInChild = () =>
      new Promise<{ code: number | null; stdout: string; stderr: string }>((resolve) => {
        const child = spawn(process.execPath, ['--import', 'tsx', join(__dirname, 'open-and-report.ts'), path], { stdio: ['ignore', 'pipe', 'pipe'] });
        let stdout = '';
        let stderr = '';
        child.stdout.on('data', (chunk) => (stdout += chunk));
        child.stderr.on('data', (chunk) => (stderr += chunk));
        child.on('exit', (code) => resolve({ code, stdout, stderr }));
      });
    const results = await Promise.all([openInChild(), openInChild()]);
    expect(results.map((r) => ({ code: r.code, stderr: r.stderr }))).toEqual([{ code: 0, stderr: '' }, { code: 0, stderr: '' }]);
    const applied = results.flatMap((r) => JSON.parse(r.stdout) as number[]);
    expect(applied.sort()).toEqual(loadMigrations().map((m) => m.version)); // each migration applied by exactly one process
  });

  it('refuses misnumbered migration folders', async () => {
    const migrationsDir = join(folder, 'gappy');
    mkdirSync(migrationsDir);
    writeFileSync(join(migrationsDir, '0001_a.sql'), 'CREATE TABLE a (x);');
    writeFileSync(join(migrationsDir, '0003_c.sql'), 'CREATE TABLE c (x);');
    expect(() => loadMigrations(migrationsDir)).toThrow(/without gaps/);
  });

  it('refuses a database from a newer Rolloff, naming both versions, and leaves it untouched', async () => {
    const path = join(folder, 'future.sqlite');
    await openStore('future.sqlite').close();
    const raw = new Database(path);
    raw.prepare("INSERT INTO schema_migrations (version, name, applied_at, app_version) VALUES (99, 'future', '2030-01-01T00:00:00Z', '9.4.0')").run();
    raw.pragma('user_version = 99');
    raw.pragma('journal_mode = DELETE'); // so the file alone holds the state we hash
    raw.close();
    const before = sha256(path);
    let error: unknown;
    try {
      SqliteStore.open(path);
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(StoreVersionError);
    expect((error as Error).message).toContain('schema version 99');
    expect((error as Error).message).toContain('Rolloff 9.4.0');
    expect((error as StoreVersionError).hint).toContain('9.4.0');
    expect(sha256(path)).toBe(before);
    expect(existsSync(`${path}-wal`)).toBe(false);
  });

  it('refuses a file of random bytes without changing it or creating side files', async () => {
    const path = join(folder, 'noise.sqlite');
    writeFileSync(path, randomBytes(8192));
    const before = sha256(path);
    expect(() => SqliteStore.open(path)).toThrow(StoreDamagedError);
    expect(() => SqliteStore.open(path, { readonly: true })).toThrow(StoreDamagedError);
    expect(sha256(path)).toBe(before);
    expect(readdirSync(folder)).toEqual(['noise.sqlite']);
  });

  it('refuses a truncated database without changing it', async () => {
    const path = join(folder, 'cut.sqlite');
    const store = openStore('cut.sqlite');
    const { run } = await seedRun(store);
    await store.insertPoints(run.id, Array.from({ length: 2000 }, (_, i) => point(i)));
    await store.close();
    const size = readFileSync(path).length;
    expect(existsSync(`${path}-wal`)).toBe(false); // close() checkpoints and removes the WAL
    truncateSync(path, Math.floor(size / 2));
    const before = sha256(path);
    let error: unknown;
    try {
      SqliteStore.open(path);
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(StoreDamagedError);
    expect((error as Error).message).toMatch(/truncated/);
    expect((error as StoreDamagedError).hint).toMatch(/untouched/);
    expect(sha256(path)).toBe(before);
  });

  it('refuses another program\'s SQLite database instead of adding tables to it', async () => {
    const path = join(folder, 'other.sqlite');
    const raw = new Database(path);
    raw.exec('CREATE TABLE recipes (id INTEGER PRIMARY KEY, title TEXT)');
    raw.close();
    const before = sha256(path);
    expect(() => SqliteStore.open(path)).toThrow(/another program/);
    expect(sha256(path)).toBe(before);
  });

  it('opens read-only without writing, and refuses writes and missing files clearly', async () => {
    const store = openStore('ro.sqlite');
    await seedRun(store);
    await store.close();
    const path = join(folder, 'ro.sqlite');
    const before = sha256(path);
    const readonly = openStore('ro.sqlite', { readonly: true });
    expect(await readonly.listRuns()).toHaveLength(1);
    await expect(readonly.saveDesign({ name: 'x', design: {} })).rejects.toThrow(StoreUnavailableError);
    await readonly.close();
    expect(sha256(path)).toBe(before);
    expect(() => SqliteStore.open(join(folder, 'absent.sqlite'), { readonly: true })).toThrow(/no database at this path/);
    expect(() => SqliteStore.open(folder)).toThrow(/is a folder/);
  });
});

describe('points', () => {
  it('round-trips points as columns in step order, with NaN for missing values', async () => {
    const store = openStore();
    const { run } = await seedRun(store);
    for (const step of [2, 0, 1]) await store.insertPoint(run.id, point(step, step === 1 ? { gainDb: Number.NaN, flags: 1 | 4 } : {}));
    const columns = await store.loadPoints(run.id);
    expect(columns.step).toEqual([0, 1, 2]);
    expect(columns.stimulus[2]).toBeCloseTo(10 * 10 ** 0.2, 12);
    expect(Number.isNaN(columns.gainDb[1])).toBe(true);
    expect(columns.gainDb[2]).toBeCloseTo(19.8, 12);
    expect(columns.flags).toEqual([0, 5, 0]);
    expect(columns.outputV.every(Number.isNaN)).toBe(true);
    expect(columns.measuredAt[1]).toBe('2026-01-01T00:00:01.000Z');
    // Times are kept as UTC instants: an offset given on the way in comes back as Z (ISO 8601 equivalence).
    await store.insertPoint(run.id, point(3, { measuredAt: '2026-01-01T02:00:00+02:00' }));
    expect((await store.loadPoints(run.id)).measuredAt[3]).toBe('2026-01-01T00:00:00.000Z');
    expect((await store.listRuns())[0].pointCount).toBe(4);
    expect(await store.nextStep(run.id)).toBe(4);
  });

  it('refuses a duplicate step with DuplicateStepError and stores it only once', async () => {
    const store = openStore();
    const { run } = await seedRun(store);
    await store.insertPoint(run.id, point(0));
    await store.insertPoint(run.id, point(1));
    await expect(store.insertPoint(run.id, point(1, { gainDb: 99 }))).rejects.toThrow(DuplicateStepError);
    const columns = await store.loadPoints(run.id);
    expect(columns.step).toEqual([0, 1]);
    expect(columns.gainDb[1]).toBeCloseTo(19.9, 12);
    expect((await store.getRun(run.id)).pointCount).toBe(2);
    // A batch containing a stored step is refused whole.
    await expect(store.insertPoints(run.id, [point(2), point(1)])).rejects.toThrow(DuplicateStepError);
    expect((await store.loadPoints(run.id)).step).toEqual([0, 1]);
    expect((await store.getRun(run.id)).pointCount).toBe(2);
  });

  it('refuses bad points and unknown runs with the place named', async () => {
    const store = openStore();
    const { run } = await seedRun(store);
    await expect(store.insertPoint(run.id, point(-1))).rejects.toThrow(/point.step/);
    await expect(store.insertPoint(run.id, point(0, { stimulus: Number.NaN }))).rejects.toThrow(/point.stimulus/);
    await expect(store.insertPoint(run.id, point(0, { flags: 1.5 }))).rejects.toThrow(ValidationError);
    await expect(store.insertPoint(run.id, point(0, { measuredAt: 'yesterday' }))).rejects.toThrow(/point.measuredAt/);
    await expect(store.insertPoint(999, point(0))).rejects.toThrow(RecordNotFoundError);
    await expect(store.loadPoints(999)).rejects.toThrow(/run 999 does not exist/);
    await expect(store.nextStep(0)).rejects.toThrow(/runId/);
  });

  it('keeps a point committed by a process SIGKILLed right after insertPoint', async () => {
    const path = join(folder, 'crash.sqlite');
    const store = SqliteStore.open(path);
    const { run } = await seedRun(store);
    await store.updateRunStatus(run.id, 'running');
    await store.close();

    const child = spawn(process.execPath, ['--import', 'tsx', join(__dirname, 'kill-after-insert.ts'), path, String(run.id), '5'], {
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk) => (stdout += chunk));
    child.stderr.on('data', (chunk) => (stderr += chunk));
    const signal = await new Promise<NodeJS.Signals | null>((resolve) => child.on('exit', (_code, sig) => resolve(sig)));
    expect(stderr).toBe('');
    expect(signal).toBe('SIGKILL');
    expect(stdout.trim().split('\n')).toHaveLength(5);

    const reopened = openStore('crash.sqlite');
    const columns = await reopened.loadPoints(run.id);
    expect(columns.step).toEqual([0, 1, 2, 3, 4]);
    expect(await reopened.nextStep(run.id)).toBe(5);
    expect((await reopened.findInterruptedRuns()).map((r) => r.id)).toEqual([run.id]);
    expect(await reopened.integrityProblems()).toEqual([]);
  });
});

describe('designs, builds, runs and the rest', () => {
  it('stores designs and builds and converts rows to contract records', async () => {
    const store = openStore('records.sqlite', { now: () => '2026-02-03T04:05:06.000Z' });
    const { design, build } = await seedRun(store);
    expect(design).toEqual({ id: 1, name: 'inverting ×10 (demo, invented)', design: { parts: [{ id: 'R1', value: 1e3 }] }, createdAt: '2026-02-03T04:05:06.000Z' });
    expect(await store.listBuilds(design.id)).toEqual([build]);
    expect(build.actualValues).toEqual({ R1: 998.2 });
    expect(await store.listDesigns()).toHaveLength(1);
    await expect(store.getDesign(42)).rejects.toThrow(RecordNotFoundError);
    await expect(store.createBuild({ designId: 42, label: 'x', notes: '', actualValues: {} })).rejects.toThrow(/design 42/);
    await expect(store.createBuild({ designId: design.id, label: '  ', notes: '', actualValues: {} })).rejects.toThrow(/build.label/);
    await expect(store.saveDesign({ name: '', design: {} })).rejects.toThrow(/design.name/);
  });

  it('moves runs through their statuses with start and end times, and stores results', async () => {
    let clock = 0;
    const store = openStore('status.sqlite', { now: () => new Date(Date.UTC(2026, 0, 1, 0, 0, clock++)).toISOString() });
    const { run } = await seedRun(store);
    expect(run.status).toBe('planned');
    expect(run.plannedCount).toBe(41);
    expect(run.simulated).toBe(true);
    const started = await store.updateRunStatus(run.id, 'running');
    expect(started.startedAt).not.toBeNull();
    const paused = await store.updateRunStatus(run.id, 'paused');
    expect(paused.startedAt).toBe(started.startedAt);
    expect((await store.findInterruptedRuns()).map((r) => r.id)).toEqual([run.id]);
    await store.updateRunStatus(run.id, 'running');
    const done = await store.updateRunStatus(run.id, 'done');
    expect(done.startedAt).toBe(started.startedAt);
    expect(done.endedAt).not.toBeNull();
    expect(await store.findInterruptedRuns()).toEqual([]);
    const withResults = await store.setRunResults(run.id, { minus3dbHz: [15.9e3], passbandGainDb: 19.98 }, { pass: true, reasons: [] });
    expect(withResults.figures).toEqual({ minus3dbHz: [15.9e3], passbandGainDb: 19.98 });
    expect(withResults.verdict).toEqual({ pass: true, reasons: [] });
    expect(withResults.request.from).toBe(10);
    await expect(store.updateRunStatus(run.id, 'exploded' as never)).rejects.toThrow(/not a run status/);
    await expect(store.updateRunStatus(77, 'done')).rejects.toThrow(RecordNotFoundError);
  });

  it('lists runs newest first, filtered by text, status and build', async () => {
    const store = openStore();
    const a = await seedRun(store, 'board 1', 'first light');
    const b = await seedRun(store, 'board 2 (100% reflowed)', 'after rework');
    await store.updateRunStatus(b.run.id, 'running');
    expect((await store.listRuns()).map((r) => r.id)).toEqual([b.run.id, a.run.id]);
    expect((await store.listRuns({ search: 'rework' })).map((r) => r.id)).toEqual([b.run.id]);
    expect((await store.listRuns({ search: 'BOARD 1' })).map((r) => r.id)).toEqual([a.run.id]);
    expect(await store.listRuns({ search: 'inverting' })).toHaveLength(2);
    expect((await store.listRuns({ search: '100%' })).map((r) => r.id)).toEqual([b.run.id]); // % is literal, not a wildcard
    expect(await store.listRuns({ search: '1%' })).toHaveLength(0);
    expect((await store.listRuns({ status: 'running' })).map((r) => r.id)).toEqual([b.run.id]);
    expect((await store.listRuns({ buildId: a.build.id })).map((r) => r.id)).toEqual([a.run.id]);
    expect(await store.listRuns({ limit: 1 })).toHaveLength(1);
    expect((await store.listRuns())[0]).toMatchObject({ buildLabel: 'board 2 (100% reflowed)', designName: 'inverting ×10 (demo, invented)', kind: 'ac' });
    await expect(store.listRuns({ limit: 0 })).rejects.toThrow(/filter.limit/);
  });

  it('appends and lists run events, records instruments, calibrations and schedules', async () => {
    const store = openStore();
    const { run, build } = await seedRun(store);
    await store.appendEvent(run.id, 'info', 'sweep started', '2026-01-01T00:00:00.000Z');
    await store.appendEvent(run.id, 'warning', 'step 3 retried');
    expect((await store.listEvents(run.id)).map((e) => e.level)).toEqual(['info', 'warning']);
    await expect(store.appendEvent(run.id, 'loud' as never, 'x')).rejects.toThrow(/event.level/);
    await expect(store.appendEvent(555, 'info', 'x')).rejects.toThrow(RecordNotFoundError);

    const identity = { manufacturer: 'Rolloff simulated bench', model: 'generator (simulated)', serialNumber: '0001', firmware: '1.0' };
    const first = await store.recordInstrument({ role: 'generator', identity, address: 'tcp://127.0.0.1:5025', at: '2026-01-01T00:00:00.000Z' });
    const later = await store.recordInstrument({ role: 'generator', identity, address: 'tcp://127.0.0.1:5025', at: '2026-01-02T00:00:00.000Z' });
    expect(later.id).toBe(first.id);
    expect(later.firstSeenAt).toBe('2026-01-01T00:00:00.000Z');
    expect(later.lastSeenAt).toBe('2026-01-02T00:00:00.000Z');
    expect(await store.listInstruments()).toHaveLength(1);

    expect(await store.latestCalibration('bench-a')).toBeUndefined();
    await store.saveCalibration({ benchKey: 'bench-a', bench: [], frequencyHz: [10, 100], gainDb: [0.01, 0.02], phaseDeg: [0, -0.1] });
    const newest = await store.saveCalibration({ benchKey: 'bench-a', bench: [], frequencyHz: [10, 100], gainDb: [0.03, 0.04], phaseDeg: [0, -0.2] });
    expect(await store.latestCalibration('bench-a')).toEqual(newest);
    await expect(store.saveCalibration({ benchKey: 'b', bench: [], frequencyHz: [10, 100], gainDb: [0], phaseDeg: [0, 0] })).rejects.toThrow(/gainDb has 1/);

    const schedule = await store.createSchedule({ buildId: build.id, request, everyMinutes: 30, count: 16 });
    expect(await store.getSchedule(schedule.id)).toMatchObject({ buildId: build.id, everyMinutes: 30, count: 16, until: null });
    await expect(store.createSchedule({ buildId: build.id, request, everyMinutes: 30 })).rejects.toThrow(/neither a run count nor an end time/);
    await expect(store.createSchedule({ buildId: build.id, request, everyMinutes: 0, count: 1 })).rejects.toThrow(/everyMinutes/);
    await expect(store.createSchedule({ buildId: build.id, request, everyMinutes: 5, until: 'tomorrow-ish' })).rejects.toThrow(/schedule.until/);
    const scheduled = await store.createRun({ buildId: build.id, kind: 'dc', request, plan, softwareVersion: SOFTWARE_VERSION, bench: [], operator: '', notes: '', simulated: false, scheduleId: schedule.id });
    expect(scheduled.scheduleId).toBe(schedule.id);
    await expect(store.createRun({ buildId: build.id, kind: 'xx' as never, request, plan, softwareVersion: '0', bench: [], operator: '', notes: '', simulated: false })).rejects.toThrow(/run.kind/);
  });
});
