/** The template catalogue and the one way to turn a template into a design file. */
import { ValidationError } from '../../errors';
import type { TemplateInfo } from '../../contract/contract';
import { invertingBandPass, invertingGain, invertingHighPass, invertingLowPass, nonInverting, practicalDifferentiator, practicalIntegrator } from './first-order';
import { logStage } from './log-stage';
import { multipleFeedbackBandPass, sallenKeyHighPassEqual, sallenKeyHighPassUnity, sallenKeyLowPassEqual, sallenKeyLowPassUnity } from './second-order';
import type { DesignFile, DesignTemplate } from './template-kit';

export type { DesignFile } from './template-kit';

const CATALOGUE: DesignTemplate[] = [
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

/** Parameters that may be zero (everything else must be positive). */
const ZERO_ALLOWED = new Set(['rs', 'resistorTolerance', 'capacitorTolerance']);

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
    if (name.endsWith('Tolerance') && value >= 1) throw new ValidationError(`template ${id}: parameter ${name}`, `${value} is not a relative tolerance`, 'Use a fraction, e.g. 0.01 for ±1 %.');
    complete[name] = value;
  }
  return template.build(complete);
}
