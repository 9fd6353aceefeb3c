/**
 * The design-file format as valibot schemas: every field's shape, its
 * defaults and the rules between fields that need no solving (node counts,
 * parts shorted onto themselves, an op-amp driving ground or the input, the
 * input and output nodes). The design model's types are inferred from it
 * (types.ts). Whether the circuit as a whole can be analysed (ground,
 * floating nodes, feedback, a trial solve) is checked by code after it, in
 * parse-design.ts.
 */
import * as v from 'valibot';
import { ValidationError } from '../errors';
import { checkFirst, fieldFirst, fieldRule, fields, LIMITS, objectExpected, optional, required, text, trueOrFalse, withDefault, withHint, withRule } from '../contract/field-schemas';
import { parseEngineering } from '../units';

/** Node names that mean ground. */
export function isGroundNode(node: string): boolean {
  return node === '0' || node.toLowerCase() === 'gnd';
}

export const PART_TYPES = ['resistor', 'capacitor', 'inductor', 'diode', 'opamp'] as const;
export type PartType = (typeof PART_TYPES)[number];
const PASSIVE_TYPES = ['resistor', 'capacitor', 'inductor'] as const;
type PassiveType = (typeof PASSIVE_TYPES)[number];

const NODE_ROLES: Record<PartType, string[]> = {
  resistor: ['a', 'b'],
  capacitor: ['a', 'b'],
  inductor: ['a', 'b'],
  diode: ['anode', 'cathode'],
  opamp: ['noninverting', 'inverting', 'output'],
};

/** SPICE default diode parameters (IS = 1e-14 A, N = 1, RS = 0) when a diode gives no model. */
const DEFAULT_DIODE = { is: 1e-14, n: 1, rs: 0 };
const DEFAULT_TEMPERATURE_C = 25;
// An ideal op-amp still carries nominal gain figures so every formula stays finite.
const IDEAL_OPEN_LOOP_GAIN = 1e12;
const IDEAL_GBW_HZ = 1e15;

/** A node: non-empty text, or a whole number (SPICE style), as trimmed text. */
const nodeName = v.pipe(
  v.custom<string | number>((node) => (typeof node === 'number' && Number.isInteger(node) && node >= 0) || (typeof node === 'string' && node.trim() !== ''), 'must be a node name (text)'),
  v.transform((node) => String(node).trim()),
);

/** A number, or engineering notation (1k, 15n, 4.7µ, 1meg) read by app/units. */
const engineering = v.pipe(
  v.custom<string | number>((value) => typeof value === 'number' || typeof value === 'string', 'must be a number or engineering notation such as 1k, 15n'),
  v.rawTransform<string | number, number>(({ dataset, addIssue, NEVER }) => {
    try {
      return parseEngineering(dataset.value, 'value');
    } catch (error) {
      if (!(error instanceof ValidationError)) throw error;
      const message = error.message.slice(error.where.length + 2);
      addIssue({ message: error.hint ? withHint(message, error.hint) : message });
      return NEVER;
    }
  }),
);

const positive = v.pipe(engineering, v.check((n) => n > 0, (issue) => withHint(`must be greater than zero (got ${issue.input})`, 'Use a positive value in SI units.')));
const nonNegative = v.pipe(engineering, v.check((n) => n >= 0, (issue) => `must not be negative (got ${issue.input})`));

/** A relative tolerance: a fraction (0.01) or a percentage ("1%"). */
const tolerance = v.pipe(
  v.custom<string | number>((value) => typeof value === 'number' || typeof value === 'string', 'must be a number or engineering notation such as 1k, 15n'),
  v.transform((value) => (typeof value === 'string' && value.trim().endsWith('%') ? { percent: value.trim().slice(0, -1) } : { fraction: value })),
  v.rawTransform<{ percent: string } | { fraction: string | number }, number>(({ dataset, addIssue, NEVER }) => {
    const result = v.safeParse(engineering, 'percent' in dataset.value ? dataset.value.percent : dataset.value.fraction);
    if (!result.success) {
      addIssue({ message: result.issues[0].message });
      return NEVER;
    }
    return 'percent' in dataset.value ? result.output / 100 : result.output;
  }),
  v.check((t) => t >= 0 && t < 1, (issue) => withHint(`${issue.input} is not a relative tolerance`, 'Write it as a fraction (0.01 for ±1 %) or as "1%".')),
);

