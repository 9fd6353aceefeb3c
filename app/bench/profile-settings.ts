/**
 * The generator's and the meter's settings in a profile (`generator`, `meter`),
 * as schemas; the types are inferred from them.
 */
import * as v from 'valibot';
import { describeValue, fieldFirst, fieldRule, fields, finiteNumber, objectExpected, oneOf, positiveNumber, withDefault, withHint } from '../contract/field-schemas';

export const AMPLITUDE_UNITS = ['Vpp', 'Vrms', 'Vpk'] as const;
export type AmplitudeUnit = (typeof AMPLITUDE_UNITS)[number];
export const LOAD_MEANINGS = ['none', 'calibrated'] as const;
export type LoadMeaning = (typeof LOAD_MEANINGS)[number];

const minAmplitudeVpp = withDefault(v.pipe(finiteNumber, v.minValue(0, (issue) => `must be a number from 0 up to below maxAmplitudeVpp, got ${issue.input}`)), 0);
const maxAmplitudeVpp = positiveNumber('Vpp');

export const GeneratorSettingsSchema = v.pipe(
  objectExpected('must be an object with minFrequencyHz, maxFrequencyHz, maxAmplitudeVpp, amplitudeUnit'),
  fields(
    {
      minFrequencyHz: positiveNumber('Hz'),
      maxFrequencyHz: positiveNumber('Hz'),
      /** The instrument's own ceiling; the user's ceiling is the bench's maximum stimulus. */
      maxAmplitudeVpp,
      /** The smallest sine amplitude the instrument sets (0 when it gives none); also the amplitude of the safe state. */
      minAmplitudeVpp,
      /** What the number of the amplitude command means for a sine: peak-to-peak, RMS or peak volts. */
      amplitudeUnit: withDefault(oneOf(AMPLITUDE_UNITS), 'Vpp'),
      /**
       * What the instrument's load setting means: "none" — it has none, its amplitude is the open-circuit
       * voltage; "calibrated" — its amplitude is what it delivers into the load it is told of (loadHighZ /
       * load50Ohm), so at 50 Ω the open-circuit voltage is twice the setting.
       */
      load: withDefault(
        v.picklist(LOAD_MEANINGS, (issue) => `must be "none" (no load setting: the amplitude is the open-circuit voltage) or "calibrated" (the amplitude is into the load set by loadHighZ / load50Ohm), got ${describeValue(issue.input)}`),
        'none',
      ),
      sourceImpedanceOhm: withDefault(positiveNumber('Ω'), 50),
    },
    [
      fieldFirst('minFrequencyHz', positiveNumber('Hz')),
      fieldFirst('maxFrequencyHz', positiveNumber('Hz')),
      fieldRule<{ minFrequencyHz: number; maxFrequencyHz: number }>((g) =>
        g.maxFrequencyHz > g.minFrequencyHz ? undefined : { key: 'maxFrequencyHz', message: withHint(`must be above minFrequencyHz (${g.minFrequencyHz} Hz), got ${g.maxFrequencyHz}`, 'Give the instrument\'s frequency range in hertz, lowest first.') },
      ),
      fieldFirst('maxAmplitudeVpp', maxAmplitudeVpp),
      fieldFirst('minAmplitudeVpp', minAmplitudeVpp),
      fieldRule<{ minAmplitudeVpp?: number | null; maxAmplitudeVpp: number }>((g) =>
        (g.minAmplitudeVpp ?? 0) < g.maxAmplitudeVpp ? undefined : { key: 'minAmplitudeVpp', message: `must be a number from 0 up to below maxAmplitudeVpp (${g.maxAmplitudeVpp}), got ${g.minAmplitudeVpp}` },
      ),
    ],
    'generator field',
  ),
  v.transform(({ minFrequencyHz, maxFrequencyHz, maxAmplitudeVpp, minAmplitudeVpp, ...rest }) => ({ limits: { minFrequencyHz, maxFrequencyHz, maxAmplitudeVpp, minAmplitudeVpp }, ...rest })),
);

export type GeneratorSettings = v.InferOutput<typeof GeneratorSettingsSchema>;

export const MeterSettingsSchema = withDefault(
  v.pipe(
    objectExpected('must be an object, e.g. {"powerLineHz": 50}'),
    fields({ powerLineHz: withDefault(v.picklist([50, 60], (issue) => `must be 50 or 60, got ${describeValue(issue.input)}`), 50) }, [], 'meter field'),
  ),
  { powerLineHz: 50 },
);

export type MeterSettings = v.InferOutput<typeof MeterSettingsSchema>;
