/**
 * What only the SQLite store does, against real database files in a temp
 * folder: migrations, version refusal, damaged files left untouched, read-only
 * opening, crash durability of a point. What every store does (points, runs,
 * the row ↔ contract conversion) is the conformance suite in test/store-conformance/.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { SOFTWARE_VERSION } from '../../../app/contract/version';
import { newNoiseRun, noiseRecord, point, seedRun } from '../../store-conformance/fixtures';
import {
  SqliteStore,
  StoreDamagedError,
  StoreUnavailableError,
  StoreVersionError,
  loadMigrations,
  migrationsFolder,
} from '../../../app/store';
import { applyMigrations } from '../../../app/store/migrations';

const SHIPPED_MIGRATIONS = migrationsFolder('sqlite');

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
    for (const name of readdirSync(SHIPPED_MIGRATIONS).filter((file) => file.endsWith('.sql'))) copyFileSync(join(SHIPPED_MIGRATIONS, name), join(migrationsDir, name));
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

  it('rebuilds runs for noise runs (0006) without losing a run, point, plan, event, stable id or owner, foreign keys on again after', async () => {
    const migrationsDir = join(folder, 'before-noise');
    mkdirSync(migrationsDir);
    for (const name of readdirSync(SHIPPED_MIGRATIONS).filter((file) => file.endsWith('.sql') && Number(file.slice(0, 4)) < 6)) copyFileSync(join(SHIPPED_MIGRATIONS, name), join(migrationsDir, name));
    // A file as the Rolloff before noise runs left it (schema 5), written with its own SQL: today's store cannot run on schema 5.
    const path = join(folder, 'noise-upgrade.sqlite');
    const raw = new Database(path);
    raw.pragma('foreign_keys = ON');
    applyMigrations(raw, loadMigrations(migrationsDir), 'before noise runs', () => '2026-01-01T00:00:00.000Z');
    expect(raw.pragma('user_version', { simple: true })).toBe(5);
    raw.exec(`INSERT INTO designs (id, name, design_json, created_at) VALUES (1, 'demo (invented)', '{"parts":[]}', '2026-01-01T00:00:00.000Z');
      INSERT INTO builds (id, design_id, label, created_at) VALUES (1, 1, 'board 1', '2026-01-01T00:00:00.000Z');
      INSERT INTO runs (id, build_id, kind, status, planned_count, point_count, created_at, started_at, software_version, request_json, bench_name,
        owner_id, owner_pid, owner_host, owner_label, owner_since_ms, owner_heartbeat_ms, uid)
        VALUES (7, 1, 'ac', 'running', 41, 3, '2026-01-01T00:00:00.000Z', '2026-01-01T00:00:01.000Z', '0.0.9', '{"kind":"ac","from":10}', 'bench 3',
        'host:1:a', 1, 'host', 'rolloff sweep', 1767225600000, 1767225601000, '5b3b1c1e-2f1a-4c3d-9e8f-0a1b2c3d4e5f');
      INSERT INTO run_plans (run_id, plan_json) VALUES (7, '{"steps":[],"estimatedDurationS":1,"warnings":[]}');
      INSERT INTO points (run_id, step, stimulus, amplitude_vpp, gain_db, flags, measured_at_ms) VALUES (7, 0, 10, 1, 20, 0, 1767225601000), (7, 1, 12.6, 1, 19.9, 0, 1767225602000), (7, 2, 15.8, 1, 19.8, 1, 1767225603000);
      INSERT INTO run_events (run_id, at, level, message) VALUES (7, '2026-01-01T00:00:01.000Z', 'info', 'sweep started');`);
    // Without 0005 a noise run has no place: the kind is refused by the table itself.
    expect(() => raw.exec(`INSERT INTO runs (build_id, kind, created_at, software_version, request_json) VALUES (1, 'noise', 'x', 'x', '{}')`)).toThrow(/CHECK constraint/);
    raw.close();
    const run = { id: 7 };
    const build = { id: 1 };

    const upgraded = openStore('noise-upgrade.sqlite');
    expect(upgraded.appliedMigrations).toEqual([6]);
    expect(await upgraded.getRun(run.id)).toMatchObject({ id: 7, kind: 'ac', status: 'running', pointCount: 3, plannedCount: 41, benchName: 'bench 3', startedAt: '2026-01-01T00:00:01.000Z', request: { kind: 'ac', from: 10 }, uid: '5b3b1c1e-2f1a-4c3d-9e8f-0a1b2c3d4e5f' });
    const points = await upgraded.loadPoints(run.id);
    expect(points.step).toEqual([0, 1, 2]);
    expect(points.gainDb).toEqual([20, 19.9, 19.8]);
    expect(points.flags).toEqual([0, 0, 1]);
    expect((await upgraded.listEvents(run.id)).map((e) => e.message)).toEqual(['sweep started']);
    expect(await upgraded.getRunOwnership(run.id)).toMatchObject({ ownerId: 'host:1:a', pid: 1, since: '2026-01-01T00:00:00.000Z', heartbeatAt: '2026-01-01T00:00:01.000Z' });
    const noise = await upgraded.createRun(newNoiseRun(build.id));
    expect(noise.id).toBeGreaterThan(run.id);
    await upgraded.insertNoiseRecord(noise.id, noiseRecord(0));
    // The rebuilt table still refers and is referred to: a point of no run is refused, and the check finds nothing broken.
    await expect(upgraded.insertPoint(999, point(0))).rejects.toThrow(/run 999/);
    const db = (upgraded as unknown as { db: Database.Database }).db;
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(db.pragma('foreign_key_check')).toEqual([]);
    expect(db.prepare("SELECT name FROM sqlite_master WHERE type = 'index' AND tbl_name = 'runs' AND name LIKE 'runs_by_%' ORDER BY name").all()).toEqual([
      { name: 'runs_by_bench' }, { name: 'runs_by_build' }, { name: 'runs_by_status' }, { name: 'runs_by_uid' },
    ]);
    expect(await upgraded.integrityProblems()).toEqual([]);
  });

  it('rolls back a failing migration completely and leaves the version where it was', async () => {
    const migrationsDir = join(folder, 'migrations');
    mkdirSync(migrationsDir);
    for (const name of readdirSync(SHIPPED_MIGRATIONS).filter((file) => file.endsWith('.sql'))) copyFileSync(join(SHIPPED_MIGRATIONS, name), join(migrationsDir, name));
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

  it('lets exactly one of several processes starting a run on one bench at the same moment create it, the others told which run holds the bench', async () => {
    const path = join(folder, 'bench.sqlite');
    const seeding = openStore('bench.sqlite');
    const { build } = await seedRun(seeding);
    await seeding.close();
    // Every child opens the file and says "ready"; once all have, each is told "go" at once, so their transactions overlap.
    const children = Array.from({ length: 4 }, () => {
      const child = spawn(process.execPath, ['--import', 'tsx', join(__dirname, 'start-on-bench.ts'), path, String(build.id)], { stdio: ['pipe', 'pipe', 'pipe'] });
      let stdout = '';
      let stderr = '';
      const ready = new Promise<void>((resolve) => child.stdout.on('data', (chunk) => {
        stdout += chunk;
        if (stdout.startsWith('ready\n')) resolve();
      }));
      child.stderr.on('data', (chunk) => (stderr += chunk));
      const exited = new Promise<{ code: number | null; stdout: string; stderr: string }>((resolve) => child.on('exit', (code) => resolve({ code, stdout: stdout.slice('ready\n'.length), stderr })));
      return { child, ready, exited };
    });
    await Promise.race([Promise.all(children.map((c) => c.ready)), Promise.all(children.map((c) => c.exited))]);
    for (const { child } of children) child.stdin.write('go\n');
    const results = await Promise.all(children.map((c) => c.exited));
    expect(results.map((r) => ({ code: r.code, stderr: r.stderr }))).toEqual(Array(4).fill({ code: 0, stderr: '' })); // none failed ("database is locked" included)
    const outcomes = results.map((r) => JSON.parse(r.stdout) as { created: boolean; runId?: number; ownerId?: string; heldBy?: number });
    const created = outcomes.filter((o) => o.created);
    expect(created).toHaveLength(1);
    for (const refused of outcomes.filter((o) => !o.created)) expect(refused.heldBy).toBe(created[0].runId);
    const after = openStore('bench.sqlite');
    expect((await after.listRuns({ bench: 'bench 1' })).map((r) => r.id)).toEqual([created[0].runId]);
    expect((await after.getRunOwnership(created[0].runId!))?.ownerId).toBe(created[0].ownerId);
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

describe('durability', () => {
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
    expect((await reopened.findInterruptedRuns(10_000)).map((r) => r.id)).toEqual([run.id]);
    expect(await reopened.integrityProblems()).toEqual([]);
  });
});
