/**
 * Crash safety of a noise run, end to end through the CLI: `rolloff noise` is
 * SIGKILLed while it records on the simulated bench (the circuit's own noise),
 * then `rolloff resume` finishes the run on a fresh simulated bench. Every
 * record stored before the kill is still there bit for bit, no step is stored
 * twice or missing, the records after the kill are new measurements (the
 * fresh bench has another noise seed, so none repeats an earlier one), and the
 * finished run's density still agrees with the computed one.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { tempFolder } from '../sweep/helpers';
import { noisyGain1000, recordsOfLatestRun } from './helpers';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');
const RECORDS = 24;

describe('SIGKILL in the middle of a noise run, then resume', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('loses no record, repeats none, and completes the run', async () => {
    const designPath = join(folder.path, 'noisy.json');
    const dbPath = join(folder.path, 'noise.sqlite');
    writeFileSync(designPath, JSON.stringify(noisyGain1000()));

    // 24 records of 0.32 s (16384 samples at 51.2 kHz); at time scale 2 each takes ~0.16 s of wall time.
    const child = spawn(process.execPath, [BIN, 'noise', '--design', designPath, '--label', 'crash test', '--simulated', '--circuit-noise', '--time-scale', '2',
      '--max-stimulus', '1', '--db', dbPath, '--band', '200:20k', '--segment', '4096', '--records', String(RECORDS)], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (chunk) => (stderr += chunk));
    const exited = new Promise<NodeJS.Signals | null>((done) => child.on('exit', (_code, signal) => done(signal)));
    const deadline = Date.now() + 60_000;
    while ((await recordsOfLatestRun(dbPath)) < 4) {
      if (Date.now() > deadline) throw new Error(`noise run made no progress: ${stderr}`);
      await new Promise((r) => setTimeout(r, 50));
    }
    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');

    const before = SqliteStore.open(dbPath, { readonly: true });
    const [run] = await before.listRuns({ limit: 1 });
    const recordsBefore = await before.loadNoiseRecords(run.id);
    expect(run.kind).toBe('noise');
    expect(run.status).toBe('running'); // nobody marked it: the process died
    expect((await before.getRunOwnership(run.id))?.pid).toBe(child.pid);
    await before.close();
    const killedAt = recordsBefore.step.length;
    expect(killedAt).toBeGreaterThanOrEqual(4);
    expect(killedAt).toBeLessThan(RECORDS);
    expect(recordsBefore.step).toEqual(recordsBefore.step.map((_, i) => i));

    const resumed = spawnSync(process.execPath, [BIN, 'resume', String(run.id), '--db', dbPath, '--simulated', '--circuit-noise', '--measurement-noise', '0', '--seed', '2', '--time-scale', '20'], { encoding: 'utf8', timeout: 120_000 });
    expect(resumed.status, resumed.stderr).toBe(0);
    expect(resumed.stderr).toMatch(new RegExp(`run ${run.id} continues at step ${killedAt}`));
    expect(resumed.stdout).toMatch(new RegExp(`run ${run.id}  noise  done`));

    const after = SqliteStore.open(dbPath, { readonly: true });
    const finished = await after.getRun(run.id);
    const recordsAfter = await after.loadNoiseRecords(run.id);
    const events = (await after.listEvents(run.id)).map((e) => e.message);
    await after.close();
    expect(finished.status).toBe('done');
    // Steps 0 … 23 exactly once each: nothing lost, nothing repeated.
    expect(recordsAfter.step).toEqual(Array.from({ length: RECORDS }, (_, i) => i));
    expect(finished.pointCount).toBe(RECORDS);
    // The records stored before the kill are the same rows, untouched, spectra bit for bit.
    for (let i = 0; i < killedAt; i++) {
      expect(recordsAfter.measuredAt[i]).toBe(recordsBefore.measuredAt[i]);
      expect(recordsAfter.rmsV[i]).toBe(recordsBefore.rmsV[i]);
      expect(Array.from(recordsAfter.psdV2PerHz[i]!)).toEqual(Array.from(recordsBefore.psdV2PerHz[i]!));
    }
    // The records after it are measurements of their own, none a replay of an earlier one.
    const earlier = new Set(recordsBefore.rmsV);
    for (let i = killedAt; i < RECORDS; i++) expect(earlier.has(recordsAfter.rmsV[i])).toBe(false);
    // The resumed process held the generator off again before its first record.
    expect(events.filter((m) => m.startsWith('generator held off'))).toHaveLength(2);
    expect(events).toContain(`noise run continued at step ${killedAt}`);
    // And the whole run still agrees with the computed density (see noise-run.test.ts for the sources of these bounds).
    const figures = finished.figures!.noise!;
    expect(figures.recordsUsed).toBe(RECORDS);
    expect(figures.shareWithin95).toBeGreaterThan(0.9);
    expect(figures.shareWithin95).toBeLessThan(0.99);
    expect(Math.abs(figures.meanDeviationDb!)).toBeLessThan(0.1);
  });
});
