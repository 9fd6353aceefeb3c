/**
 * The operations of a profile: for each role the operations it knows, the
 * placeholders their command templates may use, and the schemas that check a
 * profile's `operations` and `init` against them.
 */
import * as v from 'valibot';
import type { InstrumentRole } from '../contract/contract';
import { describeValue, fields, isPlainObject, optional, required, text, withDefault, withHint, LIMITS } from '../contract/field-schemas';
import { isQuery, templatePlaceholders } from './template';

/** How an operation's command list must look. */
export interface OperationRule {
  placeholders: readonly string[];
  required: boolean;
  /** Last command must be a query (and only the last): its reply is the operation's result. */
  query: boolean;
  description: string;
}

const op = (description: string, placeholders: string[] = [], query = false, required = true): OperationRule => ({ description, placeholders, query, required });

/** Every operation each role knows, with the placeholders its templates may use. */
export const OPERATION_RULES: Record<InstrumentRole, Record<string, OperationRule>> = {
  generator: {
    sineFunction: op('select sine output'),
    dcFunction: op('select DC output'),
    frequency: op('set frequency', ['frequencyHz']),
    amplitude: op('set amplitude in the profile\'s amplitudeUnit', ['amplitude']),
    offset: op('set DC offset (also the DC level)', ['offsetV']),
    outputOn: op('output on'),
    outputOff: op('output off'),
    // Only with generator.load "calibrated": the instrument scales its amplitude for the load it is told of.
    loadHighZ: op('amplitude calibrated for a high-impedance load', [], false, false),
    load50Ohm: op('amplitude calibrated for a 50 Ω load', [], false, false),
    readFrequency: op('read the frequency back', [], true),
    readOutput: op('read the output state back (1 or ON: on, 0 or OFF: off)', [], true, false),
  },
  meter: {
    readAcRms: op('read AC RMS volts', [], true),
    readDc: op('read DC volts', [], true),
    acRange: op('AC range in volts', ['rangeV']),
    dcRange: op('DC range in volts', ['rangeV']),
    acRangeAuto: op('AC autorange'),
    dcRangeAuto: op('DC autorange'),
    integration: op('integration time', ['integrationS', 'powerLineCycles']),
  },
  scope: {
    channelOn: op('turn a channel on', ['channel']),
    verticalScale: op('vertical scale of a channel', ['channel', 'voltsPerDiv', 'rangeV', 'rangeVpp']),
    timebase: op('horizontal scale', ['secondsPerDiv', 'secondsPerRecord']),
    recordPoints: op('number of samples in one record (noise runs set it; without it they take the record as it comes)', ['points'], false, false),
    // Completion (scope.acquisitionComplete) is added by the control: *OPC? in the same message, or a status poll.
    acquire: op('start one record of both channels'),
    waveformScaling: op('the numbers that scale a channel\'s data (scope.scaling.fields)', ['channel'], true, false),
    waveformData: op('waveform data of a channel', ['channel'], true),
    // One program message, one response message: per channel 1 then 2, its scaling reply (when scope.scaling.fields has any) and its data.
    waveformBoth: op('scaling and data of channel 1, then of channel 2, in one response message', [], true, false),
    measureAmplitudeVpp: op('peak-to-peak of a channel', ['channel'], true, false),
    measurePhaseDeg: op('phase of channel 2 relative to channel 1', [], true, false),
  },
};

const PLACEHOLDER_HINT = 'The placeholders each operation offers are listed in app/bench/profiles/README.md.';

/** One command template that may use only the `allowed` placeholders. */
export function commandTemplate(allowed: readonly string[], expected = 'must be a command (text)') {
  return v.pipe(
    v.string((issue) => `${expected}, got ${describeValue(issue.input)}`),
    v.check((command) => command.length <= LIMITS.shortTextChars, `is longer than ${LIMITS.shortTextChars} characters`),
    v.rawCheck<string>(({ dataset, addIssue }) => {
      if (!dataset.typed) return;
      const result = templatePlaceholders(dataset.value);
      if ('problem' in result) return addIssue({ message: withHint(`template ${result.problem}`, 'Write one SCPI command a line, with placeholders as {name}.') });
      const unknown = result.names.find((name) => !allowed.includes(name));
      if (unknown === undefined) return;
      const offered = allowed.length ? ` (this operation offers ${allowed.map((a) => `{${a}}`).join(', ')})` : ' (this operation takes no values)';
      addIssue({ message: withHint(`unknown placeholder {${unknown}}${offered}`, PLACEHOLDER_HINT) });
    }),
  );
}

