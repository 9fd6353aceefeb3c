/**
 * The scope's settings in a profile (`scope`): how its data arrives, what
 * scales it, how the control learns a record is complete. Schemas; the types
 * are inferred from them.
 */
import * as v from 'valibot';
import { checkFirst, describeValue, fieldFirst, fields, finiteNumber, objectExpected, plainObject, oneOf, positiveNumber, wholeNumber, withRule, withDefault, withHint } from '../contract/field-schemas';
import { commandTemplate } from './profile-operations';
import { isQuery } from './template';

/** Binary sample types: two's complement (int), offset-free unsigned (uint) or IEEE 754 (float). */
export const SAMPLE_TYPES = ['int8', 'uint8', 'int16', 'uint16', 'int32', 'float32', 'float64'] as const;
export type SampleType = (typeof SAMPLE_TYPES)[number];
export const BYTE_ORDERS = ['big', 'little'] as const;
export type ByteOrder = (typeof BYTE_ORDERS)[number];

/** Quantities that scale data; volts = (code − codeOffset) · voltsPerCode + voltsOffset. */
export const SCALING_QUANTITIES = ['points', 'sampleIntervalS', 'xOriginS', 'voltsPerCode', 'codeOffset', 'voltsOffset'] as const;
export type ScalingQuantity = (typeof SCALING_QUANTITIES)[number];
/** Names a field of the scaling reply may take ('ignore' skips one). */
export type ScalingField = ScalingQuantity | 'ignore';

const SEE_README = 'See "Scope settings" in app/bench/profiles/README.md.';

const asciiData = v.pipe(
  plainObject,
  checkFirst((data) => {
    const other = Object.keys(data).find((key) => key !== 'format');
    return other === undefined ? undefined : { key: other, message: withHint('does not apply to ASCII data', 'ASCII data is decimal numbers separated by commas; remove the field.') };
  }),
  fields({ format: v.literal('ascii') }),
);

const binaryData = v.pipe(
  fields(
    {
      format: v.literal('binary'),
      sample: oneOf(SAMPLE_TYPES),
      byteOrder: v.nullish(v.picklist(BYTE_ORDERS, (issue) => `must be "big" (most significant byte first) or "little", got ${describeValue(issue.input)}`)),
    },
    [],
    'data field',
  ),
  v.rawCheck<{ format: 'binary'; sample: SampleType; byteOrder?: ByteOrder }>(({ dataset, addIssue }) => {
    if (!dataset.typed || dataset.value.byteOrder !== undefined || isSingleByte(dataset.value.sample)) return;
    addIssue({
      message: withHint(`must be "big" (most significant byte first) or "little" for ${dataset.value.sample} samples`, 'SCPI\'s FORMat:BORDer NORMal is "big", SWAPped is "little".'),
      path: [{ type: 'object', origin: 'value', input: dataset.value, key: 'byteOrder', value: undefined } as v.ObjectPathItem],
    });
  }),
  v.transform(({ sample, byteOrder }) => ({ format: 'binary' as const, sample, byteOrder: byteOrder ?? ('big' as ByteOrder) })),
);

function isSingleByte(sample: SampleType): boolean {
  return sample === 'int8' || sample === 'uint8';
}

/**
 * How a channel's data arrives: a comma-separated list of numbers (ASCII), or
 * a definite-length block (IEEE 488.2 §8.7.9, recalled from memory) of samples.
 */
const WaveformDataSchema = v.pipe(
  objectExpected('must be {"format": "ascii"} or {"format": "binary", "sample": …, "byteOrder": …}'),
  checkFirst(fieldFirst('format', v.picklist(['ascii', 'binary'], (issue) => `must be "ascii" or "binary", got ${describeValue(issue.input)}`))),
  v.lazy((data) => ((data as { format: string }).format === 'ascii' ? asciiData : binaryData)),
);
export type WaveformData = v.InferOutput<typeof WaveformDataSchema>;

const fixedScaling = fields(
  {
    points: v.nullish(wholeNumber(1, Number.MAX_SAFE_INTEGER)),
    sampleIntervalS: v.nullish(positiveNumber('s')),
    xOriginS: v.nullish(finiteNumber),
    voltsPerCode: v.nullish(positiveNumber('V')),
    codeOffset: v.nullish(finiteNumber),
    voltsOffset: v.nullish(finiteNumber),
  },
  [],
  'scaling quantity',
);

type ScalingSource = { fields: ScalingField[]; fixed: Partial<Record<ScalingQuantity, number>> };

/** Each quantity has one source, and the sample interval has one. */
function scalingSourceRule({ fields: read, fixed }: ScalingSource) {
  const twice = read.findIndex((name, i) => name !== 'ignore' && read.indexOf(name) < i);
  if (twice >= 0) return { at: ['fields', twice], message: withHint(`"${read[twice]}" appears twice`, 'Name each number of the reply once; skip one with "ignore".') };
  const both = SCALING_QUANTITIES.find((q) => fixed[q] !== undefined && read.includes(q));
  if (both) return { at: ['fixed', both], message: withHint('is also read from the scaling reply: give it one source', 'Remove it from "fixed" or from "fields".') };
  if (!given({ fields: read, fixed }, 'sampleIntervalS')) return { at: [], message: withHint('must give sampleIntervalS (a field of the scaling reply, or fixed)', SEE_README) };
  return undefined;
}

