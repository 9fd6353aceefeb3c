/**
 * Crash safety on the lab store, end to end through the CLI with real
 * processes: a `rolloff sweep` into PostgreSQL (a throw-away cluster) is
 * SIGKILLed in the middle of the sweep, then `rolloff resume` on the same bench
 * finishes the run: every point stored before the kill is there unchanged, no
 * step is stored twice, the run completes. The second case kills the bench
 * while the server is away, so its last points exist only in the bench's
 * outbox: the resume sends them first and continues after them.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { readdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import Database from 'better-sqlite3';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { PostgresStore } from '../../../app/store/postgres/postgres-store';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';
import { tempFolder } from './helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe.skipIf(!postgresAvailable())('SIGKILL of a bench mid-sweep on PostgreSQL, then resume from that bench', () => {
  let cluster: PostgresCluster;
  const folder = tempFolder();
  const outboxDir = join(folder.path, 'outbox');
  const env = { ...process.env, ROLLOFF_OUTBOX_DIR: outboxDir, ROLLOFF_BENCH: 'bench 4' };
  const designPath = join(folder.path, 'lowpass.json');
  beforeAll(async () => {
    cluster = await startPostgresCluster();
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
  });
  afterAll(() => {
    cluster?.remove();
    folder.remove();
  });
  const withPassword = (url: string) => url.replace(`${cluster.role}@`, `${cluster.role}:${encodeURIComponent(cluster.password)}@`);

  /** A sweep of 31 points (10 Hz–10 kHz at 10/decade) in its own process. */
  function startSweep(url: string, timeScale: string): { child: ChildProcess; output: () => string; exited: Promise<NodeJS.Signals | null> } {
    const child = spawn(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', 'crash test', '--simulated', '--time-scale', timeScale,
      '--max-stimulus', '1', '--db', url, '--from', '10', '--to', '10k', '--per-decade', '10', '--no-refine'], { stdio: ['ignore', 'pipe', 'pipe'], env });
    let output = '';
    child.stderr!.on('data', (chunk) => (output += chunk));
    child.stdout!.on('data', (chunk) => (output += chunk));
    return { child, output: () => output, exited: new Promise((done) => child.on('exit', (_code, signal) => done(signal))) };
  }

  async function newestRun(url: string) {
    const store = await PostgresStore.open(url);
    try {
      const [run] = await store.listRuns({ limit: 1 });
      return run ? { run: await store.getRun(run.id), points: await store.loadPoints(run.id), owner: await store.getRunOwnership(run.id) } : undefined;
    } finally {
      await store.close();
    }
  }

  async function waitFor(condition: () => Promise<boolean> | boolean, what: string, output: () => string): Promise<void> {
    const deadline = Date.now() + 60_000;
    while (!(await condition())) {
      if (Date.now() > deadline) throw new Error(`${what} did not happen: ${output()}`);
      await sleep(50);
    }
  }

  const resume = (url: string, runId: number) =>
    spawnSync(process.execPath, [BIN, 'resume', String(runId), '--db', url, '--simulated', '--time-scale', '50'], { encoding: 'utf8', timeout: 120_000, env });

  /** After the resume: done, steps 0..n−1 once each at the planned frequencies, the points from before unchanged. */
  async function expectCompleteAndUnchanged(url: string, before: { points: { step: number[]; stimulus: number[]; gainDb: number[]; measuredAt: string[] } }) {
    const after = (await newestRun(url))!;
    expect(after.run.status).toBe('done');
    expect(after.points.step).toEqual(after.run.plan.steps.map((_, i) => i));
    expect(after.points.stimulus).toEqual(after.run.plan.steps.map((s) => s.stimulus));
    expect(after.run.pointCount).toBe(after.points.step.length);
    for (let i = 0; i < before.points.step.length; i++) {
      expect(after.points.stimulus[i]).toBe(before.points.stimulus[i]);
      expect(after.points.gainDb[i]).toBe(before.points.gainDb[i]);
      expect(after.points.measuredAt[i]).toBe(before.points.measuredAt[i]);
    }
    return after;
  }

  it('loses no point, repeats none, and completes the run', async () => {
    const url = withPassword(cluster.createDatabase('killed_bench'));
    const sweep = startSweep(url, '5');
    await waitFor(async () => ((await newestRun(url))?.points.step.length ?? 0) >= 4, 'four stored points', sweep.output);
    sweep.child.kill('SIGKILL');
    expect(await sweep.exited).toBe('SIGKILL');

    const before = (await newestRun(url))!;
    expect(before.run.status).toBe('running'); // nobody marked it: the process died
    expect(before.owner?.pid).toBe(sweep.child.pid); // still recorded as the owner; on this host its process is known gone
    expect(before.points.step.length).toBeLessThan(before.run.plannedCount);

    const listed = spawnSync(process.execPath, [BIN, 'runs', '--db', url], { encoding: 'utf8', env });
    expect(listed.stderr).toMatch(new RegExp(`left running or paused: ${before.run.id}`));
    const resumed = resume(url, before.run.id);
    expect(resumed.status, resumed.stderr).toBe(0);
    expect(resumed.stderr).toMatch(new RegExp(`run ${before.run.id} continues at step ${before.points.step.length}`));
    const after = await expectCompleteAndUnchanged(url, before);
    expect(after.run.offlinePeriods).toEqual([]);
  }, 240_000);

  it('killed while the server was away: the resume sends the points kept in the outbox first, then continues after them', async () => {
    const url = withPassword(cluster.createDatabase('killed_offline'));
    const sweep = startSweep(url, '0.5');
    await waitFor(async () => ((await newestRun(url))?.points.step.length ?? 0) >= 3, 'three stored points', sweep.output);
    const before = (await newestRun(url))!;
    cluster.stop();
    const kept = () => {
      const file = readdirSync(outboxDir).find((name) => name.includes('killed_offline') && name.endsWith('.sqlite'));
      if (!file) return 0;
      const db = new Database(join(outboxDir, file), { readonly: true });
      try {
        return (db.prepare(`SELECT count(*) AS n FROM pending WHERE json_extract(write, '$.kind') = 'point'`).get() as { n: number }).n;
      } finally {
        db.close();
      }
    };
    await waitFor(() => kept() >= 3, 'three points kept in the outbox', sweep.output);
    sweep.child.kill('SIGKILL');
    expect(await sweep.exited).toBe('SIGKILL');
    const keptPoints = kept();
    cluster.start();

    const onServer = (await newestRun(url))!;
    expect(onServer.points.step.length).toBeLessThan(before.points.step.length + keptPoints); // the kept ones are not there yet
    const resumed = resume(url, before.run.id);
    expect(resumed.status, resumed.stderr).toBe(0);
    expect(resumed.stderr).toMatch(/sending what an earlier process of this bench kept in its outbox/);
    // It continues after the kept points: they were measured once, before the kill, and are not measured again.
    const continuedAt = Number(new RegExp(`run ${before.run.id} continues at step (\\d+)`).exec(resumed.stderr)?.[1]);
    expect(continuedAt).toBeGreaterThanOrEqual(onServer.points.step.length + keptPoints);
    expect(kept()).toBe(0);
    const after = await expectCompleteAndUnchanged(url, onServer);
    // The time the dead bench was cut off is recorded with the run.
    expect(after.run.offlinePeriods).toHaveLength(1);
  }, 240_000);
});
