/**
 * The SQLite store of main against the store of an earlier tree, in one process, alternating, so that
 * both see the same machine load: per pair, each fills 1,000 runs of 1,000 points in transactions of
 * 100 runs (the bulk insert of store.ts), makes 300 single-point commits and lists the newest 200 runs
 * 50 times. Written for the tree just before the store/contract redesign (e023f51), whose store was
 * the synchronous class `Store` with `transaction()`; README.md holds the figures.
 *
 * Needs the earlier tree checked out beside this one (not run by run-all.mjs):
 *   git worktree add --detach /tmp/before e023f51 && ln -s "$PWD/node_modules" /tmp/before/node_modules
 *   npx tsx test/bench/store-before-after.ts /tmp/before [PAIRS=4]
 * All data is invented benchmark filler (store-fixture.ts).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { plan, points, request } from './store-fixture';
import { SOFTWARE_VERSION } from '../../app/contract/version';
import { SqliteStore } from '../../app/store';
import { timeMs } from './timing';

const beforeTree = process.argv[2];
if (!beforeTree) throw new Error('Give the earlier tree: npx tsx test/bench/store-before-after.ts /tmp/before [PAIRS]');
const pairs = Number(process.argv[3] ?? 4);
const RUNS = 1000;
const newRun = (buildId: number) => ({ buildId, kind: 'ac' as const, request, plan, softwareVersion: SOFTWARE_VERSION, bench: [], operator: 'benchmark', notes: '', simulated: true });

interface Figures {
  bulkMs: number;
  singleMs: number;
  listMs: number;
}

/** The earlier store's synchronous calls, as that tree declared them (only what is timed here). */
interface EarlierStore {
  saveDesign(design: { name: string; design: unknown }): { id: number };
  createBuild(build: { designId: number; label: string; notes: string; actualValues: Record<string, number> }): { id: number };
  createRun(run: ReturnType<typeof newRun>): { id: number };
  insertPoints(runId: number, list: typeof points): void;
  insertPoint(runId: number, point: (typeof points)[number]): void;
  listRuns(): unknown[];
  transaction<T>(work: () => T): T;
  close(): void;
}

async function timedWork(fill: () => Promise<void>, single: (k: number) => Promise<void>, list: () => Promise<unknown>): Promise<Figures> {
  const bulkMs = await timeMs(fill);
  const singleMs = (await timeMs(async () => { for (let k = 0; k < 300; k++) await single(k); })) / 300;
  const listMs = (await timeMs(async () => { for (let k = 0; k < 50; k++) await list(); })) / 50;
  return { bulkMs, singleMs, listMs };
}

async function inFolder(work: (path: string) => Promise<Figures>): Promise<Figures> {
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-before-after-'));
  try {
    return await work(join(folder, 'bench.sqlite'));
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

const after = () => inFolder(async (path) => {
  const store = SqliteStore.open(path);
  const design = await store.saveDesign({ name: 'benchmark stage (invented)', design: { parts: [] } });
  const build = await store.createBuild({ designId: design.id, label: 'bench board', notes: '', actualValues: {} });
  const runs = await store.createRuns(Array.from({ length: RUNS }, () => newRun(build.id)));
  const [single] = await store.createRuns([newRun(build.id)]);
  const figures = await timedWork(
    async () => { for (let i = 0; i < runs.length; i += 100) await store.insertPointsOfRuns(runs.slice(i, i + 100).map((run) => ({ runId: run.id, points }))); },
    (k) => store.insertPoint(single.id, points[k]),
    () => store.listRuns(),
  );
  await store.close();
  return figures;
});

const { Store } = (await import(resolve(beforeTree, 'app/store/index.ts'))) as { Store: { open(path: string): EarlierStore } };
const before = () => inFolder(async (path) => {
  const store = Store.open(path);
  const design = store.saveDesign({ name: 'benchmark stage (invented)', design: { parts: [] } });
  const build = store.createBuild({ designId: design.id, label: 'bench board', notes: '', actualValues: {} });
  const runs = store.transaction(() => Array.from({ length: RUNS }, () => store.createRun(newRun(build.id)).id));
  const single = store.createRun(newRun(build.id)).id;
  const figures = await timedWork(
    async () => { for (let i = 0; i < runs.length; i += 100) store.transaction(() => { for (const runId of runs.slice(i, i + 100)) store.insertPoints(runId, points); }); },
    async (k) => store.insertPoint(single, points[k]),
    async () => store.listRuns(),
  );
  store.close();
  return figures;
});

const results: Record<'before' | 'after', Figures[]> = { before: [], after: [] };
for (let pair = 0; pair < pairs; pair++) {
  results.before.push(await before());
  results.after.push(await after());
}
const mean = (values: number[]) => values.reduce((a, b) => a + b, 0) / values.length;
console.log(`SQLite store, ${beforeTree} (before) and this tree (after), ${pairs} alternating pairs in one process:`);
for (const side of ['before', 'after'] as const) {
  const list = results[side];
  console.log(`${side.padEnd(6)} bulk insert of ${(RUNS * points.length).toLocaleString('en')} points: ${list.map((f) => (f.bulkMs / 1000).toFixed(2)).join(', ')} s (mean ${(mean(list.map((f) => f.bulkMs)) / 1000).toFixed(2)} s); `
    + `single commit ${list.map((f) => f.singleMs.toFixed(3)).join(', ')} ms; listRuns ${list.map((f) => f.listMs.toFixed(2)).join(', ')} ms`);
}
