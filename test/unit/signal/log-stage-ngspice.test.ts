/**
 * The log-stage fit against the reference simulator: ngspice computes the DC
 * transfer of an inverting diode-feedback stage (ideal op-amp as a 10⁹ VCVS,
 * SPICE diode with IS, N, RS); fitting its output must return the model's
 * own parameters. Values of the diode are invented.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fitLogStage } from '../../../app/signal';
import { requireTool } from '../../helpers/required-tool';

const diode = { isA: 2.5e-9, n: 1.9, rsOhm: 8 };
const resistorOhm = 10e3;
const temperatureC = 25;

function ngspiceTransfer(): { inputV: number[]; outputV: number[] } {
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-ngspice-log-'));
  try {
    const netlist = [
      '* inverting log stage (invented values)',
      // Tight Newton tolerances: the defaults (RELTOL 1e-3, VNTOL 1 µV) leave µV errors comparable to R_S·I.
      `.options temp=${temperatureC} tnom=${temperatureC} reltol=1e-9 vntol=1e-12 abstol=1e-18 gmin=1e-18`,
      'Vin in 0 dc 1',
      `R1 in inv ${resistorOhm}`,
      'D1 inv out dlog',
      `.model dlog D(IS=${diode.isA} N=${diode.n} RS=${diode.rsOhm})`,
      'E1 out 0 0 inv 1e9', // op-amp gain high enough that the summing node's error voltage is negligible at 1 mV in
      '.control',
      'set wr_singlescale',
      'dc Vin 0.001 10 0.001',
      `wrdata ${join(folder, 'out.txt')} v(out)`,
      'quit',
      '.endc',
      '.end',
      '',
    ].join('\n');
    writeFileSync(join(folder, 'log.cir'), netlist);
    execFileSync('ngspice', ['-b', join(folder, 'log.cir')], { stdio: 'pipe', timeout: 30_000 });
    const rows = readFileSync(join(folder, 'out.txt'), 'utf8').trim().split('\n').map((line) => line.trim().split(/\s+/).map(Number));
    // 1 mV … 10 V, 7.5 points per decade, taken from the 1 mV grid of the sweep.
    const inputV: number[] = [];
    const outputV: number[] = [];
    for (let k = 0; k <= 30; k++) {
      const row = rows[Math.round(10 ** (k / 7.5)) - 1];
      inputV.push(row[0]);
      outputV.push(row[1]);
    }
    return { inputV, outputV };
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

describe.skipIf(!requireTool('ngspice'))('fitLogStage against ngspice', () => {
  it('returns the SPICE diode parameters from the simulated transfer curve', () => {
    const { inputV, outputV } = ngspiceTransfer();
    const fit = fitLogStage(inputV, outputV, resistorOhm, temperatureC);
    // Expected: the .model card given to ngspice (reference simulator). ngspice-39 computes k/q from an older
    // CODATA set (≈ 3.4e-7 relative difference, seen as a sub-µV residual), hence tolerances of ~1e-4.
    expect(fit.n).toBeCloseTo(diode.n, 4);
    expect(fit.isA / diode.isA).toBeGreaterThan(0.999);
    expect(fit.isA / diode.isA).toBeLessThan(1.001);
    expect(fit.rsOhm).toBeCloseTo(diode.rsOhm, 2);
    expect(fit.residualStdV).toBeLessThan(1e-6);
    expect(fit.nCi[0]).toBeLessThan(fit.nCi[1]);
  });
});
