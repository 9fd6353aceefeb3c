/**
 * rolloff noise from the command line: a request the run could not take is
 * refused naming the option, before anything is stored; a finished noise run
 * is shown and exported (CSV header as rolloff theory --noise begins it).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { recordFromJson } from '../../../app/record';
import { tempFolder } from '../sweep/helpers';
import { noisyGain1000 } from './helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');
const rolloff = (...args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 120_000 });

describe('rolloff noise', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());
  const designPath = join(folder.path, 'noisy.json');
  const dbPath = join(folder.path, 'cli-noise.sqlite');
  writeFileSync(designPath, JSON.stringify(noisyGain1000()));

  it('refuses what the run could not take, naming the option, and stores nothing', async () => {
    const common = ['--design', designPath, '--simulated', '--circuit-noise', '--max-stimulus', '1', '--db', dbPath];
    const notPowerOfTwo = rolloff('noise', ...common, '--segment', '1000');
    expect(notPowerOfTwo.status).toBe(2);
    expect(notPowerOfTwo.stderr).toMatch(/--segment: must be a power of two, got 1000/);
    const unresolved = rolloff('noise', ...common, '--band', '10:50k');
    expect(unresolved.status).toBe(2);
    expect(unresolved.stderr).toMatch(/--segment: 4096 samples .* resolve 31\.25 Hz/);
    expect(unresolved.stderr).toMatch(/Use a segment length of at least 65536/);
    const badBand = rolloff('noise', ...common, '--band', '50k:10');
    expect(badBand.status).toBe(2);
    expect(badBand.stderr).toMatch(/--band/);
    // The maximum stimulus is the bench's setting: the refusals above saved 1 Vpp for the simulated bench of dbPath, so a bench without one is another file.
    const noLimitDb = join(folder.path, 'no-limit.sqlite');
    const noLimit = rolloff('noise', '--design', designPath, '--simulated', '--db', noLimitDb);
    expect(noLimit.status).toBe(2);
    expect(noLimit.stderr).toMatch(/--max-stimulus/);
    for (const path of [dbPath, noLimitDb]) {
      if (!existsSync(path)) continue;
      const store = SqliteStore.open(path, { readonly: true });
      expect(await store.listDesigns()).toEqual([]);
      await store.close();
    }
  });

  it('measures, shows and exports a noise run', () => {
    // No --max-stimulus: the simulated bench's limit saved by the first test applies, and is said to.
    const measured = rolloff('noise', '--design', designPath, '--label', 'cli board', '--simulated', '--circuit-noise', '--time-scale', '20',
      '--db', dbPath, '--band', '200:20k', '--records', '6');
    expect(measured.status, measured.stderr).toBe(0);
    expect(measured.stderr).toMatch(/reusing the limit of 1 Vpp set on .* for the simulated bench/);
    expect(measured.stdout).toMatch(/^run 1 {2}noise {2}done {2}\(SIMULATED BENCH\)/);
    expect(measured.stdout).toMatch(/Output noise over the band \(measured\) +\([\d.]+ ± [\d.]+\) mV RMS \(1σ\), from 6 records/);
    // show --json prints the run's JSON record, as for a sweep: it passes the schema and its own digest.
    const shown = rolloff('show', '1', '--db', dbPath, '--json');
    const record = recordFromJson(shown.stdout, 'show --json');
    if (record.recordType !== 'noise-run') throw new Error(`show --json gave a ${record.recordType} record`);
    expect(record.run.kind).toBe('noise');
    expect(record.records.step).toEqual([0, 1, 2, 3, 4, 5]);
    expect(record.density.frequencyHz.length).toBeGreaterThan(0);
    const listed = rolloff('show', '1', '--db', dbPath, '--list-points');
    expect(listed.stdout).toMatch(/record +RMS +mean +segments +flags/);
    const csvPath = join(folder.path, 'noise.csv');
    expect(rolloff('export', '1', '--db', dbPath, '--csv', '--out', csvPath).status).toBe(0);
    const [header, first] = readFileSync(csvPath, 'utf8').split('\r\n');
    expect(header).toBe('frequency_hz,noise_v_per_rthz,noise_uncertainty_v_per_rthz,noise_low95_v_per_rthz,noise_high95_v_per_rthz,computed_noise_v_per_rthz');
    expect(Number(first.split(',')[0])).toBeGreaterThanOrEqual(200);
    const runs = rolloff('runs', '--db', dbPath);
    expect(runs.stdout).toMatch(/^1 +noise +done +6 planned +cli board/m);
  });
});
