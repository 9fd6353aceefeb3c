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
    const file = makeDesignFromTemplate('inverting-lowpass', { rf: 22e3, cf: 4.7e-9, gbw: 3e6, rtol: 0.001 });
    const parts = Object.fromEntries(file.parts.map((p) => [p.id, p]));
    expect(parts.RF.value).toBe(22e3);
    expect(parts.RF.tolerance).toBe(0.001);
    expect(parts.CF.value).toBe(4.7e-9);
    expect((parts.U1.model as { gbw: number }).gbw).toBe(3e6);
  });

  it.each(TEMPLATES.map((t) => [t.id]))('%s: a tolerance parameter for each part kind it has, and none for a kind it lacks', (id) => {
    const kinds = new Set(makeDesignFromTemplate(id).parts.map((p) => p.type));
    const names = TEMPLATES.find((t) => t.id === id)!.parameters.map((p) => p.name);
    expect(names.includes('rtol'), 'rtol').toBe(kinds.has('resistor'));
    expect(names.includes('ctol'), 'ctol').toBe(kinds.has('capacitor'));
  });

  it('the log stage, which has no capacitor, offers no capacitor tolerance', () => {
    expect(TEMPLATES.find((t) => t.id === 'log-stage')!.parameters.map((p) => p.name)).not.toContain('ctol');
  });

  it('names every parameter in one style: lower-case symbols, part values by their part ids', () => {
    for (const template of TEMPLATES) {
      const partIds = new Set(makeDesignFromTemplate(template.id).parts.map((p) => String(p.id).toLowerCase()));
      for (const p of template.parameters) {
        expect(p.name, `${template.id}: ${p.name}`).toMatch(/^[a-z][a-z0-9]*$/);
        // A part value (Ω, F, H) is named for its part, or for the letter of the equal parts it sets (r for R1 and R2).
        if (['Ω', 'F', 'H'].includes(p.unit) && p.name !== 'rs') expect(partIds.has(p.name) || /^[rcl]$/.test(p.name), `${template.id}: ${p.name}`).toBe(true);
      }
    }
  });

  it('takes the slew rate in V/µs, as data sheets give it, and writes V/s to the design file', () => {
    const sr = TEMPLATES[0].parameters.find((p) => p.name === 'sr')!;
    expect([sr.unit, sr.defaultValue]).toEqual(['V/µs', 0.5]);
    const file = makeDesignFromTemplate('inverting-gain', { sr: 13 });
    expect((file.parts.find((p) => p.type === 'opamp')!.model as { slewRate: number }).slewRate).toBe(13e6);
  });

  it('refuses unknown templates, unknown and non-positive parameters', () => {
    expect(() => makeDesignFromTemplate('no-such')).toThrow(ValidationError);
    expect(() => makeDesignFromTemplate('inverting-gain', { rx: 1 })).toThrow(/rx/);
    expect(() => makeDesignFromTemplate('inverting-gain', { rf: 0 })).toThrow(/greater than zero/);
    expect(() => makeDesignFromTemplate('log-stage', { rs: -1 })).toThrow(/rs/);
    expect(makeDesignFromTemplate('log-stage', { rs: 0 }).parts[1].model).toMatchObject({ rs: 0 });
  });
});
