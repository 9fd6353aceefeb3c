/**
 * The command line over a lab store: `rolloff demo --time-scale 20` sweeps into a
 * PostgreSQL database named with --db, `rolloff runs` on another process lists
 * what it stored, and the password (in the address) appears in no output. Two
 * benches sweeping at once each keep their own maximum stimulus.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { PostgresStore } from '../../../app/store/postgres/postgres-store';
import { callService, startServe } from '../../e2e/helpers/serve-process';
import type { RunSummary } from '../../../app/contract/contract';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';
import { benchKey } from '../../../app/bench/bench-key';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
const hasPostgres = postgresAvailable();

describe.skipIf(!hasPostgres)('rolloff commands with --db postgres://…', () => {
  let cluster: PostgresCluster;
  beforeAll(async () => {
    cluster = await startPostgresCluster();
  });
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-pg-cli-'));
  afterAll(() => {
    cluster?.remove();
    rmSync(folder, { recursive: true, force: true });
  });

  const twoBenchesUrl = () => (twoBenches ??= cluster.createDatabase('two_benches').replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`));
  let twoBenches: string | undefined;
  const rolloff = (...args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 90_000 });

  it('sweeps into the lab store and lists the runs from another process, never printing the password', async () => {
    const demo = rolloff('demo', '--time-scale', '20', '--db', cluster.urlWithPassword);
    expect(demo.status, demo.stderr).toBe(0);
    expect(demo.stdout).toMatch(/Gain-limit point/);
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
      // A run left running with nobody driving it: runs then says how to resume it, with the address but not the password.
      const done = await store.getRun(stored[0].id);
      if (done.kind === 'noise') throw new Error(`run ${done.id} is a noise run, not the sweep this test made`);
      const [left] = await store.createRuns([{ buildId: done.buildId, kind: done.kind, request: done.request, plan: done.plan, softwareVersion: done.softwareVersion, bench: done.bench, operator: 'left running', notes: '', simulated: done.simulated }]);
      await store.updateRunStatus(left.id, 'running');
    } finally {
      await store.close();
    }
    const withInterrupted = rolloff('runs', '--db', cluster.urlWithPassword);
    expect(withInterrupted.stderr).toMatch(/Continue one with: rolloff resume RUN --db postgres:\/\//);
    expect(withInterrupted.stderr + withInterrupted.stdout).not.toContain(cluster.password);
  });

  it('two benches (processes named by ROLLOFF_BENCH) sweeping into one new lab database at once both complete, every step stored once, each run with its bench and its bench\'s own maximum stimulus', async () => {
    const url = twoBenchesUrl();
    const designPath = join(folder, 'lowpass.json');
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    const sweep = (bench: string, extra: string[]) =>
      new Promise<{ status: number | null; stderr: string }>((resolve) => {
        const child = spawn(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', bench, '--simulated', '--time-scale', '20', '--db', url, ...extra], {
          stdio: ['ignore', 'ignore', 'pipe'],
          env: { ...process.env, ROLLOFF_BENCH: bench },
        });
        let stderr = '';
        child.stderr.on('data', (chunk) => (stderr += chunk));
        child.on('close', (status) => resolve({ status, stderr }));
      });
    // Each bench sweeps twice: first with its own limit, then reusing it (never the other bench's).
    const limitOf: Record<string, number> = { 'bench 3': 1.5, 'bench 7': 0.25 };
    const twice = async (bench: string) => [await sweep(bench, ['--max-stimulus', String(limitOf[bench])]), await sweep(bench, [])];
    // Both open the empty database at the same moment: one migrates under the advisory lock, the other waits.
    const results = (await Promise.all([twice('bench 3'), twice('bench 7')])).flat();
    for (const result of results) expect(result.status, result.stderr).toBe(0);
    expect(results[1].stderr).toMatch(/reusing the limit of 1\.5 Vpp set on .* for the simulated bench of "bench 3"/);
    expect(results[3].stderr).toMatch(/reusing the limit of 0\.25 Vpp set on .* for the simulated bench of "bench 7"/);
    const store = await PostgresStore.open(url);
    try {
      const runs = await store.listRuns();
      expect(runs).toHaveLength(4); // two sweeps per bench
      for (const summary of runs) {
        expect(summary.status).toBe('done');
        const steps = (await store.loadPoints(summary.id)).step;
        expect(steps).toEqual(Array.from({ length: steps.length }, (_, i) => i)); // each step once, none missing
        expect(summary.pointCount).toBe(steps.length);
        expect(steps.length).toBeGreaterThan(10);
        // Each run was planned and driven under its own bench's limit.
        const run = await store.getRun(summary.id);
        expect(run.request.maxStimulusVpp, summary.benchName).toBe(limitOf[summary.benchName]);
        expect(Math.max(...(await store.loadPoints(summary.id)).amplitudeVpp)).toBeLessThanOrEqual(limitOf[summary.benchName]);
      }
      // Each process recorded its own bench name with its runs, and each bench's setting is its own.
      expect((await store.listRuns({ bench: 'bench 3' })).length).toBe(2);
      expect((await store.listRuns({ bench: 'bench 7' })).length).toBe(2);
      for (const bench of Object.keys(limitOf)) {
        expect((await store.getBenchSettings(benchKey({ name: bench, simulated: true })))?.maxStimulusVpp).toBe(limitOf[bench]);
        expect(await store.getBenchSettings(benchKey({ name: bench, simulated: false }))).toBeUndefined();
      }
      expect(await store.integrityProblems()).toEqual([]);
    } finally {
      await store.close();
    }
  }, 240_000);

  it('lists the runs of one bench: rolloff runs --bench, and listRuns({ bench }) through the window\'s API of rolloff serve', async () => {
    const url = twoBenchesUrl(); // swept by the two benches of the test above
    const table = rolloff('runs', '--bench', 'bench 3', '--db', url);
    expect(table.status, table.stderr).toBe(0);
    const rows = table.stdout.trim().split('\n');
    expect(rows[0]).toMatch(/\bbench\b/); // the bench column
    expect(rows.slice(1)).toHaveLength(2);
    for (const row of rows.slice(1)) expect(row).toContain('bench 3');
    expect(table.stdout).not.toContain('bench 7');
    const refused = rolloff('runs', '--bench', 'x'.repeat(65), '--db', url);
    expect(refused.status).toBe(2);
    expect(refused.stderr).toMatch(/--bench/);

    const serve = await startServe([], { dbPath: url });
    try {
      const seven = await callService<RunSummary[]>(serve, 'listRuns', [{ bench: 'bench 7' }]);
      expect(seven.map((run) => run.benchName)).toEqual(['bench 7', 'bench 7']);
      const all = await callService<RunSummary[]>(serve, 'listRuns', []);
      expect(new Set(all.map((run) => run.benchName))).toEqual(new Set(['bench 3', 'bench 7']));
      await expect(callService(serve, 'listRuns', [{ bench: 7 }])).rejects.toThrow(/bench/);
      expect(serve.output()).not.toContain(cluster.password);
    } finally {
      await serve.stop();
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
