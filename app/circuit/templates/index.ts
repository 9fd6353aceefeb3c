/** The template catalogue and the one way to turn a template into a design file. */
import { ValidationError } from '../../errors';
import { formatEngineering, withTrueMinus } from '../../units';
import type { TemplateInfo } from '../../contract/contract';
import { invertingBandPass, invertingGain, invertingHighPass, invertingLowPass, nonInverting, practicalDifferentiator, practicalIntegrator } from './first-order';
import { logStage } from './log-stage';
import { multipleFeedbackBandPass, sallenKeyHighPassEqual, sallenKeyHighPassUnity, sallenKeyLowPassEqual, sallenKeyLowPassUnity } from './second-order';
import { TOLERANCE_PARAMETER_OF_KIND, type DesignFile, type DesignTemplate } from './template-kit';

export type { DesignFile } from './template-kit';

const DRAWN: DesignTemplate[] = [
  invertingGain,
  invertingLowPass,
  invertingHighPass,
  invertingBandPass,
  nonInverting,
  practicalIntegrator,
  practicalDifferentiator,
  sallenKeyLowPassUnity,
  sallenKeyHighPassUnity,
  sallenKeyLowPassEqual,
  sallenKeyHighPassEqual,
  multipleFeedbackBandPass,
  logStage,
];

/** Each template with the tolerance parameters of the part kinds its design has (a log stage has no capacitor, so no ctol). */
const CATALOGUE: DesignTemplate[] = DRAWN.map((template) => {
  const defaults = Object.fromEntries(template.parameters.map((p) => [p.name, p.defaultValue]));
  const kinds = new Set(template.build(defaults).parts.map((part) => part.type));
  const tolerances = (Object.keys(TOLERANCE_PARAMETER_OF_KIND) as Array<keyof typeof TOLERANCE_PARAMETER_OF_KIND>).filter((kind) => kinds.has(kind)).map((kind) => TOLERANCE_PARAMETER_OF_KIND[kind]);
  return { ...template, parameters: [...template.parameters, ...tolerances] };
});

const TOLERANCE_NAMES = new Set(Object.values(TOLERANCE_PARAMETER_OF_KIND).map((p) => p.name));

/** Parameters that may be zero (everything else must be positive). */
const ZERO_ALLOWED = new Set(['rs', ...TOLERANCE_NAMES]);

export const TEMPLATES: TemplateInfo[] = CATALOGUE.map(({ id, title, description, parameters }) => ({ id, title, description, parameters }));

/** Design-file JSON for template `id`; missing parameters take their defaults. */
export function makeDesignFromTemplate(id: string, params: Record<string, number> = {}): DesignFile {
  const template = CATALOGUE.find((t) => t.id === id);
  if (!template) throw new ValidationError(`template ${JSON.stringify(id)}`, 'no such template', `Templates: ${CATALOGUE.map((t) => t.id).join(', ')}.`);
  const known = new Map(template.parameters.map((p) => [p.name, p]));
  const complete: Record<string, number> = {};
  for (const p of template.parameters) complete[p.name] = p.defaultValue;
  for (const [name, value] of Object.entries(params)) {
    if (!known.has(name)) throw new ValidationError(`template ${id}: parameter ${name}`, 'unknown parameter', `Parameters of ${id}: ${[...known.keys()].join(', ')}.`);
    if (typeof value !== 'number' || !Number.isFinite(value)) throw new ValidationError(`template ${id}: parameter ${name}`, `${value} is not a number`);
    if (ZERO_ALLOWED.has(name) ? value < 0 : value <= 0) {
      throw new ValidationError(`template ${id}: parameter ${name}`, `${value} must be ${ZERO_ALLOWED.has(name) ? 'zero or more' : 'greater than zero'}`, 'Give the value in SI units.');
    }
    if (TOLERANCE_NAMES.has(name) && value >= 1) throw new ValidationError(`template ${id}: parameter ${name}`, `${value} is not a relative tolerance`, 'Use a fraction, e.g. 0.01 for ±1 %.');
    complete[name] = value;
  }
  return template.build(complete);
}

/**
 * A template parameter's value as people type it back: part values with an SI
 * prefix and no unit ("15n", "4.7k"), ratios and tolerances plain ("100000",
 * "0.01"), and a unit that carries its own prefix (V/µs) plain in that unit.
 */
export function templateParameterText(value: number, unit: string, options: { withUnit?: boolean } = {}): string {
  if (['Ω', 'F', 'H', 'Hz', 'A', 'V'].includes(unit)) return options.withUnit ? formatEngineering(value, unit, 6) : formatEngineering(value, '', 6).replace(' ', '');
  const plain = withTrueMinus(String(value));
  return options.withUnit && unit !== '' && unit !== 'V/V' ? `${plain} ${unit}` : plain;
}