/** A command with a wait after it: an instrument that needs time to settle a relay or range. */
function timedCommand(allowed: readonly string[]) {
  return fields({
    send: commandTemplate(allowed),
    waitS: withDefault(
      v.pipe(
        v.number((issue) => `must be a number of seconds from 0 to 60, got ${describeValue(issue.input)}`),
        v.check((s) => s >= 0 && s <= 60, (issue) => `must be a number of seconds from 0 to 60, got ${issue.input}`),
      ),
      0,
    ),
  });
}

const COMMAND_FORMS = 'must be a command, or {"send": COMMAND, "waitS": SECONDS}';

/** A command as text, or as {"send", "waitS"}: always {send, waitS} out. */
function commandEntry(allowed: readonly string[]) {
  const asText = v.pipe(commandTemplate(allowed, COMMAND_FORMS), v.transform((send) => ({ send, waitS: 0 })));
  const asObject = timedCommand(allowed);
  return v.lazy((input) => (isPlainObject(input) ? asObject : asText));
}

type Command = { send: string; waitS: number };

/** Only the last command of a reading operation is a query; no other command's reply would be read. */
function queryRule(rule: OperationRule, commands: readonly Command[]): string | undefined {
  const queries = commands.map((c) => isQuery(c.send));
  if (rule.query && !queries[queries.length - 1]) return withHint(`must end with a query (a header ending in "?") — it ${rule.description}`, 'End the list with the query whose reply is the result.');
  const stray = queries.findIndex((q, i) => q && (!rule.query || i < queries.length - 1));
  if (stray >= 0) return withHint(`command "${commands[stray].send}" is a query in a place where its reply would not be read`, 'Leave the query out, or move it to the end of a reading operation.');
  return undefined;
}

/** An operation: one command, or a non-empty list sent in order; always a list out. */
function operation(rule: OperationRule) {
  const entry = commandEntry(rule.placeholders);
  const list = v.pipe(
    v.array(entry),
    v.check((commands) => commands.length > 0, 'must be a command or a non-empty list of commands'),
    v.check((commands) => commands.length <= LIMITS.count, `has more than ${LIMITS.count} commands`),
  );
  const single = v.pipe(entry, v.transform((command) => [command]));
  return v.pipe(
    required(
      v.lazy((input) => (Array.isArray(input) ? list : single)),
      withHint(`is missing (needed to ${rule.description})`, 'Add the command that does it to "operations".'),
    ),
    v.rawCheck<Command[]>(({ dataset, addIssue }) => {
      if (!dataset.typed) return;
      const problem = queryRule(rule, dataset.value);
      if (problem) addIssue({ message: problem });
    }),
  );
}

/** The operations of a profile for a role: operation name → its commands, each with the wait after it. */
export function operationsSchema(role: InstrumentRole) {
  const rules = OPERATION_RULES[role];
  const entries = Object.fromEntries(Object.entries(rules).map(([name, rule]) => [name, rule.required ? operation(rule) : optional(operation(rule))]));
  return v.pipe(
    v.custom<Record<string, unknown>>(isPlainObject, 'must be an object mapping operation names to commands'),
    fields(entries, [], `${role} operation`),
    v.transform((given) => given as Record<string, Command[]>),
  );
}

/** Operation name → commands, and → seconds to wait after each command (only for operations that have a wait). */
export function splitWaits<T extends { operations: Record<string, Command[]> }>(profile: T): Omit<T, 'operations'> & { operations: Record<string, string[]>; waitsS: Record<string, number[]> } {
  const operations: Record<string, string[]> = {};
  const waitsS: Record<string, number[]> = {};
  for (const [name, commands] of Object.entries(profile.operations)) {
    operations[name] = commands.map((c) => c.send);
    if (commands.some((c) => c.waitS > 0)) waitsS[name] = commands.map((c) => c.waitS);
  }
  return { ...profile, operations, waitsS };
}

/** The commands sent once after connecting: no placeholders. */
export const InitSchema = withDefault(v.array(commandTemplate([]), (issue) => `must be a list of commands, got ${describeValue(issue.input)}`), []);

/** A description or a note: any text, empty allowed. */
export const noteText = text(LIMITS.textChars, true);
