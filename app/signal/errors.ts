/** Named failures of the fitting code, so the sweep can flag a point instead of guessing. */
import { UserError } from '../errors';

/** The data cannot determine the parameters (singular system, too few points, no convergence). */
export class FitError extends UserError {
  constructor(readonly what: string, message: string, hint?: string) {
    super(`${what}: ${message}`, hint);
  }
}
