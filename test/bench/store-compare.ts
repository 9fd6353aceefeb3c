/**
 * The same work on both stores, side by side in one run: a SQLite file
 * (synchronous=FULL, WAL) and a PostgreSQL database on a throw-away cluster on
 * loopback (synchronous_commit=on, fsync on):
 *  - per-point commits as a sweep makes them (median, p99; target p99 < 10 ms),
 *    and for PostgreSQL the same through the bench's outbox (app/store/outbox/,
 *    server reachable: what a lab bench pays),
 *  - bulk import of 1,000,000 points with `store copy` (app/store/copy/) from a
 *    bench's SQLite file of 1,000 runs,
 *  - with --points N stored (default 10,000,000): listing runs, and loading a
 *    1,000-point run (target < 20 ms),
 * each PostgreSQL figure also as its ratio to SQLite's.
 * Run: npx tsx test/bench/store-compare.ts   (--points 2000000 for a quicker pass; the
 * 10M default takes a while and a few GB of disk: run it once, not in a loop)
 * All data is invented benchmark filler.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { POINTS_PER_RUN, plan, points, request } from './store-fixture';
import { SOFTWARE_VERSION } from '../../app/contract/version';
import { SqliteStore, type RolloffStore } from '../../app/store';
import { PostgresStore } from '../../app/store/postgres/postgres-store';
import { OutboxStore } from '../../app/store/outbox/outbox-store';
import { copyHistory } from '../../app/store/copy/copy-history';
import { startPostgresCluster } from '../helpers/postgres-cluster';
import { percentile } from '../../app/numeric';
import { timeMs } from './timing';

const BULK_POINTS = 1_000_000;
/** --points N (engineering-free whole number), else TOTAL_POINTS, else 10M. */
function totalPointsOption(): number {
  const at = process.argv.indexOf('--points');
  const text = at >= 0 ? process.argv[at + 1] : process.env.TOTAL_POINTS;
  const value = text === undefined ? 10_000_000 : Number(text);
  if (!Number.isInteger(value) || value % POINTS_PER_RUN !== 0 || value < BULK_POINTS + 2 * POINTS_PER_RUN) {
    throw new Error(`--points ${text}: give a multiple of ${POINTS_PER_RUN}, at least ${BULK_POINTS + 2 * POINTS_PER_RUN} (the bulk import alone stores ${BULK_POINTS})`);
  }
  return value;
}
const TOTAL_POINTS = totalPointsOption();
/** One run's worth: enough for a p99 that is not one stall (its 10 largest of 1,000). */
const SINGLE_COMMITS = POINTS_PER_RUN;
const RUNS_PER_TRANSACTION = 100;

interface Figures {
  commitMedianMs: number;
  commitP99Ms: number;
  /** Through the outbox (PostgreSQL only). */
  outboxCommitMedianMs?: number;
  outboxCommitP99Ms?: number;
  bulkS: number;
  buildS: number;
  storedPoints: number;
  listMs: number;
  searchMs: number;
  loadMs: number;
  loadedPoints: number;
  /** Load average right after the per-point commits. */
  commitLoad: number;
}

/**
 * Per-point commit times (ms) of SINGLE_COMMITS points into a new run of each
 * store given, the stores taking turns point by point, so a direct commit and
 * one through the outbox see the same moments of a shared machine.
 */
async function commitTimes(stores: RolloffStore[], createRuns: (count: number) => Promise<number[]>): Promise<number[][]> {
  const runIds = await createRuns(stores.length);
  const times = stores.map((): number[] => []);
  for (let step = 0; step < SINGLE_COMMITS; step++) {
    for (const [i, store] of stores.entries()) times[i].push(await timeMs(() => store.insertPoint(runIds[i], points[step])));
  }
  return times;
}

