/**
 * A finished run is nobody's: after a sweep ends, `rolloff runs` lists it with
 * no driver and the store holds no owner for it; a finished run stored earlier
 * with its owner still recorded is listed with no driver either.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { tempFolder } from './helpers';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

describe('finished runs in rolloff runs', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('are listed without a driver, also when stored earlier with their owner still recorded', async () => {
    const designPath = join(folder.path, 'lowpass.json');
    const dbPath = join(folder.path, 'runs.sqlite');
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    const sweep = spawnSync(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', 'finished', '--simulated', '--time-scale', '50',
      '--max-stimulus', '1', '--db', dbPath, '--per-decade', '3', '--no-refine'], { encoding: 'utf8', timeout: 60_000 });
    expect(sweep.status, sweep.stderr).toBe(0);

    // A run finished while its owner was recorded (as stored before finished runs were released), and one still running, owned.
    const store = SqliteStore.open(dbPath);
    const [swept] = await store.listRuns();
    expect(swept.status).toBe('done');
    expect(await store.getRunOwnership(swept.id)).toBeUndefined(); // released when it ended
    const sweptRun = await store.getRun(swept.id);
    const { owner: _owner, ...asNew } = sweptRun;
    const earlier = await store.createRun({ ...asNew, benchName: 'lab-old', scheduleId: null });
    const running = await store.createRun({ ...asNew, benchName: 'lab-old', scheduleId: null });
    const owner = { ownerId: `old:${process.pid}:x`, pid: process.pid, host: 'this host', label: 'an older rolloff' };
    for (const run of [earlier, running]) await store.claimRun(run.id, owner, 10_000);
    await store.updateRunStatus(earlier.id, 'done');
    await store.updateRunStatus(running.id, 'running');
    await store.close();

    const listed = spawnSync(process.execPath, [BIN, 'runs', '--db', dbPath], { encoding: 'utf8', timeout: 30_000 });
    expect(listed.status, listed.stderr).toBe(0);
    expect(listed.stdout).not.toMatch(new RegExp(`\\nrun (${swept.id}|${earlier.id}):`)); // no "done, driven by …"
    expect(listed.stdout).toMatch(new RegExp(`\\nrun ${running.id}: running, driven by an older rolloff pid ${process.pid} on this host, heartbeat \\d+ s ago\\n`)); // the same wording does show a live driver
    const json = spawnSync(process.execPath, [BIN, 'runs', '--json', '--db', dbPath], { encoding: 'utf8', timeout: 30_000 });
    const owners = Object.fromEntries((JSON.parse(json.stdout) as Array<{ id: number; owner: unknown }>).map((r) => [r.id, r.owner]));
    expect(owners[swept.id]).toBeNull();
    expect(owners[earlier.id]).toBeNull();
    expect(owners[running.id]).toMatchObject({ label: 'an older rolloff', pid: process.pid });
  }, 90_000);
});
