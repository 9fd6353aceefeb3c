/**
 * A short sweep by the real `rolloff sweep` (simulated bench, inverting
 * low-pass template, 100 Hz – 1 kHz at 2 points per decade) as the bench named
 * `bench` (ROLLOFF_BENCH), into the store at `db`: how the e2e tests fill a
 * store with the runs of several benches.
 */
import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { makeDesignFromTemplate } from '../../../app/circuit';

const ROOT = resolve(__dirname, '../../..');

export interface BenchSweep {
  db: string;
  bench: string;
  buildLabel: string;
  /** Where the design file is written. */
  folder: string;
  env?: Record<string, string>;
}

export function sweepAsBench({ db, bench, buildLabel, folder, env = {} }: BenchSweep): void {
  const designPath = join(folder, 'lowpass.json');
  writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
  const result = spawnSync(process.execPath, ['app/cli/bin.mjs', 'sweep', '--design', designPath, '--label', buildLabel, '--simulated', '--time-scale', '20',
    '--max-stimulus', '1', '--db', db, '--from', '100', '--to', '1k', '--per-decade', '2'], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ...env, ROLLOFF_BENCH: bench } });
  if (result.status !== 0) throw new Error(`rolloff sweep as ${bench} exited ${result.status}: ${result.stderr}`);
}
