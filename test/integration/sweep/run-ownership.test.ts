/**
 * A run belongs to the process that drives it, end to end through the CLI on one
 * store file: while a `rolloff sweep` process measures, a second process can
 * neither resume, pause, stop nor list the run as interrupted; `rolloff runs`
 * names who drives it. After SIGKILL of the owner the other process takes the
 * run over (its owner process is gone on this host) and completes it with every
 * step measured once. An owner frozen (SIGSTOP) past its heartbeat loses the run
 * to another process; woken, it stops and writes no status, point or event line
 * over the new owner's. A resume never starts beside a live run of its bench.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { openServiceAt } from '../../../app/service/open-service';
import { RunOwnedElsewhereError } from '../../../app/service/run-ownership';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { killed, pointsOfLatestRun, startCliSweep, storedRun, tempFolder, writeLowpassDesign } from './helpers';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

describe('two processes on one store file', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('a live run is not taken, paused, stopped or called interrupted by another process; after SIGKILL it is taken over and completed', async () => {
    const designPath = writeLowpassDesign(folder.path);
    const dbPath = join(folder.path, 'runs.sqlite');
    // The checks below run while it measures (startCliSweep: at least 42 s of sweeping).
    const sweep = startCliSweep({ dbPath, designPath, label: 'owned' });
    const { child, exited } = sweep;
    await sweep.pointsStored();
    const peek = SqliteStore.open(dbPath, { readonly: true });
    const [run] = await peek.listRuns({ limit: 1 });
    const owner = await peek.getRunOwnership(run.id);
    await peek.close();
    expect(owner).toMatchObject({ pid: child.pid, label: 'rolloff (command line)' });

    // Another CLI process: resume refused naming the owner; runs shows who drives it and does not offer it for resume.
    const resumeRefused = spawnSync(process.execPath, [BIN, 'resume', String(run.id), '--db', dbPath, '--simulated'], { encoding: 'utf8', timeout: 30_000 });
    expect(resumeRefused.status).not.toBe(0);
    expect(resumeRefused.stderr).toMatch(new RegExp(`run ${run.id} is being driven by rolloff \\(command line\\) pid ${child.pid} on ${hostname()} \\(since \\d{4}-\\d\\d-\\d\\d \\d\\d:\\d\\d:\\d\\d UTC, heartbeat \\d+ s ago\\)`));
    expect(resumeRefused.stderr).toMatch(/Pause or stop it where it runs/);
    const listed = spawnSync(process.execPath, [BIN, 'runs', '--db', dbPath], { encoding: 'utf8', timeout: 30_000 });
    expect(listed.status, listed.stderr).toBe(0);
    expect(listed.stdout, sweep.stderr()).toMatch(new RegExp(`\\nrun ${run.id}: running, driven by rolloff \\(command line\\) pid ${child.pid} on ${hostname()}, heartbeat \\d+ s ago\\n`));
    expect(listed.stdout).toMatch(new RegExp(`\\n${run.id} +AC +running `)); // the table's status column
    expect(listed.stderr).not.toMatch(/left running or paused/);
    const listedJson = spawnSync(process.execPath, [BIN, 'runs', '--json', '--db', dbPath], { encoding: 'utf8', timeout: 30_000 });
    expect(JSON.parse(listedJson.stdout)[0].owner, sweep.stderr()).toMatchObject({ label: 'rolloff (command line)', pid: child.pid, host: hostname(), live: true });

    // A service in this process (as the window's would be): pause, stop and resume refused, nothing changed.
    const other = await openServiceAt(dbPath, { maxStimulusVpp: 1 });
    try {
      expect(await other.interruptedRuns()).toEqual([]);
      await expect(other.pauseRun(run.id)).rejects.toThrow(RunOwnedElsewhereError);
      await expect(other.stopRun(run.id)).rejects.toThrow(RunOwnedElsewhereError);
      await expect(other.resumeRun(run.id)).rejects.toThrow(/is being driven by/);
      expect((await other.getRunSummary(run.id)).status).toBe('running');
    } finally {
      await other.close();
    }

    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');
    const pointsBefore = await pointsOfLatestRun(dbPath);
    // Its process is gone on this host: listed as interrupted at once, naming who drove it last.
    const listedAfterKill = spawnSync(process.execPath, [BIN, 'runs', '--db', dbPath], { encoding: 'utf8', timeout: 30_000 });
    expect(listedAfterKill.stdout).toMatch(new RegExp(`\\n${run.id} +AC +interrupted `));
    expect(listedAfterKill.stdout).toMatch(new RegExp(`\\nrun ${run.id}: interrupted, last driven by rolloff \\(command line\\) pid ${child.pid} on ${hostname()}, heartbeat \\d+ s ago\\n`));
    expect(listedAfterKill.stderr).toMatch(new RegExp(`left running or paused: ${run.id}\\.`));

    const resumed = spawnSync(process.execPath, [BIN, 'resume', String(run.id), '--db', dbPath, '--simulated', '--time-scale', '50'], { encoding: 'utf8', timeout: 60_000 });
    expect(resumed.status, resumed.stderr).toBe(0);
    expect(resumed.stderr).toMatch(new RegExp(`run ${run.id} continues at step ${pointsBefore}`));

    const after = SqliteStore.open(dbPath, { readonly: true });
    const finished = await after.getRun(run.id);
    const points = await after.loadPoints(run.id);
    const ownerAfter = await after.getRunOwnership(run.id);
    await after.close();
    expect(finished.status).toBe('done');
    expect(points.step).toEqual(points.step.map((_, i) => i)); // every step once
    expect(points.stimulus.slice(0, finished.plan.steps.length)).toEqual(finished.plan.steps.map((s) => s.stimulus));
    expect(ownerAfter).toBeUndefined(); // released at the end
  }, 90_000);
  it('an owner frozen past its heartbeat loses the run: when it wakes it stops driving and writes no status, while the process that took the run over completes it', async () => {
    const designPath = join(folder.path, 'frozen.json');
    const dbPath = join(folder.path, 'frozen.sqlite');
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    const start = (args: string[]) => {
      const child = spawn(process.execPath, [BIN, ...args, '--db', dbPath], { stdio: ['ignore', 'ignore', 'pipe'] });
      const result = { stderr: '', exited: new Promise<number | null>((done) => child.on('exit', (code) => done(code))) };
      child.stderr.on('data', (chunk) => (result.stderr += chunk));
      return { child, result };
    };
    const waitForPoints = async (count: number, what: string) => {
      const deadline = Date.now() + 60_000;
      while ((await pointsOfLatestRun(dbPath)) < count) {
        if (Date.now() > deadline) throw new Error(`no point ${count} from ${what}`);
        await new Promise((r) => setTimeout(r, 50));
      }
    };
    const first = start(['sweep', '--design', designPath, '--label', 'frozen', '--simulated', '--time-scale', '0.5', '--max-stimulus', '1', '--from', '3', '--to', '10k', '--per-decade', '10', '--no-refine']);
    await waitForPoints(2, 'the first sweep');
    first.child.kill('SIGSTOP'); // frozen (a hung machine, a laptop lid): alive, but no heartbeat
    await new Promise((r) => setTimeout(r, 11_000)); // more than the 10 s after which a heartbeat is stale (run-ownership.ts)
    const frozenAt = await pointsOfLatestRun(dbPath);

    const second = start(['resume', '1', '--simulated', '--time-scale', '1']);
    await waitForPoints(frozenAt + 1, 'the process that took the run over');
    first.child.kill('SIGCONT');
    // The first owner learns it lost the run (its heartbeat renewal, or a point it tries to store, is refused) and stops.
    expect(await first.result.exited, first.result.stderr).toBe(2);
    expect(first.result.stderr).toMatch(new RegExp(`run 1 was taken over by rolloff \\(command line\\) pid ${second.child.pid} on ${hostname()}; this process stopped driving it`));
    const meanwhile = SqliteStore.open(dbPath, { readonly: true });
    const during = await meanwhile.getRun(1);
    await meanwhile.close();
    expect(during.status).toBe('running'); // not the 'paused' a woken owner used to write over the new owner's state
    expect(during.owner?.pid).toBe(second.child.pid);

    expect(await second.result.exited, second.result.stderr).toBe(0);
    const after = SqliteStore.open(dbPath, { readonly: true });
    const finished = await after.getRun(1);
    const points = await after.loadPoints(1);
    const events = (await after.listEvents(1)).map((e) => e.message);
    await after.close();
    expect(finished.status).toBe('done');
    expect(points.step).toEqual(finished.plan.steps.map((_, i) => i)); // every step once, none lost to the old owner
    const resumedAt = events.findIndex((m) => m.startsWith('resumed ('));
    expect(resumedAt).toBeGreaterThan(0);
    // Nothing of the old owner's ending after the take-over: no pause, no failure, no finish of its own.
    expect(events.slice(resumedAt).filter((m) => /^paused before step|^sweep failed|^stopped by the user/.test(m))).toEqual([]);
    expect(events.filter((m) => m === 'sweep finished')).toHaveLength(1);
    // Event lines are owner-checked too: the woken owner added none (its own line was the start, before it froze),
    // so the log is its start and then the new owner's lines alone (re-measure notes of a step aside).
    expect(events.filter((m) => !/^step \d+: /.test(m))).toEqual(['sweep started', expect.stringMatching(/^resumed \(/), expect.stringMatching(/^sweep continued at step \d+$/), 'sweep finished']);
    const continuedAt = Number(/^sweep continued at step (\d+)$/.exec(events.find((m) => m.startsWith('sweep continued')) ?? '')?.[1]);
    expect(continuedAt).toBeGreaterThanOrEqual(frozenAt); // after every point stored before the take-over
  }, 180_000);

  it('a resume never starts beside a live run of the same bench: refused naming the run that holds the bench, nothing written', async () => {
    const designPath = writeLowpassDesign(folder.path);
    const dbPath = join(folder.path, 'bench-held.sqlite');
    const sweepOnBench = () => startCliSweep({ dbPath, designPath, label: 'held', extra: ['--bench', 'lab-x'] }).child;
    const waitForPointsOf = async (runId: number) => {
      const deadline = Date.now() + 30_000;
      while ((await pointsOfLatestRun(dbPath)) < 1 || (await latestRunId(dbPath)) !== runId) {
        if (Date.now() > deadline) throw new Error(`run ${runId} made no progress`);
        await new Promise((r) => setTimeout(r, 50));
      }
    };
    // Run 1 of bench lab-x is interrupted (its process killed); run 2 of lab-x then sweeps, driven by a live process.
    const first = sweepOnBench();
    await waitForPointsOf(1);
    await killed(first);
    const second = sweepOnBench();
    try {
      await waitForPointsOf(2);
      const before = await storedRun(dbPath, 1);
      expect(before.run.status).toBe('running');

      const refused = spawnSync(process.execPath, [BIN, 'resume', '1', '--db', dbPath, '--bench', 'lab-x', '--simulated'], { encoding: 'utf8', timeout: 30_000 });
      expect(refused.status).not.toBe(0);
      expect(refused.stderr).toMatch(new RegExp(`bench "lab-x" is in use: run 2 is being driven by rolloff \\(command line\\) pid ${second.pid} on ${hostname()}`));
      expect(await storedRun(dbPath, 1)).toEqual(before); // no status, point, event or owner of run 1 changed
    } finally {
      await killed(second);
    }
  }, 90_000);
});

async function latestRunId(dbPath: string): Promise<number | undefined> {
  const store = SqliteStore.open(dbPath, { readonly: true });
  try {
    return (await store.listRuns({ limit: 1 }))[0]?.id;
  } finally {
    await store.close();
  }
}