function nodesOf<T extends PartType>(type: T) {
  const roles = NODE_ROLES[type];
  const count = roles.length;
  const message = `a ${type} needs ${count} nodes [${roles.join(', ')}]`;
  return v.pipe(v.custom<unknown[]>((nodes) => Array.isArray(nodes) && nodes.length === count, message), v.array(nodeName));
}

const partId = v.pipe(v.string('must be a non-empty text such as "R1"'), v.check((id) => id.trim() !== '', 'must be a non-empty text such as "R1"'), v.transform((id) => id.trim()));
const partType = v.picklist(PART_TYPES, (issue) => withHint(`unknown part type ${JSON.stringify(issue.input)}`, `Use one of: ${PART_TYPES.join(', ')}.`));

function shorted(a: string, b: string): boolean {
  return a === b || (isGroundNode(a) && isGroundNode(b));
}

function passivePart(type: PassiveType) {
  return withRule(
    fields(
      {
        id: partId,
        type: v.picklist(PASSIVE_TYPES),
        /** [a, b]. */
        nodes: v.pipe(nodesOf(type), v.transform(([a, b]) => [a, b] as [string, string])),
        /** Ohms, farads or henries. */
        value: required(positive, withHint('is missing', 'Give the value in SI units, e.g. "1k" or 1000.')),
        /** Relative tolerance, e.g. 0.01 for ±1 %. Absent: the value is exact. */
        tolerance: optional(tolerance),
      },
      [],
      `${type} field`,
    ),
    (part) => (shorted(...part.nodes) ? { at: ['nodes'], message: withHint(`both ends are on node "${part.nodes[0]}"`, 'A part shorted onto itself does nothing; check the node names.') } : undefined),
  );
}

const DiodeModelSchema = fields(
  {
    /** Saturation current IS, amperes. */
    is: withDefault(positive, DEFAULT_DIODE.is),
    /** Emission coefficient N (ideality factor). */
    n: withDefault(positive, DEFAULT_DIODE.n),
    /** Series resistance RS, ohms. */
    rs: withDefault(nonNegative, DEFAULT_DIODE.rs),
  },
  [],
  'diode model field',
);

const diodePart = withRule(
  fields(
    {
      id: partId,
      type: v.literal('diode'),
      /** [anode, cathode]. */
      nodes: v.pipe(nodesOf('diode'), v.transform(([a, b]) => [a, b] as [string, string])),
      model: withDefault(v.pipe(objectExpected('must be an object { is, n, rs }'), DiodeModelSchema), { ...DEFAULT_DIODE }),
    },
    [],
    'diode field',
  ),
  (part) => (part.nodes[0] === part.nodes[1] ? { at: ['nodes'], message: `both ends are on node "${part.nodes[0]}"` } : undefined),
);

const rails = v.pipe(
  v.custom<unknown[]>((value) => Array.isArray(value) && value.length === 2, 'must be [low, high] in volts'),
  v.tuple([engineering, engineering]),
  v.check(([low, high]) => low < 0 && high > 0, (issue) => withHint(`[${issue.input[0]}, ${issue.input[1]}] must straddle 0 V (low < 0 < high)`, 'Give the output swing limits, e.g. [-12, 12].')),
);

const OPAMP_MODEL_HINT = 'Give at least { "openLoopGain": 1e5, "gbw": 1e6 } or { "ideal": true }.';

