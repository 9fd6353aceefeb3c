/**
 * The maximum stimulus is a setting of each bench, through the real CLI on one
 * SQLite file: a limit given for the simulated bench never reaches real
 * instruments (here the simulated bench as a separate `rolloff sim` process
 * reached over TCP, which the sweep cannot tell from real ones), one bench's
 * limit never reaches another bench, a reused limit is announced with its bench
 * and date, and resume applies the limit of the run's own bench or refuses.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { benchKey } from '../../../app/bench/bench-key';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { startSimProcess, type SimProcess } from '../../helpers/sim-process';
import { pointsOfLatestRun, tempFolder } from './helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
/** A few points, no refinement: the sweeps here check which limit applies, not the response. */
const SHORT_SWEEP = ['--from', '100', '--to', '10k', '--per-decade', '2', '--no-refine', '--cycles', '3'];

interface CliResult {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** The CLI in a process of its own; the test's event loop stays free (the `rolloff sim` process answers on its own anyway). */
function rolloff(args: string[], env: Record<string, string> = {}): Promise<CliResult> {
  return new Promise((done) => {
    const child = spawn(process.execPath, [BIN, ...args], { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, ROLLOFF_BENCH: '', ...env } });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk) => (stdout += chunk));
    child.stderr.on('data', (chunk) => (stderr += chunk));
    child.on('exit', (status) => done({ status, stdout, stderr }));
  });
}

async function storedRuns(dbPath: string) {
  const store = SqliteStore.open(dbPath, { readonly: true });
  try {
    const summaries = await store.listRuns();
    return await Promise.all(summaries.map((s) => store.getRun(s.id)));
  } finally {
    await store.close();
  }
}

