/**
 * Templates: every one yields a design the engine accepts, parameters land on
 * the parts they name, and bad requests are refused (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { makeDesignFromTemplate, parseDesign, TEMPLATES, toSpiceNetlist } from '../../../app/circuit';
import { ValidationError } from '../../../app/errors';

describe('templates', () => {
  it('cover the stages DEVELOPERS.md "Agreement targets" lists', () => {
    const ids = TEMPLATES.map((t) => t.id);
    for (const id of ['inverting-gain', 'inverting-lowpass', 'inverting-highpass', 'inverting-bandpass', 'non-inverting', 'integrator', 'differentiator',
      'sallen-key-lowpass-unity', 'sallen-key-highpass-unity', 'sallen-key-lowpass-equal', 'sallen-key-highpass-equal', 'mfb-bandpass', 'log-stage']) {
      expect(ids).toContain(id);
    }
  });

  it.each(TEMPLATES.map((t) => [t.id]))('%s: defaults give a valid design with the generic op-amp model', (id) => {
    const design = parseDesign(makeDesignFromTemplate(id), id);
    const opamp = design.parts.find((p) => p.type === 'opamp');
    expect(opamp && opamp.type === 'opamp' && opamp.model).toEqual({ openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] });
    expect(design.input).toBe('in');
    expect(design.output).toBe('out');
    expect(toSpiceNetlist(design, { kind: 'op' })).toMatch(/\.end\n$/);
  });

  it('parameters reach the parts', () => {
    const file = makeDesignFromTemplate('inverting-lowpass', { rf: 22e3, cf: 4.7e-9, gbw: 3e6, resistorTolerance: 0.001 });
    const parts = Object.fromEntries(file.parts.map((p) => [p.id, p]));
    expect(parts.RF.value).toBe(22e3);
    expect(parts.RF.tolerance).toBe(0.001);
    expect(parts.CF.value).toBe(4.7e-9);
    expect((parts.U1.model as { gbw: number }).gbw).toBe(3e6);
  });

  it('refuses unknown templates, unknown and non-positive parameters', () => {
    expect(() => makeDesignFromTemplate('no-such')).toThrow(ValidationError);
    expect(() => makeDesignFromTemplate('inverting-gain', { rx: 1 })).toThrow(/rx/);
    expect(() => makeDesignFromTemplate('inverting-gain', { rf: 0 })).toThrow(/greater than zero/);
    expect(() => makeDesignFromTemplate('log-stage', { rs: -1 })).toThrow(/rs/);
    expect(makeDesignFromTemplate('log-stage', { rs: 0 }).parts[1].model).toMatchObject({ rs: 0 });
  });
});
