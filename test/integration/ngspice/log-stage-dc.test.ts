/**
 * DC transfer of the diode-feedback log stage against ngspice: same Shockley
 * diode (IS, N, RS; ngspice adds GMIN across the junction as we do), same
 * op-amp macro-model at DC (finite A0, offset source, bias current sources),
 * TEMP = TNOM = the design temperature so ngspice does not rescale IS.
 * Tolerance (DEVELOPERS.md "Agreement targets"): 1 mV over 1 mV–10 V input.
 */
import { describe, expect, it } from 'vitest';
import { makeDesignFromTemplate, parseDesign, solveDcTransfer } from '../../../app/circuit';
import { logGrid } from '../../../app/units';
import { ngspiceDc } from './run-ngspice';
import { requireTool } from '../../helpers/required-tool';

const MAX_ERROR_V = 1e-3;

describe.skipIf(!requireTool('ngspice'))('log stage DC transfer agrees with ngspice', () => {
  const inputsV = logGrid(1e-3, 10, 5);

  it.each([
    ['template defaults (RS = 0)', { }],
    ['RS = 2 Ω, n = 1.8, IS = 2 nA', { rs: 2, n: 1.8, is: 2e-9 }],
  ])('%s: within 1 mV from 1 mV to 10 V', (_label, params) => {
    const design = parseDesign(makeDesignFromTemplate('log-stage', params as Record<string, number>), 'log-stage');
    const reference = ngspiceDc(design, inputsV);
    expect(reference.length).toBe(inputsV.length);
    const ours = solveDcTransfer(design, inputsV);
    for (let i = 0; i < inputsV.length; i++) expect(Math.abs(ours.outputV[i] - reference[i])).toBeLessThan(MAX_ERROR_V);
  });

  it('with input offset and bias current (inside the rails), still within 1 mV', () => {
    const file = makeDesignFromTemplate('log-stage', { rs: 0.5 });
    const opamp = file.parts.find((p) => p.type === 'opamp') as { model: Record<string, unknown> };
    opamp.model.inputOffsetV = 0.5e-3;
    opamp.model.inputBiasA = 10e-9;
    const design = parseDesign(file, 'log-stage-offset');
    const reference = ngspiceDc(design, inputsV);
    const ours = solveDcTransfer(design, inputsV);
    for (let i = 0; i < inputsV.length; i++) expect(Math.abs(ours.outputV[i] - reference[i])).toBeLessThan(MAX_ERROR_V);
    // The offset and bias visibly move the low end (DEVELOPERS.md "Theory": deviation at low input).
    const clean = solveDcTransfer(parseDesign(makeDesignFromTemplate('log-stage', { rs: 0.5 })), inputsV);
    expect(Math.abs(ours.outputV[0] - clean.outputV[0])).toBeGreaterThan(5e-3);
  });
});
