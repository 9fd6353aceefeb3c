/**
 * `rolloff demo --time-scale 20` as a user runs it: completes well within a minute,
 * says the data is invented and simulated, and reports both builds'
 * gain-limit points within 10 % of their theory (loop gain 1, DEVELOPERS.md "Theory").
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';
import { tempFolder } from './helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');

describe('rolloff demo', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('runs the invented scenario, labels it, and finds both gain-limit points', () => {
    const started = Date.now();
    const result = spawnSync(process.execPath, [BIN, 'demo', '--time-scale', '20', '--db', join(folder.path, 'demo.sqlite')], { encoding: 'utf8', timeout: 60_000 });
    expect(result.status, result.stderr).toBe(0);
    expect(Date.now() - started).toBeLessThan(60_000);
    expect(result.stderr).toMatch(/^Safety:/);
    expect(result.stdout).toMatch(/INVENTED SCENARIO, SIMULATED DATA/);
    const limits = [...result.stdout.matchAll(/Gain-limit point\s+([\d.]+ [kM]?Hz)\s+\(theory ([\d.]+ [kM]?Hz)\)/g)];
    expect(limits).toHaveLength(2);
    const hz = (text: string) => Number(text.split(' ')[0]) * ({ Hz: 1, kHz: 1e3, MHz: 1e6 } as Record<string, number>)[text.split(' ')[1]];
    for (const [, measured, theory] of limits) expect(Math.abs(hz(measured) / hz(theory) - 1)).toBeLessThan(0.1);
    expect(result.stdout).toMatch(/How the builds differ/);
  });
});
