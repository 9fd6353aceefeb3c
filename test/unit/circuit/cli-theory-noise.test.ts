/**
 * `rolloff theory --noise` and the stability figures through the real CLI
 * entry (node app/cli/bin.mjs). Expected numbers come from the engine itself
 * (checked against ngspice .noise and closed forms in
 * test/integration/ngspice/noise-agreement.test.ts and noise-stability.test.ts);
 * here the point is the plumbing: columns, units, warnings, exit codes, messages.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { analyzeStability, bandNoise, makeDesignFromTemplate, parseDesign, solveNoise } from '../../../app/circuit';
import { logGrid } from '../../../app/units';
import { SWEEP_RANGE_DEFAULTS } from '../../../app/sweep/plan/defaults';

const BIN = resolve(__dirname, '../../../app/cli/bin.mjs');
const dir = mkdtempSync(join(tmpdir(), 'rolloff-cli-noise-'));
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

/** The non-inverting template with invented op-amp noise figures. */
function noisyDesignFile(): { path: string; file: ReturnType<typeof makeDesignFromTemplate> } {
  const file = makeDesignFromTemplate('non-inverting') as ReturnType<typeof makeDesignFromTemplate> & { parts: Array<{ type: string; model?: object }> };
  for (const part of file.parts) {
    if (part.type === 'opamp') part.model = { ...part.model, voltageNoiseVPerRtHz: '8n', voltageNoiseCornerHz: 100, currentNoiseAPerRtHz: '1p' };
  }
  const path = join(dir, 'noisy.json');
  writeFileSync(path, JSON.stringify(file));
  return { path, file };
}

describe('rolloff theory --noise', () => {
  it('CSV: frequency_hz, noise_v_per_rthz, one column per source, input-referred last; values are the engine\'s', async () => {
    const { path, file } = noisyDesignFile();
    const result = await rolloff('theory', path, '--noise', '--csv', '--from', '10', '--to', '100k', '--per-decade', '5');
    expect(result.code).toBe(0);
    const lines = result.stdout.trim().split('\n');
    expect(lines[0]).toBe('frequency_hz,noise_v_per_rthz,RG_v_per_rthz,RF_v_per_rthz,U1_en_v_per_rthz,U1_in_minus_v_per_rthz,input_referred_v_per_rthz');
    expect(lines).toHaveLength(1 + 21);
    const expected = solveNoise(parseDesign(file), logGrid(10, 100e3, 5));
    const row = lines[6].split(',').map(Number);
    expect(row[0]).toBeCloseTo(expected.frequencyHz[5], 9);
    expect(row[1]).toBe(expected.outputVPerRtHz[5]);
    expect(row[4]).toBe(expected.contributionsVPerRtHz[2][5]);
    expect(row[6]).toBe(expected.inputReferredVPerRtHz[5]);
  });

  it('--summary: band RMS, largest sources, phase margin, gain margin and peaking', async () => {
    const { path, file } = noisyDesignFile();
    const result = await rolloff('theory', path, '--noise', '--band', '10:100k', '--summary');
    expect(result.code).toBe(0);
    const band = bandNoise(parseDesign(file), 10, 100e3);
    const [stability] = analyzeStability(parseDesign(file));
    expect(result.stdout).toContain(`Output noise, 10 Hz – 100 kHz: ${(band.outputRmsV * 1e6).toPrecision(4)} µV RMS`);
    expect(result.stdout).toMatch(/Largest sources \(share of the noise power\): U1_en \d+\.\d %/);
    expect(result.stdout).toContain(`Stability of U1: phase margin ${stability.phaseMarginDeg!.toFixed(1)}°`);
    expect(result.stdout).toMatch(/gain margin infinite/);
    expect(result.stdout).not.toMatch(/Warning/);
  });

  it('--json: columns per source, the band and the stability figures (infinite margin as null)', async () => {
    const { path } = noisyDesignFile();
    const result = await rolloff('theory', path, '--noise', '--json', '--per-decade', '2');
    expect(result.code).toBe(0);
    const json = JSON.parse(result.stdout);
    expect(json.sources.map((s: { name: string }) => s.name)).toEqual(['RG', 'RF', 'U1_en', 'U1_in_minus']);
    expect(json.sources[2].vPerRtHz).toHaveLength(json.frequencyHz.length);
    // Without --band the band is the sweep, and the sweep is the one default of sweep and the Sweep view.
    expect(json.band.fromHz).toBe(SWEEP_RANGE_DEFAULTS.ac.from);
    expect(json.band.toHz).toBe(SWEEP_RANGE_DEFAULTS.ac.to);
    expect(json.stability[0].gainMarginDb).toBeNull();
    expect(json.warnings).toEqual([]);
  });

  it('a phase margin below the limit is a warning: in the summary, in JSON, and on stderr beside CSV', async () => {
    const path = join(dir, 'differentiator.json');
    writeFileSync(path, JSON.stringify(makeDesignFromTemplate('differentiator')));
    const summary = await rolloff('theory', path, '--summary');
    expect(summary.code).toBe(0);
    expect(summary.stdout).toMatch(/Warning: U1: phase margin \d+\.\d° is below 45°/);
    const csv = await rolloff('theory', path, '--csv', '--per-decade', '1');
    expect(csv.stdout).not.toMatch(/Warning/);
    expect(csv.stderr).toMatch(/Warning: U1: phase margin/);
    const relaxed = await rolloff('theory', path, '--json', '--per-decade', '1', '--min-phase-margin', '30');
    expect(JSON.parse(relaxed.stdout).warnings).toEqual([]);
    const strict = await rolloff('theory', join(dir, 'noisy.json'), '--json', '--per-decade', '1', '--min-phase-margin', '95');
    expect(JSON.parse(strict.stdout).warnings[0].kind).toBe('low-phase-margin');
  });

  it('bad input: a malformed band, --band without --noise, --noise with --dc, a log stage', async () => {
    const { path } = noisyDesignFile();
    const malformed = await rolloff('theory', path, '--noise', '--band', '100k');
    expect(malformed.code).toBe(2);
    expect(malformed.stderr).toMatch(/--band: "100k" is not FROM:TO/);
    const backwards = await rolloff('theory', path, '--noise', '--band', '1k:10');
    expect(backwards.stderr).toMatch(/not a band/);
    const orphan = await rolloff('theory', path, '--band', '10:1k');
    expect(orphan.stderr).toMatch(/only applies with --noise/);
    const dc = await rolloff('theory', path, '--noise', '--dc');
    expect(dc.stderr).toMatch(/noise is computed for AC only/);
    const logPath = join(dir, 'log.json');
    writeFileSync(logPath, JSON.stringify(makeDesignFromTemplate('log-stage')));
    const log = await rolloff('theory', logPath, '--noise');
    expect(log.code).toBe(2);
    expect(log.stderr).toMatch(/operating point/);
    expect(log.stderr).not.toMatch(/\n\s+at /);
  });
});
