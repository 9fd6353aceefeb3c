/**
 * A run belongs to its bench. Two benches (two --bench names) on one store file:
 * after the process of bench lab-a is killed, bench lab-b's `rolloff resume` is
 * refused unless it repeats lab-a's name (--take-over-from lab-a); a wrong name
 * is refused naming the right one, and neither refusal writes anything. The
 * confirmed take-over completes the run, and its events record it.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';
import { killed, startCliSweep, storedRun, tempFolder, writeLowpassDesign } from './helpers';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

describe('resuming another bench\'s run', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('needs the run\'s bench name repeated; a wrong one is refused naming the right one; the confirmed take-over is recorded', async () => {
    const dbPath = join(folder.path, 'runs.sqlite');
    const sweep = startCliSweep({ dbPath, designPath: writeLowpassDesign(folder.path), label: 'bench a', extra: ['--bench', 'lab-a'] });
    await sweep.pointsStored();
    await killed(sweep.child);
    const before = await storedRun(dbPath, 1);
    expect(before.run).toMatchObject({ status: 'running', benchName: 'lab-a' });

    const resume = (...extra: string[]) =>
      spawnSync(process.execPath, [BIN, 'resume', '1', '--db', dbPath, '--bench', 'lab-b', '--simulated', '--time-scale', '50', ...extra], { encoding: 'utf8', timeout: 60_000 });
    const unconfirmed = resume();
    expect(unconfirmed.status).not.toBe(0);
    expect(unconfirmed.stderr).toMatch(/run 1 belongs to bench "lab-a", not to this bench "lab-b"; it is not taken over without confirmation/);
    expect(unconfirmed.stderr).toMatch(/rolloff resume 1 --take-over-from lab-a/);
    const wrongName = resume('--take-over-from', 'lab-c');
    expect(wrongName.status).not.toBe(0);
    expect(wrongName.stderr).toMatch(/run 1 belongs to bench "lab-a", not to "lab-c"/);
    expect(wrongName.stderr).toMatch(/--take-over-from lab-a/);
    expect(await storedRun(dbPath, 1)).toEqual(before); // refused before anything was claimed or written

    const confirmed = resume('--take-over-from', 'lab-a');
    expect(confirmed.status, confirmed.stderr).toBe(0);
    const after = await storedRun(dbPath, 1);
    expect(after.run).toMatchObject({ status: 'done', benchName: 'lab-a' });
    expect(after.points.step).toEqual(after.points.step.map((_, i) => i)); // every step once
    expect(after.points.step.length).toBeGreaterThanOrEqual(after.run.plan.steps.length);
    const messages = after.events.map((e) => e.message);
    const takeOver = messages.indexOf('taken over from bench "lab-a" by bench "lab-b"');
    expect(takeOver, messages.join('\n')).toBeGreaterThan(messages.indexOf('sweep started'));
    expect(messages[takeOver + 1]).toMatch(/^resumed \(/);
  }, 120_000);
});
