/**
 * No point lost when the lab store goes away: a `rolloff sweep` process sweeps
 * into a PostgreSQL database (a throw-away cluster); the server is stopped in
 * the middle of the sweep (pg_ctl stop -m immediate: to the bench, a pulled
 * cable) and started again. The sweep goes on into the bench's outbox, sends
 * the kept points when the server is back, and the server then holds every
 * step once, in order, with the run's offline period recorded and shown by
 * `rolloff show` and in the exported record.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { readdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import Database from 'better-sqlite3';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { PostgresStore } from '../../../app/store/postgres/postgres-store';
import { OutboxStore } from '../../../app/store/outbox/outbox-store';
import { newNoiseRun, newRun, noiseRecord, point, seedRun } from '../../store-conformance/fixtures';
import { exportFromDatabase } from '../../../app/cli/commands/export';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';
import { tempFolder } from '../sweep/helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Points waiting in the outbox files of a folder, read from the file itself (0 before it exists). */
function keptPoints(outboxDir: string): number {
  let total = 0;
  for (const name of readdirSync(outboxDir).filter((n) => n.endsWith('.sqlite'))) {
    const db = new Database(join(outboxDir, name), { readonly: true, fileMustExist: true });
    try {
      total += (db.prepare(`SELECT count(*) AS n FROM pending WHERE json_extract(write, '$.kind') = 'point'`).get() as { n: number }).n;
    } catch {
      // the file is being created: nothing kept yet
    } finally {
      db.close();
    }
  }
  return total;
}

