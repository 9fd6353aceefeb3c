/**
 * Store speed on a real SQLite file in a temp folder (synchronous=FULL, WAL):
 *  - bulk insert of 1,000,000 points in batched transactions (target < 3 s),
 *  - single-point commits, one transaction each, as a sweep stores them,
 *  - with 10,000,000 points stored: listRuns (target < 50 ms) and loading a
 *    1,000-point run (target < 20 ms).
 * Run: npx tsx test/bench/store.ts   (TOTAL_POINTS=2000000 for a quicker pass)
 * All data is invented benchmark filler.
 */
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { POINTS_PER_RUN, plan, points, request } from './store-fixture';
import { SOFTWARE_VERSION } from '../../app/contract/version';
import { SqliteStore } from '../../app/store';
import { median } from '../../app/numeric';
import { timeMs } from './timing';

const BULK_POINTS = 1_000_000;
const TOTAL_POINTS = Number(process.env.TOTAL_POINTS ?? 10_000_000);
const SINGLE_COMMITS = 300;

const folder = mkdtempSync(join(tmpdir(), 'rolloff-bench-store-'));
const path = join(folder, 'bench.sqlite');
const store = SqliteStore.open(path);

const design = await store.saveDesign({ name: 'benchmark stage (invented)', design: { parts: [] } });
const builds = await Promise.all(Array.from({ length: 20 }, (_, i) => store.createBuild({ designId: design.id, label: `bench board ${i}`, notes: '', actualValues: {} })));

async function createRuns(count: number): Promise<number[]> {
  const runs = await store.createRuns(
    Array.from({ length: count }, (_, i) => ({
      buildId: builds[i % builds.length].id, kind: 'ac' as const, request, plan, softwareVersion: SOFTWARE_VERSION, bench: [],
      operator: 'benchmark', notes: `run ${i}`, simulated: true,
    })),
  );
  return runs.map((run) => run.id);
}

const RUNS_PER_TRANSACTION = 100; // 100,000 points per commit

async function fill(runIds: number[]): Promise<void> {
  for (let i = 0; i < runIds.length; i += RUNS_PER_TRANSACTION) {
    await store.insertPointsOfRuns(runIds.slice(i, i + RUNS_PER_TRANSACTION).map((runId) => ({ runId, points })));
  }
}

/** CPU time of this process, ms: a fairer figure than wall time on a shared machine. */
async function cpuMs(work: () => unknown): Promise<number> {
  const start = process.cpuUsage();
  await work();
  const used = process.cpuUsage(start);
  return (used.user + used.system) / 1000;
}

const verdict = (value: number, limit: number) => (value < limit ? 'meets target' : 'MISSES target');

// 1. Bulk insert of 1,000,000 points.
const bulkRuns = await createRuns(BULK_POINTS / POINTS_PER_RUN);
let bulkCpuMs = 0;
const bulkMs = await timeMs(async () => (bulkCpuMs = await cpuMs(() => fill(bulkRuns))));
const load = (await import('node:os')).loadavg()[0];
console.log(`store: ${path} (machine load average ${load.toFixed(1)} on ${(await import('node:os')).cpus().length} cores: wall times include waiting for the CPU)`);
console.log(`bulk insert: ${BULK_POINTS.toLocaleString('en')} points in ${(bulkMs / 1000).toFixed(2)} s = ${Math.round(BULK_POINTS / (bulkMs / 1000)).toLocaleString('en')} points/s (${(RUNS_PER_TRANSACTION * POINTS_PER_RUN).toLocaleString('en')} per transaction) — target < 3 s: ${verdict(bulkMs, 3000)} (CPU ${(bulkCpuMs / 1000).toFixed(2)} s)`);

// 2. Single-point commits (each its own synchronous=FULL transaction, as during a sweep).
const [singleRun] = await createRuns(1);
const singleTimes: number[] = [];
for (let step = 0; step < SINGLE_COMMITS; step++) singleTimes.push(await timeMs(() => store.insertPoint(singleRun, points[step])));
const singleTotalMs = singleTimes.reduce((a, b) => a + b, 0);
console.log(`single-point commits: ${SINGLE_COMMITS} in ${(singleTotalMs / 1000).toFixed(2)} s = ${Math.round(SINGLE_COMMITS / (singleTotalMs / 1000)).toLocaleString('en')} commits/s (median ${median(singleTimes).toFixed(2)} ms, worst ${Math.max(...singleTimes).toFixed(2)} ms)`);

// 3. Grow to TOTAL_POINTS.
const remainingRuns = Math.max(0, (TOTAL_POINTS - BULK_POINTS) / POINTS_PER_RUN);
const growMs = await timeMs(async () => {
  for (let done = 0; done < remainingRuns; done += 500) await fill(await createRuns(Math.min(500, remainingRuns - done)));
});
const totalRuns = (await store.listRuns({ limit: 1 }))[0].id;
console.log(`built ${(TOTAL_POINTS + SINGLE_COMMITS).toLocaleString('en')} points in ${totalRuns.toLocaleString('en')} runs: the last ${(TOTAL_POINTS - BULK_POINTS).toLocaleString('en')} took ${(growMs / 1000).toFixed(1)} s; file ${(statSync(path).size / 1e6).toFixed(0)} MB (+ WAL)`);

// 4. Listing and loading with the big table in place (median of repeats, after one warm-up).
const listTimes: number[] = [];
for (let i = 0; i < 21; i++) listTimes.push(await timeMs(() => store.listRuns()));
const searchTimes: number[] = [];
for (let i = 0; i < 21; i++) searchTimes.push(await timeMs(() => store.listRuns({ search: 'board 7' })));
const statusTimes: number[] = [];
for (let i = 0; i < 21; i++) statusTimes.push(await timeMs(() => store.listRuns({ status: 'running' })));
const loadTimes: number[] = [];
let loaded = 0;
for (let i = 0; i < 51; i++) {
  const runId = 1 + Math.floor(((i * 7919) % totalRuns)); // spread over the file, not one cached run
  loadTimes.push(await timeMs(async () => (loaded = (await store.loadPoints(runId)).step.length)));
}
console.log(`listRuns (newest 200): median ${median(listTimes).toFixed(2)} ms — target < 50 ms: ${verdict(median(listTimes), 50)}`);
console.log(`listRuns search "board 7": median ${median(searchTimes).toFixed(2)} ms; status filter: median ${median(statusTimes).toFixed(2)} ms`);
console.log(`loadPoints of a ${loaded}-point run: median ${median(loadTimes).toFixed(2)} ms, worst ${Math.max(...loadTimes).toFixed(2)} ms — target < 20 ms: ${verdict(median(loadTimes), 20)}`);

await store.close();
rmSync(folder, { recursive: true, force: true });
