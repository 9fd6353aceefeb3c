/**
 * A request refused by the contract's schema names the field (`request.from`,
 * `noise request.segmentLength`); on the command line it should name the
 * option the user typed. One renaming for every command that builds a request.
 */
import { ValidationError } from '../errors';

/** The error with its field replaced by the option behind it (`where` less `requestPrefix`), or the error as it was. */
export function namedForOption(error: unknown, optionOfField: Readonly<Record<string, string>>, requestPrefix: RegExp): unknown {
  if (!(error instanceof ValidationError)) return error;
  const option = optionOfField[error.where.replace(requestPrefix, '')];
  if (option === undefined) return error;
  return new ValidationError(option, error.message.slice(error.where.length + 2), error.hint);
}
