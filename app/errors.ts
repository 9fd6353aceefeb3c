/**
 * Errors a user can act on. The CLI and the hosts print `message` and `hint`
 * without a stack trace and exit non-zero; anything else is a bug and keeps its
 * stack. Subsystems subclass this so callers can tell failures apart by type.
 */
export class UserError extends Error {
  /** What to do next, shown under the message. */
  readonly hint: string | undefined;

  constructor(message: string, hint?: string) {
    super(message);
    this.name = new.target.name;
    this.hint = hint;
  }
}

/** A value that crossed a boundary (file, CLI argument, IPC, HTTP) was not valid. */
export class ValidationError extends UserError {
  /** Where the bad value was, e.g. `parts[2].value` or `--from`. */
  readonly where: string;

  constructor(where: string, message: string, hint?: string) {
    super(`${where}: ${message}`, hint);
    this.where = where;
  }
}

/**
 * What the host sent back to the window (a method's result, an event) did not
 * have the contract's shape: the host and the window are of different
 * versions, or the host is faulty. `where` names the method or event and the
 * field.
 */
export class UnexpectedReplyError extends ValidationError {}

export function isUserError(error: unknown): error is UserError {
  return error instanceof UserError;
}