describe.skipIf(!postgresAvailable())('PostgreSQL stopped mid-sweep and started again', () => {
  let cluster: PostgresCluster;
  const folder = tempFolder();
  beforeAll(async () => {
    cluster = await startPostgresCluster();
  });
  afterAll(() => {
    cluster?.remove();
    folder.remove();
  });

  it('the sweep goes on through the outbox; afterwards the server holds every point once, in order, and the record says when it was offline', async () => {
    const url = cluster.urlWithPassword;
    const outboxDir = join(folder.path, 'outbox');
    const designPath = join(folder.path, 'lowpass.json');
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    // 10 Hz–10 kHz at 10/decade: 31 points, 2.7 s of bench time at least; at time scale 0.1 (about 30 s) the sweep lasts long enough
    // for the server to go and come back in the middle of it (its start after an immediate stop runs crash recovery: seconds).
    const child = spawn(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', 'outbox test', '--simulated', '--time-scale', '0.1',
      '--max-stimulus', '1', '--db', url, '--from', '10', '--to', '10k', '--per-decade', '10', '--no-refine'],
    { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, ROLLOFF_OUTBOX_DIR: outboxDir, ROLLOFF_BENCH: 'bench 9' } });
    let stderr = '';
    child.stderr.on('data', (chunk) => (stderr += chunk));
    child.stdout.on('data', (chunk) => (stderr += chunk));
    const exited = new Promise<number | null>((done) => child.on('close', (code) => done(code)));

    const store = await PostgresStore.open(url);
    const pointsOnServer = async () => {
      const [run] = await store.listRuns({ limit: 1 });
      return run?.pointCount ?? 0;
    };
    const deadline = Date.now() + 60_000;
    while ((await pointsOnServer()) < 3) {
      if (Date.now() > deadline) throw new Error(`sweep made no progress: ${stderr}`);
      await sleep(50);
    }
    const [run] = await store.listRuns({ limit: 1 });
    await store.close();

    cluster.stop();
    const stoppedAtMs = Date.now();
    // The sweep goes on while the server is away: points pile up in the outbox.
    while (keptPoints(outboxDir) < 3) {
      if (Date.now() - stoppedAtMs > 60_000) throw new Error(`no point kept in the outbox: ${stderr}`);
      await sleep(100);
    }
    const keptWhileDown = keptPoints(outboxDir);
    cluster.start();
    const startedAtMs = Date.now();

    expect(await exited, stderr).toBe(0);
    expect(stderr).toMatch(/cannot be reached/);
    expect(stderr).toMatch(/the sweep goes on: its points are kept in .*outbox.*sent, in order, when the store is back/s);
    expect(stderr).toMatch(/the store is back: \d+ kept write\(s\) sent in order/);
    expect(stderr).not.toContain(cluster.password);
    expect(keptPoints(outboxDir)).toBe(0);

    const after = await PostgresStore.open(url);
    try {
      const finished = await after.getRun(run.id);
      const points = await after.loadPoints(run.id);
      expect(finished.status).toBe('done');
      // Every planned step once, in order, at its planned frequency: nothing lost, nothing doubled.
      expect(points.step).toEqual(finished.plan.steps.map((_, i) => i));
      expect(points.stimulus).toEqual(finished.plan.steps.map((s) => s.stimulus));
      expect(finished.pointCount).toBe(points.step.length);
      expect(points.step.length).toBeGreaterThan(3 + keptWhileDown - 1);
      // Measurement times climb step by step: the kept points carry when they were measured, not when they were sent.
      const times = points.measuredAt.map(Date.parse);
      for (let i = 1; i < times.length; i++) expect(times[i]).toBeGreaterThanOrEqual(times[i - 1]);
      expect(times.filter((t) => t > stoppedAtMs && t < startedAtMs).length).toBeGreaterThanOrEqual(keptWhileDown);
      // …and the sweep went on after the server came back (it did not end while the server was away).
      expect(times.filter((t) => t > startedAtMs).length).toBeGreaterThan(0);
      // The end of the run is when the sweep ended, which is not the time the status reached the server.
      const events = await after.listEvents(run.id);
      expect(events.filter((e) => e.message === 'sweep finished')).toHaveLength(1);
      // One offline period, around the server's downtime (1 s retry interval, plus the server's start-up).
      expect(finished.offlinePeriods).toHaveLength(1);
      const [period] = finished.offlinePeriods;
      expect(Date.parse(period.from)).toBeGreaterThanOrEqual(stoppedAtMs - 2_000);
      expect(Date.parse(period.from)).toBeLessThanOrEqual(stoppedAtMs + 5_000);
      expect(Date.parse(period.to)).toBeGreaterThanOrEqual(startedAtMs - 1_000);
      expect(await after.getRunOwnership(run.id)).toBeUndefined(); // released once the kept writes were sent
      expect(await after.integrityProblems()).toEqual([]);
    } finally {
      await after.close();
    }

    const shown = spawnSync(process.execPath, [BIN, 'show', String(run.id), '--db', url], { encoding: 'utf8', timeout: 60_000, env: { ...process.env, ROLLOFF_OUTBOX_DIR: outboxDir } });
    expect(shown.status, shown.stderr).toBe(0);
    expect(shown.stdout).toMatch(/store unreachable, points kept in the bench's outbox: \S+ to \S+ \(\d+ s\)/);
    const record = JSON.parse(new TextDecoder().decode((await exportFromDatabase(url, [run.id], 'json', 'theory')).bytes));
    expect(record.run.offlinePeriods).toHaveLength(1);
    expect(record.points.step).toHaveLength(record.run.plannedCount);
  }, 240_000);

  it('on this bench, a run whose points wait in a live process\'s outbox is not taken over, even with a stale heartbeat', async () => {
    const url = cluster.createDatabase('claims').replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`);
    // Two processes of one bench share its outbox file; here two stores in this test process stand for them.
    const outbox = { path: join(folder.path, 'claims-outbox.sqlite'), log: () => {}, flushOnCloseMs: 10_000 };
    const driving = OutboxStore.open(await PostgresStore.open(url), outbox);
    const asking = OutboxStore.open(await PostgresStore.open(url), outbox);
    const { build } = await seedRun(driving);
    const run = await driving.createRun(newRun(build.id));
    const me = { ownerId: 'bench-process-a', pid: process.pid, host: 'this host', label: 'rolloff sweep' };
    expect((await driving.claimRun(run.id, me, 10_000)).claimed).toBe(true);
    await driving.insertPoint(run.id, point(0));
    cluster.stop();
    await driving.insertPoint(run.id, point(1)); // kept: the server is away
    expect(driving.pendingWrites()).toBe(1);
    expect(await driving.nextStep(run.id)).toBe(2); // answered from the run's mirror
    expect(await driving.renewRunHeartbeat(run.id, me.ownerId)).toBe(true); // still this bench's run

    // Even with a staleness of 1 ms, the other process is refused, told whose points wait.
    const refused = await asking.claimRun(run.id, { ownerId: 'bench-process-b', pid: process.pid, host: 'this host', label: 'rolloff resume' }, 1);
    expect(refused.claimed).toBe(false);
    expect(refused.ownership.label).toMatch(/points of the run wait in its outbox/);

    cluster.start();
    await driving.close(); // sends what it kept before closing
    const server = await PostgresStore.open(url);
    try {
      expect((await server.loadPoints(run.id)).step).toEqual([0, 1]);
      expect((await server.getRun(run.id)).offlinePeriods).toHaveLength(1);
    } finally {
      await server.close();
      await asking.close();
    }
  }, 120_000);

  it('a noise run\'s records go through the outbox as points do: kept while the server is away, read back from the mirror, sent with every spectrum bit for bit', async () => {
    const url = cluster.createDatabase('noise_records').replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`);
    const store = OutboxStore.open(await PostgresStore.open(url), { path: join(folder.path, 'noise-outbox.sqlite'), log: () => {}, retryIntervalMs: 600_000, flushOnCloseMs: 10_000 });
    const { build } = await seedRun(store);
    const run = await store.createRun(newNoiseRun(build.id));
    const me = { ownerId: 'bench-noise', pid: process.pid, host: 'this host', label: 'rolloff noise' };
    expect((await store.claimRun(run.id, me, 10_000)).claimed).toBe(true);
    await store.insertNoiseRecord(run.id, noiseRecord(0), { asOwner: me.ownerId });
    cluster.stop();
    await store.insertNoiseRecord(run.id, noiseRecord(1), { asOwner: me.ownerId }); // kept
    // A meter reading: no spectrum, NaN sample rate and mean (the outbox file keeps them as null).
    const meterReading = noiseRecord(2, { psdV2PerHz: undefined, sampleRateHz: Number.NaN, segments: 0, degreesOfFreedom: 0, meanV: Number.NaN });
    await store.insertNoiseRecord(run.id, meterReading, { asOwner: me.ownerId }); // kept
    expect(store.pendingWrites()).toBe(2);
    expect(await store.nextStep(run.id)).toBe(3); // the mirror's answer
    const mirrored = await store.loadNoiseRecords(run.id);
    expect(mirrored.step).toEqual([0, 1, 2]);
    expect(Array.from(mirrored.psdV2PerHz[1]!)).toEqual(Array.from(noiseRecord(1).psdV2PerHz!));
    expect((await store.getRun(run.id)).pointCount).toBe(3);
    cluster.start();
    await store.close(); // back: sends what it kept
    const server = await PostgresStore.open(url);
    try {
      const records = await server.loadNoiseRecords(run.id);
      expect(records.step).toEqual([0, 1, 2]);
      for (const step of [0, 1]) expect(Array.from(records.psdV2PerHz[step]!)).toEqual(Array.from(noiseRecord(step).psdV2PerHz!));
      expect(records.psdV2PerHz[2]).toBeNull();
      expect(Number.isNaN(records.sampleRateHz[2])).toBe(true);
      expect(Number.isNaN(records.meanV[2])).toBe(true);
      expect(records.rmsV[2]).toBe(meterReading.rmsV);
      expect((await server.getRun(run.id)).pointCount).toBe(3);
      expect((await server.getRun(run.id)).offlinePeriods).toHaveLength(1);
      expect(await server.integrityProblems()).toEqual([]);
    } finally {
      await server.close();
    }
  }, 120_000);

  it('a bench that finds its run taken over by another bench when it comes back keeps the other\'s points, state and event lines, and says so on the run', async () => {
    const url = cluster.createDatabase('taken_over').replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`);
    // A long retry interval: the kept point is sent only when this bench closes, after the other bench took the run.
    const cutOff = OutboxStore.open(await PostgresStore.open(url), { path: join(folder.path, 'taken-over-outbox.sqlite'), log: () => {}, retryIntervalMs: 600_000, flushOnCloseMs: 10_000 });
    const { build } = await seedRun(cutOff);
    const run = await cutOff.createRun(newRun(build.id));
    expect((await cutOff.claimRun(run.id, { ownerId: 'bench-3', pid: process.pid, host: 'bench 3', label: 'rolloff sweep' }, 10_000)).claimed).toBe(true);
    await cutOff.insertPoint(run.id, point(0));
    cluster.stop();
    await cutOff.insertPoint(run.id, point(1, { gainDb: 11 })); // kept
    await cutOff.insertPoint(run.id, point(2, { gainDb: 12 })); // kept
    // The cut-off bench's sweep ends (as its owner): kept too, with its owner condition.
    expect((await cutOff.updateRunStatus(run.id, 'paused', undefined, { asOwner: 'bench-3' })).status).toBe('paused'); // the mirror's answer
    await cutOff.appendEvent(run.id, 'info', 'paused before step 3', undefined, { asOwner: 'bench-3' }); // kept, with its owner condition
    cluster.start();

    // Another machine sees a stale heartbeat (here: older than 1 ms) and takes the run, measuring step 1 again.
    const other = await PostgresStore.open(url);
    try {
      expect((await other.claimRun(run.id, { ownerId: 'bench-7', pid: 4242, host: 'bench 7', label: 'rolloff resume' }, 1)).claimed).toBe(true);
      await other.insertPoint(run.id, point(1, { gainDb: 71 }), { asOwner: 'bench-7' });
      await other.updateRunStatus(run.id, 'running', undefined, { asOwner: 'bench-7' });
      await cutOff.close(); // back: sends what it kept
      const points = await other.loadPoints(run.id);
      expect(points.step).toEqual([0, 1, 2]); // each step once
      expect(points.gainDb).toEqual([point(0).gainDb, 71, 12]); // the other bench's step 1 kept, the free step 2 filled from the outbox
      const warning = (await other.listEvents(run.id)).find((event) => event.level === 'warning');
      expect(warning?.message).toMatch(/was cut off from the store from \S+ to \S+; meanwhile the run was taken over by rolloff resume \(process 4242 on bench 7\)/);
      expect((await other.getRun(run.id)).offlinePeriods).toHaveLength(1);
      // The kept "paused" of the bench that lost the run is not sent over the new owner's state.
      const after = await other.getRun(run.id);
      expect(after.status).toBe('running');
      expect(after.owner?.ownerId).toBe('bench-7');
      expect((await other.listEvents(run.id)).map((event) => event.message)).not.toContain('paused before step 3'); // nor its kept line
    } finally {
      await other.close();
    }
  }, 120_000);
});
