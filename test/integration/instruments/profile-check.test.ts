/**
 * The profile checker against the simulated bench over TCP on 127.0.0.1, with
 * instruments told not to know some headers (they queue −113 "Undefined
 * header", SCPI-1999 Vol. 2 error list, recalled from memory): the checker
 * names exactly those operations, with that code, and accepts every other;
 * a generator's output is never on above the user's maximum and is off at the
 * end. The CLI (`rolloff profile list | show | new | check`) over the same.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { builtInProfiles, checkProfile, type Profile } from '../../../app/bench';
import type { GeneratorSettings } from '../../../app/sim/sim-generator';
import { TEST_DESIGN_JSON } from './bench-scenario';

const run = promisify(execFile);
const BIN = join(__dirname, '../../../app/cli/bin.mjs');
const shipped = (id: string): Profile => builtInProfiles().find((p) => p.id === id)!;
const notAccepted = (report: Awaited<ReturnType<typeof checkProfile>>) => report.checks.filter((c) => c.outcome !== 'accepted').map((c) => c.operation);

describe('profile checker against the simulated bench', () => {
  let bench: SimulatedBench;
  let folder: string;
  beforeAll(async () => {
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, timeScale: 10 });
    folder = mkdtempSync(join(tmpdir(), 'rolloff-profile-check-'));
  });
  afterAll(async () => {
    await bench?.stop();
    rmSync(folder, { recursive: true, force: true });
  });
  afterEach(async () => {
    await bench.setFault('all', null);
  });

  it('accepts every operation of each shipped profile on the instrument that speaks it', async () => {
    for (const role of ['generator', 'meter', 'scope'] as const) {
      const report = await checkProfile(bench.addresses[role], shipped(`scpi-${role}`), { maxStimulusVpp: 1 });
      expect(notAccepted(report), role).toEqual([]);
      expect(report.checks.every((c) => c.replyMs >= 0)).toBe(true);
    }
  });

  it('names exactly the scope operations whose headers the instrument does not know, with -113', async () => {
    await bench.setFault('scope', { kind: 'unknown-headers', headers: ['INPut#[:STATe]', 'TRACe:SCALing?'] });
    const report = await checkProfile(bench.addresses.scope, shipped('scpi-scope'), { timeoutS: 0.5 });
    // waveformBoth holds TRACe:SCALing? too, so the instrument cannot answer it in the form the profile expects.
    expect(notAccepted(report)).toEqual(['channelOn (channel 1)', 'channelOn (channel 2)', 'waveformScaling (channel 1)', 'waveformScaling (channel 2)', 'waveformBoth']);
    for (const check of report.checks.filter((c) => c.operation.startsWith('channelOn') || c.operation.startsWith('waveformScaling'))) {
      expect(check).toMatchObject({ outcome: 'refused', errorCode: -113 });
      expect(check.errorMessage).toMatch(/^Undefined header/);
    }
  });

  it('names exactly the meter operations refused', async () => {
    await bench.setFault('meter', { kind: 'unknown-headers', headers: ['[SENSe]:VOLTage:AC:APERture'] });
    const report = await checkProfile(bench.addresses.meter, shipped('scpi-meter'), { timeoutS: 0.5 });
    expect(notAccepted(report)).toEqual(['integration']);
    expect(report.checks.find((c) => c.operation === 'integration')).toMatchObject({ outcome: 'refused', errorCode: -113 });
  });

  it('a generator check never has the output on above the maximum, names the refused operation, and leaves the output off', async () => {
    const held: GeneratorSettings[] = [];
    const stop = bench.generator.onChange((state) => held.push({ ...state }));
    try {
      await bench.setFault('generator', { kind: 'unknown-headers', headers: ['[SOURce]:FREQuency[:CW]?'] });
      const report = await checkProfile(bench.addresses.generator, shipped('scpi-generator'), { maxStimulusVpp: 0.5, timeoutS: 0.5 });
      expect(notAccepted(report)).toEqual(['readFrequency']);
      expect(report.checks.find((c) => c.operation === 'readFrequency')).toMatchObject({ outcome: 'refused', errorCode: -113 });
      // What the simulated generator held, never anything above 0.5 Vpp open circuit while on; off at the end.
      for (const state of held.filter((s) => s.on)) expect(state.amplitudeVpp + 2 * Math.abs(state.offsetV)).toBeLessThanOrEqual(0.5);
      expect(held.some((s) => s.on)).toBe(true); // outputOn was checked…
      expect(bench.generator.held.on).toBe(false); // …and switched off again
    } finally {
      stop();
    }
  });

  it('leaves the output off when the instrument stops answering mid-check', async () => {
    await bench.setFault('generator', { kind: 'unknown-headers', headers: ['OUTPut[:STATe]'] });
    const report = await checkProfile(bench.addresses.generator, shipped('scpi-generator'), { maxStimulusVpp: 0.5 });
    expect(report.checks.find((c) => c.operation === 'outputOff')).toMatchObject({ outcome: 'refused', errorCode: -113 });
    expect(bench.generator.held.on).toBe(false);
  });

  it('refuses to check a generator without a maximum stimulus', async () => {
    await expect(checkProfile(bench.addresses.generator, shipped('scpi-generator'))).rejects.toThrow(/maxStimulusVpp/);
  });

  it('CLI: profile new writes a user profile to --profile-dir, list shows it, check names the refused operations and exits 3', async () => {
    const made = await run(process.execPath, [BIN, 'profile', 'new', 'lab-scope', '--based-on', 'scpi-scope', '--profile-dir', folder]);
    expect(made.stdout).toContain(join(folder, 'lab-scope.json'));
    expect(JSON.parse(readFileSync(join(folder, 'lab-scope.json'), 'utf8')).operations.waveformData).toBe('TRACe:DATA? CH{channel}');
    const listed = await run(process.execPath, [BIN, 'profile', 'list', '--profile-dir', folder]);
    expect(listed.stdout).toMatch(/lab-scope\s+scope\s+yours/);
    const shown = await run(process.execPath, [BIN, 'profile', 'show', 'scpi-meter']);
    expect(JSON.parse(shown.stdout).id).toBe('scpi-meter');
    await bench.setFault('scope', { kind: 'unknown-headers', headers: ['SENSe:SWEep:TIME'] });
    const checked = await run(process.execPath, [BIN, 'profile', 'check', bench.addresses.scope, '--profile', 'lab-scope', '--profile-dir', folder, '--timeout', '1']).catch((e) => e);
    expect(checked.code).toBe(3);
    expect(checked.stdout).toMatch(/timebase\s+[\d.]+ ms\s+refused -113,"Undefined header/);
    expect(checked.stdout).toMatch(/1 of \d+ not accepted/);
  });
});