/** A bench's SQLite file with BULK_POINTS points (1,000-point runs), the source of the bulk import. */
async function bulkSource(path: string): Promise<SqliteStore> {
  const source = SqliteStore.open(path);
  const design = await source.saveDesign({ name: 'imported stage (invented)', design: { parts: [] } });
  const build = await source.createBuild({ designId: design.id, label: 'imported board', notes: '', actualValues: {} });
  for (let done = 0; done < BULK_POINTS / POINTS_PER_RUN; done += RUNS_PER_TRANSACTION) {
    const runs = await source.createRuns(Array.from({ length: RUNS_PER_TRANSACTION }, (_, i) => ({
      buildId: build.id, kind: 'ac' as const, request: { ...request, buildId: build.id }, plan, softwareVersion: SOFTWARE_VERSION, bench: [],
      operator: 'benchmark', notes: `imported run ${done + i}`, simulated: true,
    })));
    await source.insertPointsOfRuns(runs.map((run) => ({ runId: run.id, points })));
  }
  return source;
}

async function measure(store: RolloffStore, source: SqliteStore, outboxOf?: (store: RolloffStore) => RolloffStore): Promise<Figures> {
  const design = await store.saveDesign({ name: 'benchmark stage (invented)', design: { parts: [] } });
  const builds: Array<{ id: number }> = [];
  for (let i = 0; i < 20; i++) builds.push(await store.createBuild({ designId: design.id, label: `bench board ${i}`, notes: '', actualValues: {} }));
  const createRuns = async (count: number) =>
    (await store.createRuns(Array.from({ length: count }, (_, i) => ({
      buildId: builds[i % builds.length].id, kind: 'ac' as const, request, plan, softwareVersion: SOFTWARE_VERSION, bench: [],
      operator: 'benchmark', notes: `run ${i}`, simulated: true,
    })))).map((run) => run.id);
  const fill = async (runIds: number[]) => {
    for (let i = 0; i < runIds.length; i += RUNS_PER_TRANSACTION) {
      await store.insertPointsOfRuns(runIds.slice(i, i + RUNS_PER_TRANSACTION).map((runId) => ({ runId, points })));
    }
  };

  // Per-point commits first, on an empty database, as a sweep stores them.
  const [commits, outboxCommits] = await commitTimes(outboxOf ? [store, outboxOf(store)] : [store], createRuns);
  const commitLoad = loadavg()[0];

  // The bulk import as a user makes it: rolloff store copy of a bench's file.
  let copiedPoints = 0;
  const bulkMs = await timeMs(async () => (copiedPoints = (await copyHistory(source, store, { staleAfterMs: 10_000 })).copiedPoints));
  if (copiedPoints !== BULK_POINTS) throw new Error(`store copy moved ${copiedPoints} points, not ${BULK_POINTS}`);

  const remainingRuns = Math.max(0, (TOTAL_POINTS - BULK_POINTS) / POINTS_PER_RUN);
  const buildMs = await timeMs(async () => {
    for (let done = 0; done < remainingRuns; done += 500) await fill(await createRuns(Math.min(500, remainingRuns - done)));
  });
  const totalRuns = (await store.listRuns({ limit: 1 }))[0].id;

  const list: number[] = [];
  for (let i = 0; i < 21; i++) list.push(await timeMs(() => store.listRuns()));
  const search: number[] = [];
  for (let i = 0; i < 21; i++) search.push(await timeMs(() => store.listRuns({ search: 'board 7' })));
  const load: number[] = [];
  let loadedPoints = 0;
  for (let i = 0; i < 51; i++) {
    const runId = 2 + ((i * 7919) % (totalRuns - 1)); // spread over the table, not one cached run
    load.push(await timeMs(async () => (loadedPoints = (await store.loadPoints(runId)).step.length)));
  }
  return {
    commitMedianMs: percentile(commits, 50),
    commitP99Ms: percentile(commits, 99),
    bulkS: bulkMs / 1000,
    buildS: buildMs / 1000,
    outboxCommitMedianMs: outboxCommits && percentile(outboxCommits, 50),
    outboxCommitP99Ms: outboxCommits && percentile(outboxCommits, 99),
    storedPoints: (outboxCommits ? 2 : 1) * SINGLE_COMMITS + BULK_POINTS + remainingRuns * POINTS_PER_RUN,
    listMs: percentile(list, 50),
    searchMs: percentile(search, 50),
    loadMs: percentile(load, 50),
    loadedPoints,
    commitLoad,
  };
}

