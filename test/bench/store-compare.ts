/**
 * The same work on both stores, side by side in one run: a SQLite file
 * (synchronous=FULL, WAL) and a PostgreSQL database on a throw-away cluster on
 * loopback (synchronous_commit=on, fsync on):
 *  - per-point commits as a sweep makes them (median, p99; target p99 < 10 ms),
 *  - bulk import of 1,000,000 points (insertPointsOfRuns in batches of 100 runs,
 *    the path an import takes),
 *  - with TOTAL_POINTS stored (default 10,000,000): listing runs, and loading a
 *    1,000-point run (target < 20 ms),
 * each PostgreSQL figure also as its ratio to SQLite's.
 * Run: npx tsx test/bench/store-compare.ts   (TOTAL_POINTS=2000000 for a quicker pass)
 * All data is invented benchmark filler.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { POINTS_PER_RUN, plan, points, request } from './store-fixture';
import { SOFTWARE_VERSION } from '../../app/contract/version';
import { SqliteStore, type RolloffStore } from '../../app/store';
import { PostgresStore } from '../../app/store/postgres/postgres-store';
import { startPostgresCluster } from '../helpers/postgres-cluster';

const BULK_POINTS = 1_000_000;
const TOTAL_POINTS = Number(process.env.TOTAL_POINTS ?? 10_000_000);
const SINGLE_COMMITS = 500;
const RUNS_PER_TRANSACTION = 100;


function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];
}

async function timeMs(work: () => unknown): Promise<number> {
  const start = performance.now();
  await work();
  return performance.now() - start;
}

interface Figures {
  commitMedianMs: number;
  commitP99Ms: number;
  bulkS: number;
  buildS: number;
  storedPoints: number;
  listMs: number;
  searchMs: number;
  loadMs: number;
  loadedPoints: number;
}

async function measure(store: RolloffStore): Promise<Figures> {
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
  const [singleRun] = await createRuns(1);
  const commits: number[] = [];
  for (let step = 0; step < SINGLE_COMMITS; step++) commits.push(await timeMs(() => store.insertPoint(singleRun, points[step])));

  const bulkRuns = await createRuns(BULK_POINTS / POINTS_PER_RUN);
  const bulkMs = await timeMs(() => fill(bulkRuns));

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
    storedPoints: SINGLE_COMMITS + BULK_POINTS + remainingRuns * POINTS_PER_RUN,
    listMs: percentile(list, 50),
    searchMs: percentile(search, 50),
    loadMs: percentile(load, 50),
    loadedPoints,
  };
}

const folder = mkdtempSync(join(tmpdir(), 'rolloff-bench-compare-'));
const cluster = await startPostgresCluster();
try {
  const sqlite = await SqliteStore.open(join(folder, 'bench.sqlite'));
  const sqliteFigures = await measure(sqlite);
  await sqlite.close();
  const postgres = await PostgresStore.open(cluster.urlWithPassword);
  const postgresFigures = await measure(postgres);
  await postgres.close();

  console.log(`machine load average ${loadavg()[0].toFixed(1)} on ${cpus().length} cores (wall times include waiting for the CPU); PostgreSQL on loopback, same disk`);
  console.log(`points stored: ${sqliteFigures.storedPoints.toLocaleString('en')} in each store (SQLite built in ${sqliteFigures.buildS.toFixed(1)} s, PostgreSQL in ${postgresFigures.buildS.toFixed(1)} s beyond the bulk import)`);
  const row = (name: string, unit: string, s: number, p: number, target?: { limit: number; label: string }) =>
    console.log(
      `${name.padEnd(34)} SQLite ${s.toFixed(2).padStart(8)} ${unit}   PostgreSQL ${p.toFixed(2).padStart(8)} ${unit}   ratio ${(p / s).toFixed(1)}×` +
        (target ? `   ${target.label}: ${p < target.limit ? 'meets' : 'MISSES'}` : ''),
    );
  row('per-point commit, median', 'ms', sqliteFigures.commitMedianMs, postgresFigures.commitMedianMs);
  row('per-point commit, p99', 'ms', sqliteFigures.commitP99Ms, postgresFigures.commitP99Ms, { limit: 10, label: 'target p99 < 10 ms' });
  row(`bulk import ${BULK_POINTS.toLocaleString('en')} points`, 's', sqliteFigures.bulkS, postgresFigures.bulkS);
  row('listRuns (newest 200), median', 'ms', sqliteFigures.listMs, postgresFigures.listMs);
  row('listRuns search "board 7", median', 'ms', sqliteFigures.searchMs, postgresFigures.searchMs);
  row(`loadPoints (${postgresFigures.loadedPoints} points), median`, 'ms', sqliteFigures.loadMs, postgresFigures.loadMs, { limit: 20, label: 'target < 20 ms' });
} finally {
  cluster.remove();
  rmSync(folder, { recursive: true, force: true });
}