describe('the maximum stimulus belongs to one bench', () => {
  const folder = tempFolder();
  const designPath = join(folder.path, 'lowpass.json');
  let sim: SimProcess;

  beforeAll(async () => {
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    sim = await startSimProcess(['--design', designPath, '--tcp', '0']);
  }, 60_000);
  afterAll(() => {
    sim?.stop();
    folder.remove();
  });

  it('a simulated sweep at 10 Vpp leaves a sweep on real instruments without a limit: refused, nothing stored; then each keeps its own, and a reused one is announced', async () => {
    const dbPath = join(folder.path, 'simulated-then-real.sqlite');
    const bench = ['--bench', 'bench 1', '--db', dbPath];
    const simulated = await rolloff(['sweep', '--design', designPath, '--label', 'simulated', '--simulated', '--time-scale', '50', '--max-stimulus', '10', ...bench, ...SHORT_SWEEP]);
    expect(simulated.status, simulated.stderr).toBe(0);
    expect(simulated.stderr).not.toMatch(/reusing the limit/); // given now, not reused

    const real = ['--generator', sim.addresses.socket.generator!, '--scope', sim.addresses.socket.scope!];
    const refused = await rolloff(['sweep', '--build', '1', ...real, ...bench, ...SHORT_SWEEP]);
    expect(refused.status).toBe(2);
    expect(refused.stderr).toMatch(/--max-stimulus: is missing and bench "bench 1" has no maximum stimulus saved/);
    expect(refused.stderr).toMatch(/a limit set for the simulated bench never applies to real instruments/);
    expect(await storedRuns(dbPath)).toHaveLength(1);

    const realRun = await rolloff(['sweep', '--build', '1', ...real, '--max-stimulus', '0.5', ...bench, ...SHORT_SWEEP]);
    expect(realRun.status, realRun.stderr).toBe(0);
    const realAgain = await rolloff(['sweep', '--build', '1', ...real, ...bench, ...SHORT_SWEEP]);
    expect(realAgain.status, realAgain.stderr).toBe(0);
    expect(realAgain.stderr).toMatch(/reusing the limit of 0\.5 Vpp set on \d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC for bench "bench 1"\n/);
    const simulatedAgain = await rolloff(['sweep', '--build', '1', '--simulated', '--time-scale', '50', ...bench, ...SHORT_SWEEP]);
    expect(simulatedAgain.status, simulatedAgain.stderr).toBe(0);
    expect(simulatedAgain.stderr).toMatch(/reusing the limit of 10 Vpp set on .* UTC for the simulated bench of "bench 1"/);

    const runs = (await storedRuns(dbPath)).sort((a, b) => a.id - b.id);
    expect(runs.map((r) => [r.simulated, r.request.maxStimulusVpp, r.status])).toEqual([
      [true, 10, 'done'],
      [true, 0.5, 'done'], // `rolloff sim` answers *IDN? as simulated, so the run is labelled so; its limit is the real instruments'
      [true, 0.5, 'done'],
      [true, 10, 'done'],
    ]);
    // Every amplitude the real-instrument runs planned stays under their own limit, far under the simulated one.
    for (const run of runs.slice(1, 3)) expect(Math.max(...run.plan.steps.map((s) => s.amplitudeVpp))).toBeLessThanOrEqual(0.5);
    const store = SqliteStore.open(dbPath, { readonly: true });
    expect((await store.getBenchSettings(benchKey({ name: 'bench 1', simulated: false })))?.maxStimulusVpp).toBe(0.5);
    expect((await store.getBenchSettings(benchKey({ name: 'bench 1', simulated: true })))?.maxStimulusVpp).toBe(10);
    await store.close();
  }, 240_000);

  it('bench A\'s limit is not used by bench B on the same store, whichever came first', async () => {
    const dbPath = join(folder.path, 'two-benches.sqlite');
    const sweep = (benchArgs: string[], more: string[] = []) =>
      rolloff(['sweep', '--design', designPath, '--label', 'b', '--simulated', '--time-scale', '50', '--db', dbPath, ...benchArgs, ...SHORT_SWEEP, ...more]);
    const a = await sweep(['--bench', 'bench A'], ['--max-stimulus', '3']);
    expect(a.status, a.stderr).toBe(0);
    // Bench B by --bench and by ROLLOFF_BENCH: both refused, A's 3 Vpp is not B's.
    const byOption = await sweep(['--bench', 'bench B']);
    expect(byOption.status).toBe(2);
    expect(byOption.stderr).toMatch(/--max-stimulus: is missing and the simulated bench of "bench B" has no maximum stimulus saved/);
    const byEnvironment = await rolloff(['sweep', '--design', designPath, '--simulated', '--db', dbPath, ...SHORT_SWEEP], { ROLLOFF_BENCH: 'bench B' });
    expect(byEnvironment.status).toBe(2);
    expect(byEnvironment.stderr).toMatch(/"bench B" has no maximum stimulus saved/);
    const b = await sweep(['--bench', 'bench B'], ['--max-stimulus', '1']);
    expect(b.status, b.stderr).toBe(0);
    const aAgain = await sweep(['--bench', 'bench A']);
    expect(aAgain.status, aAgain.stderr).toBe(0);
    expect(aAgain.stderr).toMatch(/reusing the limit of 3 Vpp set on .* for the simulated bench of "bench A"/);
    const runs = (await storedRuns(dbPath)).sort((x, y) => x.id - y.id);
    expect(runs.map((r) => [r.benchName, r.request.maxStimulusVpp])).toEqual([['bench A', 3], ['bench B', 1], ['bench A', 3]]);
  }, 180_000);

  it('resume applies the limit of the run\'s bench: refused when that bench has none (another bench\'s does not count), and runs under one given for it', async () => {
    const dbPath = join(folder.path, 'resume.sqlite');
    // A slow sweep (real time from 10 Hz), paused by Ctrl-C once it has measured a point.
    const child = spawn(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', 'r', '--simulated', '--max-stimulus', '2', '--bench', 'bench A', '--db', dbPath,
      '--from', '10', '--to', '10k', '--per-decade', '10', '--no-refine'], { stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, ROLLOFF_BENCH: '' } });
    let childErr = '';
    child.stderr.on('data', (chunk) => (childErr += chunk));
    const exited = new Promise<number | null>((done) => child.on('exit', (code) => done(code)));
    const deadline = Date.now() + 60_000;
    while ((await pointsOfLatestRun(dbPath)) < 1) {
      if (Date.now() > deadline) throw new Error(`the sweep measured nothing: ${childErr}`);
      await new Promise((r) => setTimeout(r, 50));
    }
    child.kill('SIGINT');
    expect(await exited, childErr).toBe(0);
    // Clear bench A's limit as a user could, and give bench B one.
    const store = SqliteStore.open(dbPath);
    const [run] = await store.listRuns();
    expect(run.status).toBe('paused');
    await store.saveBenchSettings(benchKey({ name: 'bench A', simulated: true }), { maxStimulusVpp: null });
    await store.saveBenchSettings(benchKey({ name: 'bench B', simulated: true }), { maxStimulusVpp: 5 });
    await store.close();

    // Bench B continues bench A's run only as a take-over, confirmed with bench A's name (app/contract/bench-take-over.ts).
    const refused = await rolloff(['resume', String(run.id), '--db', dbPath, '--bench', 'bench B', '--take-over-from', 'bench A', '--time-scale', '50']);
    expect(refused.status).toBe(2);
    expect(refused.stderr).toMatch(new RegExp(`maximum stimulus: run ${run.id} was measured on the simulated bench of "bench A", which has no maximum stimulus set`));
    const untouched = SqliteStore.open(dbPath, { readonly: true });
    expect((await untouched.getRun(run.id)).status).toBe('paused');
    expect(await untouched.getRunOwnership(run.id)).toBeUndefined(); // given back for the next try
    await untouched.close();
    const resumed = await rolloff(['resume', String(run.id), '--db', dbPath, '--bench', 'bench B', '--take-over-from', 'bench A', '--time-scale', '50', '--max-amplitude', '3']); // the option's old name, still accepted
    expect(resumed.status, resumed.stderr).toBe(0);

    const after = SqliteStore.open(dbPath, { readonly: true });
    const events = (await after.listEvents(run.id)).map((e) => e.message);
    expect(events).toContain('resumed (maximum stimulus 3 Vpp of the simulated bench of "bench A")');
    expect((await after.getRun(run.id)).status).toBe('done');
    expect((await after.getBenchSettings(benchKey({ name: 'bench A', simulated: true })))?.maxStimulusVpp).toBe(3);
    expect((await after.getBenchSettings(benchKey({ name: 'bench B', simulated: true })))?.maxStimulusVpp).toBe(5);
    await after.close();
  }, 180_000);
});
