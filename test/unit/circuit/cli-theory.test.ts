/**
 * `rolloff theory` and `rolloff template` through the real CLI entry
 * (node app/cli/bin.mjs), in a temp dir. Expected numbers come from the
 * engine itself (checked against ngspice and handbook formulas elsewhere);
 * here the point is the plumbing: formats, exit codes, messages.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { parseDesign, solveAc } from '../../../app/circuit';
import { formatEngineering, logGrid } from '../../../app/units';
import { SWEEP_RANGE_DEFAULTS } from '../../../app/sweep/plan/defaults';

const BIN = resolve(__dirname, '../../../app/cli/bin.mjs');
const dir = mkdtempSync(join(tmpdir(), 'rolloff-cli-theory-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function rolloff(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await promisify(execFile)('node', [BIN, ...args], { cwd: dir, timeout: 30_000 });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const e = error as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

describe('rolloff template + theory', () => {
  it('writes a design from a template and prints its AC response as CSV matching the engine', async () => {
    const path = join(dir, 'lowpass.json');
    const written = await rolloff('template', 'inverting-lowpass', '--param', 'rf=22k', '--param', 'cf=4.7n', '--out', path);
    expect(written.code).toBe(0);
    const result = await rolloff('theory', path, '--csv', '--from', '100', '--to', '100k', '--per-decade', '10');
    expect(result.code).toBe(0);
    const lines = result.stdout.trim().split('\n');
    expect(lines[0]).toBe('frequency_hz,gain_db,phase_deg,ideal_gain_db,ideal_phase_deg');
    expect(lines).toHaveLength(1 + 31);
    const expected = solveAc(parseDesign(JSON.parse(readFileSync(path, 'utf8'))), logGrid(100, 100e3, 10));
    const row = lines[11].split(',').map(Number);
    expect(row[0]).toBeCloseTo(expected.frequencyHz[10], 9);
    expect(row[1]).toBeCloseTo(expected.gainDb[10], 12);
    expect(row[2]).toBeCloseTo(expected.phaseDeg[10], 12);
  });

  it('summary names the gain-limit point, −3 dB frequencies and pass-band gain; the band adds columns', async () => {
    const path = join(dir, 'summary.json');
    await rolloff('template', 'non-inverting', '--out', path);
    const summary = await rolloff('theory', path, '--summary', '--to', '1meg');
    expect(summary.code).toBe(0);
    // 1 + RF/RG = 10 → 20 dB, less 0.0009 dB for A0 = 1e5 (finite-gain error, DEVELOPERS.md "Theory").
    expect(summary.stdout).toMatch(/Pass-band gain: +19\.999 dB/);
    expect(summary.stdout).toMatch(/Gain-limit point: +100 kHz/);
    expect(summary.stdout).toMatch(/−3 dB frequencies: +100 kHz/);
    const band = await rolloff('theory', path, '--csv', '--tolerance', '--samples', '50', '--seed', '3', '--per-decade', '1');
    expect(band.stdout.split('\n')[0]).toMatch(/band_low_db,band_high_db/);
  });

  it('without a range the AC response covers the sweep defaults of rolloff sweep and the Sweep view (one source)', async () => {
    const path = join(dir, 'defaults.json');
    await rolloff('template', 'inverting-lowpass', '--out', path);
    const result = await rolloff('theory', path, '--csv');
    expect(result.code).toBe(0);
    const frequencies = result.stdout.trim().split('\n').slice(1).map((line) => Number(line.split(',')[0]));
    const { from, to, pointsPerDecade } = SWEEP_RANGE_DEFAULTS.ac;
    expect(frequencies[0]).toBe(from);
    expect(frequencies.at(-1)).toBeCloseTo(to, 6);
    expect(frequencies).toHaveLength(logGrid(from, to, pointsPerDecade).length);
    const help = await rolloff('theory', '--help');
    expect(help.stdout).toContain(`default ${formatEngineering(from, 'Hz')}`);
    expect(help.stdout).toContain(`(default ${pointsPerDecade})`);
  });

  it('DC transfer of the log stage as CSV', async () => {
    const path = join(dir, 'log.json');
    await rolloff('template', 'log-stage', '--out', path);
    const result = await rolloff('theory', path, '--dc', '--from', '1m', '--to', '10', '--per-decade', '1', '--csv');
    expect(result.code).toBe(0);
    const lines = result.stdout.trim().split('\n');
    // The columns a DC run's records use for input and output (app/contract/vocabulary.ts).
    expect(lines[0]).toBe('input_v_dc,output_v_dc,clipped');
    expect(lines).toHaveLength(1 + 5);
    // 1 mV → 10 V is four decades, ≈ 4·VT·ln 10 ≈ 0.237 V of output change (Shockley law, VT at 25 °C).
    const first = Number(lines[1].split(',')[1]);
    const last = Number(lines[5].split(',')[1]);
    expect(first - last).toBeCloseTo(4 * 0.0256926 * Math.LN10, 2);
  });

  it('a bad design exits non-zero with the node named and no stack trace', async () => {
    const path = join(dir, 'floating.json');
    writeFileSync(path, JSON.stringify({
      name: 'floating (invented)', input: 'in', output: 'out',
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '1k' },
        { id: 'R2', type: 'resistor', nodes: ['out', '0'], value: '1k' },
        { id: 'C1', type: 'capacitor', nodes: ['out', 'typo'], value: '1n' },
      ],
    }));
    const result = await rolloff('theory', path);
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/typo/);
    expect(result.stderr).not.toMatch(/\n\s+at /);
    const missing = await rolloff('theory', join(dir, 'absent.json'));
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/no such file/);
    const badJson = join(dir, 'bad.json');
    writeFileSync(badJson, '{ "name": ');
    const syntax = await rolloff('theory', badJson);
    expect(syntax.code).toBe(2);
    expect(syntax.stderr).toMatch(/not valid JSON/);
  });

  it('template --out never overwrites without --force', async () => {
    const path = join(dir, 'keep.json');
    writeFileSync(path, 'my notes');
    const result = await rolloff('template', 'integrator', '--out', path);
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/already exists/);
    expect(readFileSync(path, 'utf8')).toBe('my notes');
  });
});