const folder = mkdtempSync(join(tmpdir(), 'rolloff-bench-compare-'));
const cluster = await startPostgresCluster();
try {
  const source = await bulkSource(join(folder, 'bench-to-import.sqlite'));
  const sqlite = await SqliteStore.open(join(folder, 'bench.sqlite'));
  const sqliteFigures = await measure(sqlite, source);
  await sqlite.close();
  const postgres = await PostgresStore.open(cluster.urlWithPassword);
  // The outbox wraps the same connection pool; closing it would close the store, so it is left open until the end.
  const postgresFigures = await measure(postgres, source, (store) => OutboxStore.open(store, { path: join(folder, 'outbox.sqlite'), log: () => {} }));
  await postgres.close();
  await source.close();

  console.log(`load average after the per-point commits: SQLite ${sqliteFigures.commitLoad.toFixed(1)}, PostgreSQL ${postgresFigures.commitLoad.toFixed(1)}`);
  console.log(`machine load average ${loadavg()[0].toFixed(1)} on ${cpus().length} cores (wall times include waiting for the CPU); PostgreSQL on loopback, same disk`);
  console.log(`points stored: ${sqliteFigures.storedPoints.toLocaleString('en')} in each store (SQLite built in ${sqliteFigures.buildS.toFixed(1)} s, PostgreSQL in ${postgresFigures.buildS.toFixed(1)} s beyond the bulk import)`);
  const row = (name: string, unit: string, s: number, p: number, target?: { limit: number; label: string }) =>
    console.log(
      `${name.padEnd(34)} SQLite ${s.toFixed(2).padStart(8)} ${unit}   PostgreSQL ${p.toFixed(2).padStart(8)} ${unit}   ratio ${(p / s).toFixed(1)}×` +
        (target ? `   ${target.label}: ${p < target.limit ? 'meets' : 'MISSES'}` : ''),
    );
  row('per-point commit, median', 'ms', sqliteFigures.commitMedianMs, postgresFigures.commitMedianMs);
  row('per-point commit, p99', 'ms', sqliteFigures.commitP99Ms, postgresFigures.commitP99Ms, { limit: 10, label: 'target p99 < 10 ms' });
  console.log(`${'per-point commit via outbox, median'.padEnd(34)} ${''.padEnd(21)}PostgreSQL ${postgresFigures.outboxCommitMedianMs!.toFixed(2).padStart(8)} ms   ratio ${(postgresFigures.outboxCommitMedianMs! / sqliteFigures.commitMedianMs).toFixed(1)}× (to SQLite's direct commit)`);
  console.log(`${'per-point commit via outbox, p99'.padEnd(34)} ${''.padEnd(21)}PostgreSQL ${postgresFigures.outboxCommitP99Ms!.toFixed(2).padStart(8)} ms   ratio ${(postgresFigures.outboxCommitP99Ms! / sqliteFigures.commitP99Ms).toFixed(1)}×   target p99 < 10 ms: ${postgresFigures.outboxCommitP99Ms! < 10 ? 'meets' : 'MISSES'}`);
  row(`store copy of ${BULK_POINTS.toLocaleString('en')} points`, 's', sqliteFigures.bulkS, postgresFigures.bulkS);
  row('listRuns (newest 200), median', 'ms', sqliteFigures.listMs, postgresFigures.listMs);
  row('listRuns search "board 7", median', 'ms', sqliteFigures.searchMs, postgresFigures.searchMs);
  row(`loadPoints (${postgresFigures.loadedPoints} points), median`, 'ms', sqliteFigures.loadMs, postgresFigures.loadMs, { limit: 20, label: 'target < 20 ms' });
} finally {
  cluster.remove();
  rmSync(folder, { recursive: true, force: true });
}