const scalingFields = fields(
  {
    /** The numbers of the waveformScaling reply, in order; empty when there is no such query. */
    fields: withDefault(v.array(oneOf([...SCALING_QUANTITIES, 'ignore'] as const), (issue) => `must be a list of field names, got ${describeValue(issue.input)}`), []),
    /** Quantities that do not change, e.g. volts per code of a converter with a fixed range. */
    fixed: withDefault(v.pipe(objectExpected('must map quantities to numbers'), fixedScaling), {}),
  },
  [],
  'scaling field',
);

const ScalingSchema = withRule(v.pipe(objectExpected('must be an object with "fields" (the scaling reply\'s numbers, in order) and/or "fixed" values'), scalingFields), scalingSourceRule);
export type WaveformScalingSource = v.InferOutput<typeof ScalingSchema>;

function given(scaling: ScalingSource, quantity: ScalingQuantity): boolean {
  return scaling.fields.includes(quantity) || scaling.fixed[quantity] !== undefined;
}

const bitMask = v.pipe(finiteNumber, v.check((n) => Number.isInteger(n) && n > 0, (issue) => `must be a positive whole number (a bit mask), got ${issue.input}`));
const CONDITIONS = { equals: fields({ equals: finiteNumber }), bitsClear: fields({ bitsClear: bitMask }), bitsSet: fields({ bitsSet: bitMask }) };
const UNTIL_FORMS = 'must be one of {"equals": N}, {"bitsClear": MASK}, {"bitsSet": MASK}';

/** A status value the poll waits for: equal to a number, or with all bits of a mask clear or set. */
const PollConditionSchema = v.pipe(
  objectExpected(UNTIL_FORMS),
  v.check((until) => Object.keys(until).length === 1 && Object.hasOwn(CONDITIONS, Object.keys(until)[0]), UNTIL_FORMS),
  v.lazy((until) => CONDITIONS[Object.keys(until as object)[0] as keyof typeof CONDITIONS]),
);
export type PollCondition = v.InferOutput<typeof PollConditionSchema>;

const pollQuery = v.pipe(
  commandTemplate([], 'must be a query, e.g. "STATus:OPERation:CONDition?"'),
  v.check(isQuery, 'must be a query (a header ending in "?")'),
);

const OPC = { method: 'opc' } as const;
const COMPLETION_FORMS = 'must be "opc" (*OPC? after the start) or {"method": "poll", "query": …, "until": …}';
const COMPLETION_SCHEMAS = {
  opc: fields({ method: v.literal('opc') }),
  poll: fields({ method: v.literal('poll'), query: pollQuery, until: PollConditionSchema, intervalS: withDefault(positiveNumber('s'), 0.01) }, [], 'poll field'),
};

/** How the control learns an acquisition is complete: *OPC?, or a status poll. */
const AcquisitionCompleteSchema = withDefault(
  v.pipe(
    v.custom<unknown>((input) => input === 'opc' || (typeof input === 'object' && input !== null && !Array.isArray(input)), COMPLETION_FORMS),
    v.transform((input) => (input === 'opc' ? OPC : (input as Record<string, unknown>))),
    checkFirst(fieldFirst('method', v.picklist(['opc', 'poll'], COMPLETION_FORMS))),
    v.lazy((input) => COMPLETION_SCHEMAS[(input as { method: 'opc' | 'poll' }).method]),
  ),
  OPC,
);
export type AcquisitionComplete = v.InferOutput<typeof AcquisitionCompleteSchema>;

const OLDER_FIELDS = ['encoding', 'preambleFields'];

const scopeFields = fields(
  {
    /** Horizontal divisions ({secondsPerDiv} = record ÷ divisions). */
    divisions: withDefault(wholeNumber(1, 1000), 10),
    /** Vertical divisions on screen: {rangeVpp} = voltsPerDiv · verticalDivisions, {rangeV} half that. */
    verticalDivisions: withDefault(wholeNumber(1, 1000), 10),
    data: WaveformDataSchema,
    scaling: ScalingSchema,
    acquisitionComplete: AcquisitionCompleteSchema,
  },
  [],
  'scope field',
);

/** Integer samples need volts per code; floating-point samples are volts already. */
function voltsPerCodeRule({ data, scaling }: { data: WaveformData; scaling: ScalingSource }) {
  if (data.format !== 'binary' || data.sample.startsWith('float') || given(scaling, 'voltsPerCode')) return undefined;
  return { at: ['scaling'], message: withHint(`must give voltsPerCode for ${data.sample} samples (a field of the scaling reply, or fixed)`, SEE_README) };
}

const olderForm = checkFirst((scope) => {
  const old = OLDER_FIELDS.find((key) => scope[key] !== undefined);
  return old === undefined ? undefined : { key: old, message: withHint('is an older form: describe the data with scope.data and scope.scaling', SEE_README) };
});

export const ScopeSettingsSchema = withRule(v.pipe(objectExpected('must be an object with divisions, data, scaling and acquisitionComplete'), olderForm, scopeFields), voltsPerCodeRule);
export type ScopeSettings = v.InferOutput<typeof ScopeSettingsSchema>;
