/**
 * Crash safety, end to end through the CLI: a `rolloff sweep` process is
 * SIGKILLed in the middle of a sweep on the simulated bench, then
 * `rolloff resume` finishes the run. Every point stored before the kill is
 * still there unchanged, no step is stored twice, and the run completes.
 * (Durability of one committed point is the store's synchronous=FULL, tested
 * in test/integration/store; here the whole crash/resume path is exercised.)
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { startCliSweep, tempFolder, writeLowpassDesign } from './helpers';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

describe('SIGKILL in the middle of a sweep, then resume', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('loses no point, duplicates none, and completes the run', async () => {
    const designPath = writeLowpassDesign(folder.path);
    const dbPath = join(folder.path, 'runs.sqlite');

    // 10 Hz–10 kHz at 10/decade: 31 points; at time scale 5 the low-frequency points take ~0.1 s of wall time each.
    const sweep = startCliSweep({ dbPath, designPath, label: 'crash test', timeScale: 5, fromHz: 10 });
    const child = sweep.child;
    await sweep.pointsStored(4);
    child.kill('SIGKILL');
    expect(await sweep.exited).toBe('SIGKILL');

    const before = SqliteStore.open(dbPath, { readonly: true });
    const [run] = await before.listRuns({ limit: 1 });
    const pointsBefore = await before.loadPoints(run.id);
    expect(run.status).toBe('running'); // nobody marked it: the process died
    // The dead process is still recorded as the owner, with a heartbeat a moment old: the store alone cannot tell
    // it is gone; `rolloff runs` below can (same host, process gone).
    expect((await before.getRunOwnership(run.id))?.pid).toBe(child.pid);
    await before.close();
    expect(pointsBefore.step.length).toBeGreaterThanOrEqual(4);
    expect(pointsBefore.step.length).toBeLessThan(run.plannedCount);

    const listed = spawnSync(process.execPath, [BIN, 'runs', '--db', dbPath], { encoding: 'utf8' });
    expect(listed.stderr).toMatch(new RegExp(`left running or paused: ${run.id}`));

    const resumed = spawnSync(process.execPath, [BIN, 'resume', String(run.id), '--db', dbPath, '--simulated', '--time-scale', '50'], { encoding: 'utf8', timeout: 60_000 });
    expect(resumed.status, resumed.stderr).toBe(0);
    expect(resumed.stderr).toMatch(new RegExp(`run ${run.id} continues at step ${pointsBefore.step.length}`));
    // resume takes the bench options sweep took, and says where a simulated run continues.
    expect(resumed.stderr).toMatch(new RegExp(`run ${run.id} was measured on the simulated bench and continues on a fresh simulated bench`));

    const after = SqliteStore.open(dbPath, { readonly: true });
    const finished = await after.getRun(run.id);
    const pointsAfter = await after.loadPoints(run.id);
    await after.close();
    expect(finished.status).toBe('done');
    // Steps 0..n−1 exactly once each: nothing lost, nothing repeated.
    expect(pointsAfter.step).toEqual(pointsAfter.step.map((_, i) => i));
    expect(pointsAfter.step.length).toBeGreaterThanOrEqual(run.plannedCount);
    // The points stored before the kill are the same rows, untouched.
    for (let i = 0; i < pointsBefore.step.length; i++) {
      expect(pointsAfter.stimulus[i]).toBe(pointsBefore.stimulus[i]);
      expect(pointsAfter.gainDb[i]).toBe(pointsBefore.gainDb[i]);
      expect(pointsAfter.measuredAt[i]).toBe(pointsBefore.measuredAt[i]);
    }
    // Every planned frequency was measured exactly once.
    const planned = finished.plan.steps.map((s) => s.stimulus);
    expect(pointsAfter.stimulus.slice(0, planned.length)).toEqual(planned);
  });
});
