/**
 * Live across the lab: a `rolloff serve` process on a PostgreSQL store passes on,
 * over its WebSocket, the points, progress and events of a sweep that another
 * process (the CLI) drives into the same database — while that sweep runs. The
 * polling fall-back (no LISTEN) delivers the same points in the same order.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { WebSocket } from 'ws';
import type { ServiceEvents } from '../../../app/contract/contract';
import { followLabChanges } from '../../../app/service/lab-changes';
import { PostgresStore } from '../../../app/store/postgres/postgres-store';
import { startServe } from '../../e2e/helpers/serve-process';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';
import { noisyGain1000 } from '../noise/helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');

/** Runs the demo sweep into the database in its own process; resolves with its exit status and the time it ended. */
function demoSweep(url: string): Promise<{ status: number | null; stderr: string; endedAtMs: number }> {
  return new Promise((resolvePromise) => {
    const child = spawn(process.execPath, [BIN, 'demo', '--time-scale', '20', '--db', url], { stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, ROLLOFF_BENCH: 'bench 5' } });
    let stderr = '';
    child.stderr.on('data', (chunk) => (stderr += chunk));
    child.on('close', (status) => resolvePromise({ status, stderr, endedAtMs: Date.now() }));
  });
}

describe.skipIf(!postgresAvailable())('live across the lab (PostgreSQL LISTEN/NOTIFY, polling fall-back)', () => {
  let cluster: PostgresCluster;
  beforeAll(async () => {
    cluster = await startPostgresCluster();
  });
  afterAll(() => cluster?.remove());
  const withPassword = (url: string) => url.replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`);

  it('a second process with rolloff serve receives the points of a sweep started by a CLI process, live, each step once', async () => {
    const url = withPassword(cluster.createDatabase('live_serve'));
    const serve = await startServe([], { dbPath: url });
    const received: Array<{ event: keyof ServiceEvents; payload: Record<string, unknown>; atMs: number }> = [];
    try {
      const socket = new WebSocket(new URL('events', serve.url.replace(/^http/, 'ws')).toString());
      await new Promise((r, reject) => {
        socket.once('open', r);
        socket.once('error', reject);
      });
      socket.on('message', (data) => received.push({ ...JSON.parse(String(data)), atMs: Date.now() }));
      const sweep = await demoSweep(url);
      expect(sweep.status, sweep.stderr).toBe(0);
      const store = await PostgresStore.open(url);
      try {
        const runs = (await store.listRuns()).reverse();
        expect(runs.length).toBe(2); // the demo sweeps two builds
        // The last notifications may still be on their way: wait until every stored point has arrived (at most 10 s).
        const storedCount = runs.reduce((sum, run) => sum + run.pointCount, 0);
        for (let waited = 0; received.filter((m) => m.event === 'point').length < storedCount && waited < 10_000; waited += 100) await new Promise((r) => setTimeout(r, 100));
        for (const run of runs) {
          const stored = await store.loadPoints(run.id);
          const points = received.filter((m) => m.event === 'point' && m.payload.runId === run.id).map((m) => m.payload);
          expect(points.map((p) => p.index)).toEqual(stored.step); // in order, each step once
          expect(points.map((p) => p.gainDb)).toEqual(stored.gainDb.map((g) => (Number.isNaN(g) ? null : g)));
          const progress = received.filter((m) => m.event === 'progress' && m.payload.runId === run.id).map((m) => m.payload);
          expect(progress.at(-1)).toMatchObject({ status: 'done', step: stored.step.length });
          expect(received.some((m) => m.event === 'runEvent' && m.payload.runId === run.id)).toBe(true);
        }
        // Live: the first run's points reached the window while the CLI process was still sweeping.
        const firstPoint = received.find((m) => m.event === 'point')!;
        expect(firstPoint.atMs).toBeLessThan(sweep.endedAtMs);
      } finally {
        await store.close();
      }
      socket.close();
    } finally {
      await serve.stop();
    }
    expect(serve.output()).not.toContain(cluster.password);
  });

  it('without LISTEN, polling passes on the same points in order, each once', async () => {
    const url = withPassword(cluster.createDatabase('live_poll'));
    const store = await PostgresStore.open(url);
    const points: Array<ServiceEvents['point']> = [];
    const feed = await followLabChanges({
      store,
      drivesRun: () => false,
      emit: (event, payload) => {
        if (event === 'point') points.push(payload as ServiceEvents['point']);
      },
      forcePolling: true,
      pollIntervalMs: 50,
    });
    try {
      expect(feed?.mode).toBe('poll');
      const sweep = await demoSweep(url);
      expect(sweep.status, sweep.stderr).toBe(0);
      const runs = (await store.listRuns()).reverse();
      const storedCount = runs.reduce((sum, run) => sum + run.pointCount, 0);
      for (let waited = 0; points.length < storedCount && waited < 10_000; waited += 50) await new Promise((r) => setTimeout(r, 50));
      for (const run of runs) expect(points.filter((p) => p.runId === run.id).map((p) => p.index)).toEqual((await store.loadPoints(run.id)).step);
      expect(points).toHaveLength(storedCount);
    } finally {
      await feed?.stop();
      await store.close();
    }
  });

  it('a noise run another process drives into the lab store reaches this one as progress by its records, and is stored whole', async () => {
    const url = withPassword(cluster.createDatabase('live_noise'));
    const store = await PostgresStore.open(url);
    const progress: Array<ServiceEvents['progress']> = [];
    const feed = await followLabChanges({
      store,
      drivesRun: () => false,
      emit: (event, payload) => {
        if (event === 'progress') progress.push(payload as ServiceEvents['progress']);
      },
      forcePolling: true,
      pollIntervalMs: 50,
    });
    const folder = mkdtempSync(join(tmpdir(), 'rolloff-live-noise-'));
    try {
      const designPath = join(folder, 'noisy.json');
      writeFileSync(designPath, JSON.stringify(noisyGain1000()));
      // In its own process, not waited for synchronously: this one keeps looking while the run measures.
      const noise = await new Promise<{ status: number | null; stderr: string }>((done) => {
        const child = spawn(process.execPath, [BIN, 'noise', '--design', designPath, '--simulated', '--circuit-noise', '--time-scale', '5', '--max-stimulus', '1',
          '--db', url, '--band', '200:20k', '--records', '6'], { stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, ROLLOFF_BENCH: 'bench 6' } });
        let stderr = '';
        child.stderr.on('data', (chunk) => (stderr += chunk));
        child.on('close', (status) => done({ status, stderr }));
      });
      expect(noise.status, noise.stderr).toBe(0);
      const [run] = await store.listRuns();
      expect(run).toMatchObject({ kind: 'noise', status: 'done', pointCount: 6, benchName: 'bench 6' });
      for (let waited = 0; progress.at(-1)?.status !== 'done' && waited < 10_000; waited += 50) await new Promise((r) => setTimeout(r, 50));
      expect(progress.at(-1)).toMatchObject({ runId: run.id, step: 6, total: 6, status: 'done' });
      // Seen while it measured, record by record, not only at its end.
      expect(progress.some((p) => p.status === 'running' && p.step > 0 && p.step < 6)).toBe(true);
      expect((await store.loadNoiseRecords(run.id)).step).toEqual([0, 1, 2, 3, 4, 5]);
      const stored = await store.getRun(run.id);
      expect(stored.figures?.noise?.recordsUsed).toBe(6);
      expect(await store.integrityProblems()).toEqual([]);
    } finally {
      rmSync(folder, { recursive: true, force: true });
      await feed?.stop();
      await store.close();
    }
  });
});
