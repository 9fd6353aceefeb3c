/**
 * The command line over a lab store: `rolloff demo --fast` sweeps into a
 * PostgreSQL database named with --db, `rolloff runs` on another process lists
 * what it stored, and the password (in the address) appears in no output.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';
import { PostgresStore } from '../../../app/store/postgres/postgres-store';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
const hasPostgres = postgresAvailable();

describe.skipIf(!hasPostgres)('rolloff commands with --db postgres://…', () => {
  let cluster: PostgresCluster;
  beforeAll(async () => {
    cluster = await startPostgresCluster();
  });
  afterAll(() => cluster?.remove());

  const rolloff = (...args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 90_000 });

  it('sweeps into the lab store and lists the runs from another process, never printing the password', async () => {
    const demo = rolloff('demo', '--fast', '--db', cluster.urlWithPassword);
    expect(demo.status, demo.stderr).toBe(0);
    expect(demo.stdout).toMatch(/gain-limit point/);
    const runs = rolloff('runs', '--db', cluster.urlWithPassword);
    expect(runs.status, runs.stderr).toBe(0);
    for (const output of [demo.stdout, demo.stderr, runs.stdout, runs.stderr]) expect(output).not.toContain(cluster.password);

    const store = await PostgresStore.open(cluster.urlWithPassword);
    try {
      const stored = await store.listRuns();
      expect(stored.length).toBeGreaterThanOrEqual(2);
      for (const run of stored) {
        expect(run.status).toBe('done');
        expect(run.pointCount).toBe((await store.loadPoints(run.id)).step.length);
        expect(runs.stdout).toContain(run.buildLabel);
      }
      expect(await store.integrityProblems()).toEqual([]);
    } finally {
      await store.close();
    }
  });

  it('two benches (processes named by ROLLOFF_BENCH) sweeping into one new lab database at once both complete, every step stored once, each run with its bench', async () => {
    const url = cluster.createDatabase('two_benches').replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`);
    const run = (bench: string) =>
      new Promise<{ status: number | null; stderr: string }>((resolve) => {
        const child = spawn(process.execPath, [BIN, 'demo', '--fast', '--db', url], { stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, ROLLOFF_BENCH: bench } });
        let stderr = '';
        child.stderr.on('data', (chunk) => (stderr += chunk));
        child.on('close', (status) => resolve({ status, stderr }));
      });
    // Both open the empty database at the same moment: one migrates under the advisory lock, the other waits.
    const results = await Promise.all([run('bench 3'), run('bench 7')]);
    for (const result of results) expect(result.status, result.stderr).toBe(0);
    const store = await PostgresStore.open(url);
    try {
      const runs = await store.listRuns();
      expect(runs).toHaveLength(4); // the demo sweeps two builds; two processes
      for (const summary of runs) {
        expect(summary.status).toBe('done');
        const steps = (await store.loadPoints(summary.id)).step;
        expect(steps).toEqual(Array.from({ length: steps.length }, (_, i) => i)); // each step once, none missing
        expect(summary.pointCount).toBe(steps.length);
        expect(steps.length).toBeGreaterThan(10);
      }
      // Each process recorded its own bench name with its runs.
      expect((await store.listRuns({ bench: 'bench 3' })).length).toBe(2);
      expect((await store.listRuns({ bench: 'bench 7' })).length).toBe(2);
      expect(await store.integrityProblems()).toEqual([]);
    } finally {
      await store.close();
    }
  });

  it('refuses an unreachable lab store with a plain message and exit code 2, password hidden', () => {
    const url = cluster.urlWithPassword.replace(`:${cluster.port}/`, ':1/');
    const result = rolloff('runs', '--db', url);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/cannot be reached/);
    expect(result.stderr).not.toContain(cluster.password);
  });
});
