/**
 * The design-file schema refuses what the hand-written checks let through
 * without a word: misspelt fields (a "tolerence" made the part exact, a
 * "slewrate" took the op-amp's slew limit away), fields that belong to another
 * part type, names every object inherits, and a description that is not text.
 * Each refusal names the file, the part by its id, the field, and the known
 * fields (common practice, no source: the messages are our own).
 */
import { describe, expect, it } from 'vitest';
import { refusalOf } from '../../helpers/refusal';
import { DesignError, parseDesign } from '../../../app/circuit';

function good(): Record<string, any> {
  return {
    name: 'inverting (invented test circuit)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k', tolerance: '1%' },
      { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
      { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5 } },
    ],
  };
}

const refusal = (json: unknown): DesignError => refusalOf(DesignError, () => parseDesign(json, 'test.json'));

describe('misspelt and misplaced fields are refused, not dropped', () => {
  it('a misspelt tolerance names the part and the resistor fields', () => {
    const json = good();
    delete json.parts[0].tolerance;
    json.parts[0].tolerence = 0.01;
    const error = refusal(json);
    expect(error.where).toBe('test.json: part R1.tolerence');
    expect(error.partId).toBe('R1');
    expect(error.message).toContain('is not a known resistor field');
    expect(error.hint).toContain('tolerance');
  });

  it('a misspelt op-amp model field (slewrate would have meant no slew limit)', () => {
    const json = good();
    json.parts[2].model = { openLoopGain: 1e5, gbw: 1e6, slewrate: 5e5 };
    const error = refusal(json);
    expect(error.where).toBe('test.json: part U1.model.slewrate');
    expect(error.hint).toContain('slewRate');
  });

  it('a model on a resistor, and an unknown top-level field', () => {
    const json = good();
    json.parts[1].model = { is: 1e-14 };
    expect(refusal(json).where).toBe('test.json: part R2.model');
    expect(refusal({ ...good(), inputs: 'in' }).where).toBe('test.json: inputs');
  });

  it.each([['constructor'], ['toString'], ['__proto__']])('an inherited name %s as a part field', (name) => {
    const json = good();
    Object.defineProperty(json.parts[1], name, { value: 1, enumerable: true, configurable: true, writable: true });
    expect(refusal(JSON.parse(JSON.stringify(json))).where).toBe(`test.json: part R2.${name}`);
  });

  it('a description that is not text', () => {
    expect(refusal({ ...good(), description: 42 }).where).toBe('test.json: description');
  });
});

describe('the fields read as before', () => {
  it('a percentage tolerance, SPICE node numbers, trimmed names, the file name for a missing name', () => {
    const json = good();
    delete json.name;
    json.parts[1].nodes = [' inv ', 'out'];
    json.parts.push({ id: 'RL', type: 'resistor', nodes: ['out', 0], value: 2e3 });
    const design = parseDesign(json, 'test.json');
    expect(design.name).toBe('test.json');
    expect(design.parts[0]).toEqual({ id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: 1000, tolerance: 0.01 });
    expect(design.parts[1].nodes).toEqual(['inv', 'out']);
    expect(design.parts[3].nodes).toEqual(['out', '0']);
  });

  it('an ideal op-amp gets finite nominal figures and keeps ideal; a non-ideal one leaves ideal out', () => {
    const ideal = good();
    ideal.parts[2].model = { ideal: true };
    expect(parseDesign(ideal).parts[2]).toMatchObject({ model: { ideal: true, openLoopGain: 1e12, gbw: 1e15 } });
    const real = good();
    real.parts[2].model.ideal = false;
    expect('ideal' in (parseDesign(real).parts[2] as { model: object }).model).toBe(false);
  });
});