const OpAmpModelSchema = v.pipe(
  fields(
    {
      /** Treat as ideal (infinite gain, no poles) in every analysis. */
      ideal: optional(trueOrFalse),
      /** DC open-loop gain A0, V/V. */
      openLoopGain: optional(positive),
      /** Gain-bandwidth product, Hz. */
      gbw: optional(positive),
      /** Slew rate, V/s. Absent: no slew limit known. */
      slewRate: optional(positive),
      /** Output swing limits [low, high], volts. Absent: no clipping known. */
      rails: optional(rails),
      /** Optional second open-loop pole, Hz. */
      secondPoleHz: optional(positive),
      /** Input offset voltage, volts (added to the non-inverting input). */
      inputOffsetV: optional(engineering),
      /** Input bias current, amperes, flowing into each input pin. */
      inputBiasA: optional(engineering),
      // Noise densities and corners: zero is allowed (and is what an absent field means).
      /**
       * Open-loop output resistance, ohms, between the gain stage and the output pin (inside the feedback
       * loop). With a capacitive load on the output it adds a pole to the loop gain: the usual cause of
       * ringing. Absent: 0 Ω. Treated as noiseless (its noise is part of the op-amp's en).
       */
      outputResistanceOhm: optional(nonNegative),
      /** White input voltage noise density en, V/√Hz (in series with the non-inverting input). Absent: 0. */
      voltageNoiseVPerRtHz: optional(nonNegative),
      /** 1/f corner of en, Hz: en(f)² = en²·(1 + corner/f). Absent: 0 (white). */
      voltageNoiseCornerHz: optional(nonNegative),
      /** White input current noise density in, A/√Hz, at each input pin (uncorrelated between pins). Absent: 0. */
      currentNoiseAPerRtHz: optional(nonNegative),
      /** 1/f corner of in, Hz: in(f)² = in²·(1 + corner/f). Absent: 0 (white). */
      currentNoiseCornerHz: optional(nonNegative),
    },
    [
      fieldFirst('ideal', optional(trueOrFalse)),
      fieldRule<{ ideal?: boolean; openLoopGain?: unknown; gbw?: unknown }>((model) => {
        if (model.ideal === true) return undefined;
        const missing = (['openLoopGain', 'gbw'] as const).find((key) => model[key] === undefined || model[key] === null);
        return missing && { key: missing, message: withHint('is missing', OPAMP_MODEL_HINT) };
      }),
    ],
    'op-amp model field',
  ),
  v.transform(({ ideal, openLoopGain, gbw, ...rest }) => ({
    openLoopGain: openLoopGain ?? IDEAL_OPEN_LOOP_GAIN,
    gbw: gbw ?? IDEAL_GBW_HZ,
    ...rest,
    ...(ideal ? { ideal: true as const } : {}),
  })),
);

const opAmpPart = withRule(
  fields(
    {
      id: partId,
      type: v.literal('opamp'),
      /** [noninverting, inverting, output]; the output is referenced to ground. */
      nodes: v.pipe(nodesOf('opamp'), v.transform(([plus, minus, out]) => [plus, minus, out] as [string, string, string])),
      model: required(v.pipe(objectExpected(withHint('must be an object', OPAMP_MODEL_HINT)), OpAmpModelSchema), withHint('is missing', OPAMP_MODEL_HINT)),
    },
    [],
    'op-amp field',
  ),
  ({ nodes: [plus, minus, out] }) => {
    if (isGroundNode(out)) return { at: ['nodes', 2], message: 'the op-amp output cannot be ground' };
    if (shorted(plus, minus)) return { at: ['nodes'], message: 'both op-amp inputs are on the same node' };
    return undefined;
  },
);

const PART_SCHEMAS = { resistor: passivePart('resistor'), capacitor: passivePart('capacitor'), inductor: passivePart('inductor'), diode: diodePart, opamp: opAmpPart };

const PartSchema = v.pipe(
  objectExpected('must be an object with id, type and nodes'),
  checkFirst(fieldFirst('id', partId)),
  checkFirst(fieldFirst('type', partType)),
  v.lazy((part) => PART_SCHEMAS[(part as { type: PartType }).type]),
);

