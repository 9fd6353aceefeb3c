/**
 * `rolloff store copy` through the command line, between a real SQLite file and
 * a real PostgreSQL database (a throw-away cluster): a bench's history goes into
 * the lab store and back out into a new SQLite file; the record of every run
 * (and of a comparison) has the same digest in all three stores, although the
 * row ids differ, and a second copy into the same store is refused, or with
 * --skip-existing skips the runs that are there and says which.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';
import { openStore } from '../../../app/store';
import { exportFromDatabase } from '../../../app/cli/commands/export';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';
import { tempFolder } from '../sweep/helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
const hasPostgres = postgresAvailable();
const rolloff = (...args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 120_000 });

const jsonOf = (bytes: Uint8Array) => JSON.parse(new TextDecoder().decode(bytes));

/** Run uid → digest of its JSON record, and the ids by uid, from one store. */
async function digestsIn(location: string): Promise<{ runs: Map<string, string>; ids: Map<string, number> }> {
  const store = await openStore(location, { readonly: true });
  const summaries = (await store.listRuns()).reverse();
  await store.close();
  const runs = new Map<string, string>();
  for (const summary of summaries) {
    const record = jsonOf((await exportFromDatabase(location, [summary.id], 'json', 'theory')).bytes);
    expect(record.run.uid).toBe(summary.uid);
    runs.set(summary.uid, record.digest.hex);
  }
  return { runs, ids: new Map(summaries.map((s) => [s.uid, s.id])) };
}

/** The digest of the comparison record of these runs (by uid), the first the reference. */
async function comparisonDigestIn(location: string, uids: string[]): Promise<string> {
  const { ids } = await digestsIn(location);
  const runIds = uids.map((uid) => ids.get(uid)!);
  return jsonOf((await exportFromDatabase(location, runIds, 'json', runIds[0])).bytes).digest.hex;
}

describe.skipIf(!hasPostgres)('rolloff store copy: SQLite → PostgreSQL → SQLite', () => {
  let cluster: PostgresCluster;
  const folder = tempFolder();
  beforeAll(async () => {
    cluster = await startPostgresCluster();
  }, 60_000);
  afterAll(() => {
    cluster?.remove();
    folder.remove();
  });

  it('keeps every record digest, refuses a second copy, and skips the runs already there when asked', async () => {
    const bench = join(folder.path, 'bench.sqlite');
    const back = join(folder.path, 'back.sqlite');
    const lab = cluster.urlWithPassword;
    // The lab store already has a run of its own, so the copied rows cannot keep their ids by chance.
    const own = rolloff('demo', '--time-scale', '20', '--db', lab);
    expect(own.status, own.stderr).toBe(0);
    const demo = rolloff('demo', '--time-scale', '20', '--db', bench);
    expect(demo.status, demo.stderr).toBe(0);
    const source = await openStore(bench);
    const [newest] = await source.listRuns({ limit: 1 });
    await source.recordOfflinePeriod(newest.id, { from: '2026-12-01T10:00:00.000Z', to: '2026-12-01T10:00:42.000Z' });
    await source.close();
    const before = await digestsIn(bench);
    expect(before.runs.size).toBe(2);

    const copied = rolloff('store', 'copy', '--from-db', bench, '--to-db', lab);
    expect(copied.status, copied.stderr).toBe(0);
    expect(copied.stdout).toMatch(/copied 2 run\(s\) with [\d,]+ point\(s\)/);
    expect(copied.stdout).not.toContain(cluster.password);
    const inLab = await digestsIn(lab);
    const copiedUids = [...before.runs.keys()];
    expect(new Map([...inLab.runs].filter(([uid]) => before.runs.has(uid)))).toEqual(before.runs);
    for (const uid of copiedUids) expect(inLab.ids.get(uid)).not.toBe(before.ids.get(uid)); // new row ids, same digests

    // Same runs again: refused, nothing copied, the runs named.
    const again = rolloff('store', 'copy', '--from-db', bench, '--to-db', lab);
    expect(again.status).toBe(2);
    expect(again.stderr).toMatch(/already holds 2 of these runs: run \d+ \(there as run \d+\).*Nothing was copied/);
    expect(again.stderr).toMatch(/--skip-existing/);
    const skipped = rolloff('store', 'copy', '--from-db', bench, '--to-db', lab, '--skip-existing');
    expect(skipped.status, skipped.stderr).toBe(0);
    expect(skipped.stdout).toMatch(/copied 0 run\(s\)/);
    expect(skipped.stdout).toMatch(/skipped 2 run\(s\) already there/);
    const lab2 = await openStore(lab);
    expect((await lab2.listRuns()).length).toBe(4); // its own two and the two copied, nothing doubled
    expect(await lab2.integrityProblems()).toEqual([]);
    await lab2.close();

    // And back out into a new file: the lab's four runs, the copied ones with their digests and offline period.
    const out = rolloff('store', 'copy', '--from-db', lab, '--to-db', back);
    expect(out.status, out.stderr).toBe(0);
    expect(out.stdout).toMatch(/copied 4 run\(s\)/);
    expect(out.stdout).toMatch(/designs: 2 copied, 0 already there/); // the demo's design, stored once on each bench: two uids
    const backAgain = await digestsIn(back);
    expect(backAgain.runs).toEqual(inLab.runs);
    expect(new Map([...backAgain.runs].filter(([uid]) => before.runs.has(uid)))).toEqual(before.runs);
    const file = await openStore(back, { readonly: true });
    const copiedNewest = (await file.listRuns()).find((run) => run.uid === newest.uid)!;
    expect((await file.getRun(copiedNewest.id)).offlinePeriods).toEqual([{ from: '2026-12-01T10:00:00.000Z', to: '2026-12-01T10:00:42.000Z' }]);
    await file.close();

    // A comparison of the two copied runs: the same digest in all three stores, where the row ids differ.
    const comparison = await comparisonDigestIn(bench, copiedUids);
    expect(await comparisonDigestIn(lab, copiedUids)).toBe(comparison);
    expect(await comparisonDigestIn(back, copiedUids)).toBe(comparison);
  }, 300_000);

  it('refuses a copy without --to-db, or onto itself, with the fix named', () => {
    const noTarget = rolloff('store', 'copy', '--from-db', join(folder.path, 'bench.sqlite'));
    expect(noTarget.status).toBe(2);
    expect(noTarget.stderr).toMatch(/--to-db.*is required/s);
    const missing = rolloff('store', 'copy', '--from-db', join(folder.path, 'no-such.sqlite'), '--to-db', join(folder.path, 'out.sqlite'));
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/--from-db.*no database at/s);
    const same = rolloff('store', 'copy', '--from-db', 'x.sqlite', '--to-db', 'x.sqlite');
    expect(same.status).toBe(2);
    expect(same.stderr).toMatch(/same store/);
  }, 60_000);
});
