import { UserError, ValidationError } from '../errors';

/**
 * A design that cannot be analysed. `where` names the file and the part or
 * node at fault so the user can go straight to it.
 */
export class DesignError extends ValidationError {
  readonly partId: string | undefined;
  readonly node: string | undefined;

  constructor(where: string, message: string, hint?: string, subject?: { partId?: string; node?: string }) {
    super(where, message, hint);
    this.partId = subject?.partId;
    this.node = subject?.node;
  }
}

/** The circuit equations have no unique solution (e.g. a loop of sources, a node with no path). */
export class SingularCircuitError extends DesignError {}

/** The non-linear (diode) DC solve did not converge. */
export class DcConvergenceError extends UserError {}