const parts = v.pipe(
  v.custom<unknown[]>((list) => Array.isArray(list) && list.length > 0, 'must be a non-empty list of parts'),
  v.check((list) => list.length <= LIMITS.count, `has more than ${LIMITS.count} parts`),
  v.array(PartSchema),
);

type Rule<T> = (design: T) => { at: (string | number)[]; message: string } | undefined;

/** Part ids are unique; no op-amp drives the input node (two sources on one node). */
const partsRule: Rule<{ input: string; parts: { id: string; type: PartType; nodes: string[] }[] }> = ({ input, parts: list }) => {
  const twice = list.findIndex((part, i) => list.findIndex((other) => other.id === part.id) < i);
  if (twice >= 0) return { at: ['parts', twice], message: withHint(`duplicate id "${list[twice].id}"`, 'Give every part its own id.') };
  const driving = list.findIndex((part) => part.type === 'opamp' && part.nodes[2] === input);
  if (driving >= 0) return { at: ['parts', driving, 'nodes', 2], message: withHint(`the op-amp output is the driven input node "${input}"`, 'Two sources cannot drive one node; give the output its own node.') };
  return undefined;
};

/** The input and output are nodes of the circuit, neither ground nor each other. */
const terminalsRule: Rule<{ input: string; output: string; parts: { nodes: string[] }[] }> = ({ input, output, parts: list }) => {
  if (isGroundNode(input)) return { at: ['input'], message: withHint('the input cannot be ground', 'Name the node the stimulus drives, e.g. "in".') };
  if (isGroundNode(output)) return { at: ['output'], message: withHint('the output cannot be ground', 'Name the node you measure, e.g. "out".') };
  if (input === output) return { at: ['output'], message: withHint(`the output is the input node "${input}"`, 'Measure a node the circuit drives.') };
  const mentioned = new Set(list.flatMap((part) => part.nodes));
  if (!mentioned.has(input)) return { at: ['input'], message: withHint(`input node "${input}" does not appear in any part`, 'Set "input" to a node that a part connects to.') };
  if (!mentioned.has(output)) return { at: ['output'], message: withHint(`output node "${output}" does not appear in any part`, 'Set "output" to a node that a part connects to.') };
  return undefined;
};

const designFields = fields(
  {
    /** Absent: the file's name. */
    name: optional(text(LIMITS.shortTextChars, false)),
    /** Free text carried through unchanged (e.g. "invented example"). */
    description: optional(text(LIMITS.textChars, true)),
    /** Node driven by the ideal stimulus source (to ground). */
    input: nodeName,
    /** Node whose voltage is the response. */
    output: nodeName,
    /** Temperature of the parts, °C: the diode model's junction and the resistors' thermal noise 4kTR. */
    temperatureC: withDefault(v.pipe(engineering, v.check((t) => t > -273.15 && t < 1000, (issue) => `${issue.input} °C is not a usable temperature`)), DEFAULT_TEMPERATURE_C),
    parts,
  },
  [],
  'design field',
);

/** A design file (already JSON-parsed), every field checked; the circuit as a whole is checked after it. */
export const DesignFileSchema = v.pipe(
  objectExpected(withHint('a design must be a JSON object', 'See the design-file example in app/circuit/examples/.')),
  withRule(withRule(designFields, terminalsRule), partsRule),
);

type DesignOutput = v.InferOutput<typeof DesignFileSchema>;
export type Part = DesignOutput['parts'][number];
export type PassivePart = Extract<Part, { type: PassiveType }>;
export type DiodePart = Extract<Part, { type: 'diode' }>;
export type OpAmpPart = Extract<Part, { type: 'opamp' }>;
export type DiodeModel = DiodePart['model'];
export type OpAmpModel = OpAmpPart['model'];
/** A design as the engines take it: every field given, values as plain numbers in SI units. */
export type Design = Omit<DesignOutput, 'name'> & { name: string };
