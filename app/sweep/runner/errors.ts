/** Named failures of a sweep, so the service and CLI can tell them apart. */
import { UserError } from '../../errors';

/** The link stayed down longer than the configured give-up time; every point measured so far is kept. */
export class SweepGaveUpError extends UserError {
  readonly runId: number;
  constructor(runId: number, afterS: number, lastProblem: string) {
    super(
      `run ${runId}: the instruments did not recover within ${afterS} s (${lastProblem}); the run is marked failed and its points are kept`,
      `Check cables, power and addresses, then continue it with "rolloff resume ${runId}".`,
    );
    this.runId = runId;
  }
}

/** A run was asked to do something its status does not allow (e.g. resume a finished run). */
export class RunStateError extends UserError {
  constructor(runId: number, message: string, hint?: string) {
    super(`run ${runId}: ${message}`, hint);
  }
}

/**
 * Thrown by a measurer's read-back when the step must be measured again with
 * changed instrument settings (e.g. a clipped record after the scale was
 * widened). Internal to the runner; never reaches the user.
 */
export class RemeasureStep extends Error {
  constructor(reason: string) {
    super(reason);
    this.name = 'RemeasureStep';
  }
}
