/**
 * A run belongs to its bench. Two benches (two --bench names) on one store file:
 * after the process of bench lab-a is killed, bench lab-b's `rolloff resume` is
 * refused unless it repeats lab-a's name (--take-over-from lab-a); a wrong name
 * is refused naming the right one, and neither refusal writes anything. The
 * confirmed take-over completes the run, and its events record it.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { killed, pointsOfLatestRun, storedRun, tempFolder } from './helpers';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

describe('resuming another bench\'s run', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('needs the run\'s bench name repeated; a wrong one is refused naming the right one; the confirmed take-over is recorded', async () => {
    const designPath = join(folder.path, 'lowpass.json');
    const dbPath = join(folder.path, 'runs.sqlite');
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    const sweep = spawn(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', 'bench a', '--simulated', '--time-scale', '0.2',
      '--max-stimulus', '1', '--db', dbPath, '--bench', 'lab-a', '--from', '3', '--to', '10k', '--per-decade', '10'], { stdio: ['ignore', 'ignore', 'pipe'] });
    const deadline = Date.now() + 30_000;
    while ((await pointsOfLatestRun(dbPath)) < 1) {
      if (Date.now() > deadline) throw new Error('the sweep of bench lab-a made no progress');
      await new Promise((r) => setTimeout(r, 50));
    }
    await killed(sweep);
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
