/**
 * What the service sends back about designs and builds: the templates, a
 * design as stored, a build as stored. Schemas first (reply-fields.ts), types
 * inferred.
 */
import * as v from 'valibot';
import { describeValue, isPlainObject, storeId } from './field-schemas';
import { listOf, quantity, replyObject, replyText, instant } from './reply-fields';

export const TemplateInfoSchema = replyObject({
  id: replyText,
  title: replyText,
  description: replyText,
  /** Parameter names with defaults, in SI units (ohms, farads, hertz). */
  parameters: listOf(replyObject({ name: replyText, description: replyText, defaultValue: quantity, unit: replyText })),
});
export type TemplateInfo = v.InferOutput<typeof TemplateInfoSchema>;

/**
 * A design file as the service sends one (makeTemplate, a stored design): an
 * object with its list of parts. Its circuit (nodes, values) is the circuit
 * parser's to check (app/circuit), where the design is used.
 */
export const DesignFileReplySchema = v.custom<unknown>(
  (value) => isPlainObject(value) && Array.isArray(value.parts),
  (issue) => `must be a design file (an object with a list of parts), got ${describeValue(issue.input)}`,
);

/** A design as stored: the JSON design file plus its store id. */
export const DesignRecordSchema = replyObject({
  id: storeId,
  /** Stable identity (a UUID made when the design was first stored), the same in every store it is copied to. */
  uid: replyText,
  name: replyText,
  /** The design file's JSON (see app/circuit for its schema). */
  design: DesignFileReplySchema,
  createdAt: instant,
});
export type DesignRecord = v.InferOutput<typeof DesignRecordSchema>;

export const BuildRecordSchema = replyObject({
  id: storeId,
  /** Stable identity (a UUID made when the build was first stored), the same in every store it is copied to. */
  uid: replyText,
  designId: storeId,
  label: replyText,
  notes: replyText,
  /** Measured part values by part id, SI units. */
  actualValues: v.record(v.string(), quantity, (issue) => `must be an object of part values, got ${describeValue(issue.input)}`),
  createdAt: instant,
});
export type BuildRecord = v.InferOutput<typeof BuildRecordSchema>;
