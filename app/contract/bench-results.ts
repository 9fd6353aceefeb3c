/**
 * What the service sends back about the bench: ports, instruments, profiles
 * and their checks, the bench's status with its maximum stimulus, and the
 * instruments' traffic. Schemas first (reply-fields.ts), types inferred.
 */
import * as v from 'valibot';
import { oneOf, trueOrFalse } from './field-schemas';
import { INSTRUMENT_ROLES, InstrumentRoleSchema } from './enumerations';
import { absentOr, instant, integer, listOf, quantity, replyObject, replyText, someOf } from './reply-fields';

export const PortInfoSchema = replyObject({
  path: replyText,
  /** What is behind the path: a serial port, or a USBTMC instrument bound by the kernel's usbtmc driver. */
  kind: absentOr(oneOf(['serial', 'usbtmc'] as const)),
  /** The address to connect with, in a form the address parser accepts (a VISA resource string). */
  address: absentOr(replyText),
  manufacturer: absentOr(replyText),
  serialNumber: absentOr(replyText),
  vendorId: absentOr(replyText),
  productId: absentOr(replyText),
});
export type PortInfo = v.InferOutput<typeof PortInfoSchema>;

/** The ports this machine offers; `incomplete` says in one line what the listing could not learn (no udev, an unreadable attribute). */
export const PortListingSchema = replyObject({
  ports: listOf(PortInfoSchema),
  incomplete: absentOr(replyText),
});
export type PortListing = v.InferOutput<typeof PortListingSchema>;

export const InstrumentIdentitySchema = replyObject({
  manufacturer: replyText,
  model: replyText,
  serialNumber: replyText,
  firmware: replyText,
});
export type InstrumentIdentity = v.InferOutput<typeof InstrumentIdentitySchema>;

export const InstrumentInfoSchema = replyObject({
  role: InstrumentRoleSchema,
  address: replyText,
  profileId: replyText,
  identity: InstrumentIdentitySchema,
  simulated: trueOrFalse,
});
export type InstrumentInfo = v.InferOutput<typeof InstrumentInfoSchema>;

export const ProfileSummarySchema = replyObject({
  id: replyText,
  role: InstrumentRoleSchema,
  description: replyText,
  builtIn: trueOrFalse,
});
export type ProfileSummary = v.InferOutput<typeof ProfileSummarySchema>;

/** What an instrument made of one operation of a profile check. */
export const OPERATION_OUTCOMES = ['accepted', 'refused', 'timed-out', 'unparsed', 'not-checked'] as const;

/** One operation of a profile check: what the instrument made of it. */
export const OperationCheckSchema = replyObject({
  /** Operation name (e.g. "frequency", "init[1]", "channelOn (channel 2)"). */
  operation: replyText,
  /** The commands sent, as text. */
  commands: replyText,
  /** accepted; refused (with the instrument's SCPI error); timed-out; unparsed (reply not in the form the profile expects); not-checked (not sent). */
  outcome: oneOf(OPERATION_OUTCOMES),
  errorCode: absentOr(integer),
  errorMessage: absentOr(replyText),
  /** A short summary of a query's reply, or for an unparsed reply the bytes received. */
  received: absentOr(replyText),
  detail: absentOr(replyText),
  /** Wall time of the exchange, milliseconds. */
  replyMs: quantity,
});
export type OperationCheck = v.InferOutput<typeof OperationCheckSchema>;

export const ProfileCheckReportSchema = replyObject({
  address: replyText,
  profileId: replyText,
  role: InstrumentRoleSchema,
  identity: InstrumentIdentitySchema,
  checks: listOf(OperationCheckSchema),
});
export type ProfileCheckReport = v.InferOutput<typeof ProfileCheckReportSchema>;

/**
 * A bench as its own settings (the maximum stimulus) are kept: its name
 * (--bench, ROLLOFF_BENCH or the host name) and whether it is the simulated
 * bench the service runs. The simulated bench of a machine and its real
 * instruments are two benches here, so a limit chosen for a simulation never
 * reaches a real circuit.
 */
export const BenchIdentitySchema = replyObject({
  name: replyText,
  simulated: trueOrFalse,
});
export type BenchIdentity = v.InferOutput<typeof BenchIdentitySchema>;

/** The maximum stimulus in force and where it came from. */
export const StimulusLimitSchema = replyObject({
  maxStimulusVpp: quantity,
  /** The bench it is the setting of. */
  bench: BenchIdentitySchema,
  /** ISO 8601: when it was saved as that bench's setting. */
  setAt: instant,
  /** Saved earlier and reused now (not given in this session). */
  reused: trueOrFalse,
});
export type StimulusLimit = v.InferOutput<typeof StimulusLimitSchema>;

export const BenchStatusSchema = replyObject({
  instruments: listOf(InstrumentInfoSchema),
  /** The user's ceiling on generator output, peak-to-peak volts; never exceeded. 0 while not set. */
  maxStimulusVpp: quantity,
  /** The bench whose settings are in force; absent until the service knows (no instrument connected, no simulated bench started yet). */
  bench: absentOr(BenchIdentitySchema),
  /** Where maxStimulusVpp came from; absent while it is not set, or given but not saved yet (it is saved for the first bench used). */
  maxStimulusLimit: absentOr(StimulusLimitSchema),
  /** Set when a simulated bench is running, with the addresses it answers on. */
  simulatedBench: absentOr(replyObject({ addresses: someOf(INSTRUMENT_ROLES, replyText), designName: replyText })),
});
export type BenchStatus = v.InferOutput<typeof BenchStatusSchema>;

/** One line of an instrument's traffic, as the Bench view's log shows it. */
export const TrafficLineSchema = replyObject({
  at: instant,
  role: oneOf([...INSTRUMENT_ROLES, 'other'] as const),
  direction: oneOf(['sent', 'received'] as const),
  text: replyText,
});
export type TrafficLine = v.InferOutput<typeof TrafficLineSchema>;
