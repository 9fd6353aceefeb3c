/**
 * Every kind of bad design is refused with a DesignError that names the part
 * or node at fault (common practice, no source: the messages are our own).
 */
import { describe, expect, it } from 'vitest';
import { DesignError, parseDesign, SingularCircuitError, solveDcTransfer, withActualValues } from '../../../app/circuit';
import { ValidationError } from '../../../app/errors';

const OPAMP_MODEL = { openLoopGain: 1e5, gbw: 1e6 };

function good(): Record<string, any> {
  return {
    name: 'inverting (invented test circuit)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
      { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
      { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: OPAMP_MODEL },
    ],
  };
}

function refusal(json: unknown): DesignError {
  try {
    parseDesign(json, 'test.json');
  } catch (error) {
    expect(error).toBeInstanceOf(DesignError);
    expect(error).toBeInstanceOf(ValidationError);
    return error as DesignError;
  }
  throw new Error('the design was accepted');
}

describe('parseDesign refuses bad designs', () => {
  it('accepts the good design (so the refusals below are about the one change each makes)', () => {
    const design = parseDesign(good(), 'test.json');
    expect(design.parts).toHaveLength(3);
    expect(design.temperatureC).toBe(25);
  });

  it('floating node (a part end that goes nowhere)', () => {
    const json = good();
    json.parts.push({ id: 'C9', type: 'capacitor', nodes: ['out', 'nowhere'], value: '1n' });
    const error = refusal(json);
    expect(error.node).toBe('nowhere');
    expect(error.message).toMatch(/nowhere.*C9|C9.*nowhere/);
  });

  it('floating island (two nodes joined only to each other and an op-amp input)', () => {
    const json = good();
    json.parts = [
      { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '1k' },
      { id: 'R2', type: 'resistor', nodes: ['out', '0'], value: '1k' },
      { id: 'R3', type: 'resistor', nodes: ['x', 'y'], value: '1k' },
      { id: 'R4', type: 'resistor', nodes: ['x', 'y'], value: '1k' },
    ];
    const error = refusal(json);
    expect(['x', 'y']).toContain(error.node);
  });

  it('no ground', () => {
    const json = good();
    json.parts = [
      { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '1k' },
      { id: 'R2', type: 'resistor', nodes: ['out', 'in'], value: '1k' },
    ];
    expect(refusal(json).message).toMatch(/ground/);
  });

  it('unknown part type', () => {
    const json = good();
    json.parts[1].type = 'transistor';
    const error = refusal(json);
    expect(error.partId).toBe('R2');
    expect(error.message).toMatch(/R2.*transistor/);
  });

  it.each([['10 kg'], ['abc'], ['1kk']])('unknown unit / bad value %j', (value) => {
    const json = good();
    json.parts[0].value = value;
    const error = refusal(json);
    expect(error.message).toMatch(/R1\.value/);
  });

  it.each([[0], ['-1k'], [-5]])('zero or negative value %j', (value) => {
    const json = good();
    json.parts[1].value = value;
    const error = refusal(json);
    expect(error.partId).toBe('R2');
    expect(error.message).toMatch(/greater than zero/);
  });

  it('singular circuit (two op-amp outputs driving one node)', () => {
    const json = good();
    json.parts = [
      { id: 'R1', type: 'resistor', nodes: ['in', 'a'], value: '1k' },
      { id: 'R2', type: 'resistor', nodes: ['a', '0'], value: '1k' },
      { id: 'U1', type: 'opamp', nodes: ['a', 'out', 'out'], model: OPAMP_MODEL },
      { id: 'U2', type: 'opamp', nodes: ['a', 'out', 'out'], model: OPAMP_MODEL },
    ];
    const error = refusal(json);
    expect(error).toBeInstanceOf(SingularCircuitError);
    expect(error.message).toMatch(/U1|U2|out/);
  });

  it('op-amp with no feedback path', () => {
    const json = good();
    json.parts = [
      { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
      { id: 'R2', type: 'resistor', nodes: ['inv', '0'], value: '10k' },
      { id: 'RL', type: 'resistor', nodes: ['out', '0'], value: '10k' },
      { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: OPAMP_MODEL },
    ];
    const error = refusal(json);
    expect(error.partId).toBe('U1');
    expect(error.message).toMatch(/feedback/);
  });

  it('duplicate ids', () => {
    const json = good();
    json.parts[1].id = 'R1';
    const error = refusal(json);
    expect(error.partId).toBe('R1');
    expect(error.message).toMatch(/duplicate/);
  });

  it.each([['input'], ['output']])('missing %s node', (field) => {
    const json = good();
    delete json[field];
    expect(refusal(json).message).toMatch(new RegExp(field));
    const misspelt = good();
    misspelt[field] = 'ouput';
    const error = refusal(misspelt);
    expect(error.node).toBe('ouput');
  });

  it('op-amp without a model, and a bad tolerance, are named', () => {
    const json = good();
    delete json.parts[2].model;
    expect(refusal(json).partId).toBe('U1');
    const tolerance = good();
    tolerance.parts[0].tolerance = 5;
    expect(refusal(tolerance).message).toMatch(/R1\.tolerance/);
  });

  it('a node reached only through capacitors cannot be solved at DC, and says so', () => {
    const design = parseDesign({
      name: 'capacitor divider (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'C1', type: 'capacitor', nodes: ['in', 'out'], value: '1n' },
        { id: 'C2', type: 'capacitor', nodes: ['out', '0'], value: '1n' },
      ],
    });
    expect(() => solveDcTransfer(design, Float64Array.from([1]))).toThrow(/node out/);
  });

  it('withActualValues refuses unknown parts and non-positive values, and drops the measured part\'s tolerance', () => {
    const design = parseDesign({ ...good(), parts: good().parts.map((p: Record<string, unknown>) => (p.id === 'R1' ? { ...p, tolerance: 0.01 } : p)) });
    expect(() => withActualValues(design, { R7: 1000 })).toThrow(DesignError);
    expect(() => withActualValues(design, { R1: -3 })).toThrow(/R1/);
    const built = withActualValues(design, { R1: 1012 });
    const r1 = built.parts.find((p) => p.id === 'R1') as { value: number; tolerance?: number };
    expect(r1.value).toBe(1012);
    expect(r1.tolerance).toBeUndefined();
    expect((design.parts[0] as { value: number }).value).toBe(1000);
  });
});
