/**
 * The design-file format (app/circuit/types.ts), loaded field by field. The
 * example shows one part of each type on unconnected nodes, so as a circuit
 * it is refused (floating nodes); its fields must still read exactly.
 * Expected values: SI prefixes per the SI Brochure (BIPM, 9th ed.).
 */
import { describe, expect, it } from 'vitest';
import { DesignError, parseDesign } from '../../../app/circuit';

const FORMAT_EXAMPLE = {
  name: 'format example',
  input: 'in',
  output: 'out',
  temperatureC: 25,
  parts: [
    { id: 'R1', type: 'resistor', nodes: ['in', 'n1'], value: '1k', tolerance: 0.01 },
    { id: 'C1', type: 'capacitor', nodes: ['n1', 'out'], value: '15n' },
    { id: 'L1', type: 'inductor', nodes: ['a', 'b'], value: '10m' },
    { id: 'D1', type: 'diode', nodes: ['anode', 'cathode'], model: { is: 1e-14, n: 1.0, rs: 0 } },
    { id: 'U1', type: 'opamp', nodes: ['noninverting', 'inverting', 'output'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] } },
  ],
};

describe('design-file format', () => {
  it('reads every field of the format', () => {
    const design = parseDesign(FORMAT_EXAMPLE, 'example.json', { checkCircuit: false });
    expect(design.temperatureC).toBe(25);
    expect(design.parts.map((p) => p.type)).toEqual(['resistor', 'capacitor', 'inductor', 'diode', 'opamp']);
    const [r1, c1, l1, d1, u1] = design.parts as any[];
    expect(r1.value).toBe(1000);
    expect(r1.tolerance).toBe(0.01);
    expect(c1.value).toBeCloseTo(15e-9, 20);
    expect(l1.value).toBeCloseTo(10e-3, 15);
    expect(d1.model).toEqual({ is: 1e-14, n: 1, rs: 0 });
    expect(u1.model).toEqual({ openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] });
    expect(JSON.parse(JSON.stringify(design))).toEqual(design);
  });

  it('as a circuit the listing is refused, naming a floating node', () => {
    expect(() => parseDesign(FORMAT_EXAMPLE, 'example.json')).toThrow(DesignError);
    expect(() => parseDesign(FORMAT_EXAMPLE, 'example.json')).toThrow(/node "(a|b|anode|cathode|noninverting|inverting|output)"/);
  });

  it('defaults: temperature 25 °C, SPICE diode defaults, "gnd" is ground, "meg" and "µ" prefixes', () => {
    const design = parseDesign({
      name: 'defaults (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '1meg' },
        { id: 'C1', type: 'capacitor', nodes: ['out', 'gnd'], value: '4.7µ' },
        { id: 'D1', type: 'diode', nodes: ['out', 'GND'] },
      ],
    });
    expect(design.temperatureC).toBe(25);
    expect((design.parts[0] as any).value).toBe(1e6);
    expect((design.parts[1] as any).value).toBeCloseTo(4.7e-6, 18);
    expect((design.parts[2] as any).model).toEqual({ is: 1e-14, n: 1, rs: 0 });
  });
});
