/** Named store failures, so callers can tell "pick another file" from "upgrade" from "skip". */
import { UserError } from '../errors';
import { ownerName } from '../contract/run-owner-text';
import type { RunOwnership } from './types';

/** The file was written by a newer Rolloff whose schema this version does not know. */
export class StoreVersionError extends UserError {
  constructor(
    readonly path: string,
    readonly fileSchemaVersion: number,
    readonly knownSchemaVersion: number,
    readonly writtenByAppVersion: string | undefined,
    readonly thisAppVersion: string,
  ) {
    const writer = writtenByAppVersion ? ` (written by Rolloff ${writtenByAppVersion})` : '';
    super(
      `${path}: database schema version ${fileSchemaVersion}${writer} is newer than this Rolloff ${thisAppVersion} understands (schema version ${knownSchemaVersion}).`,
      `Open it with Rolloff ${writtenByAppVersion ?? 'of a newer release'}${writtenByAppVersion ? ' or newer' : ''}, or choose another database with --db or ROLLOFF_DB. The file was not changed.`,
    );
  }
}

/** The file is not a SQLite database, or is truncated or corrupt. It is never written to. */
export class StoreDamagedError extends UserError {
  constructor(readonly path: string, detail: string) {
    super(
      `${path}: not a usable Rolloff database (${detail}).`,
      'The file was left untouched. Restore it from a backup, or choose another database with --db or ROLLOFF_DB.',
    );
  }
}

/** A read-only open of a database that does not exist or still needs migrating. */
export class StoreUnavailableError extends UserError {
  constructor(readonly path: string, detail: string, hint: string) {
    super(`${path}: ${detail}`, hint);
  }
}

/** A server store that cannot be reached now (down, network cut): worth trying again later, unlike a refused login. */
export class StoreUnreachableError extends StoreUnavailableError {}

/** A point with this step is already stored for the run; resume skips it instead of storing it twice. */
export class DuplicateStepError extends UserError {
  constructor(readonly runId: number, readonly step: number) {
    super(
      `run ${runId}: step ${step} is already stored.`,
      'Resume from nextStep(run) instead of re-measuring stored steps.',
    );
  }
}

/** A design, build, run or schedule id that is not in the database. */
export class RecordNotFoundError extends UserError {
  constructor(readonly kind: 'design' | 'build' | 'run' | 'schedule', readonly id: number) {
    super(`${kind} ${id} does not exist in this database.`, `List the ${kind}s to see which ids exist.`);
  }
}

/**
 * A write by a run's owner (updateRunStatus, insertPoint or appendEvent with asOwner) after
 * another process took the run over, or after the run was given up: nothing
 * was written. The process that gets it must stop driving the run.
 */
export class RunTakenOverError extends UserError {
  constructor(
    readonly runId: number,
    /** Who owns the run now, if anyone. */
    readonly nowOwnedBy: Pick<RunOwnership, 'label' | 'pid' | 'host'> | undefined,
  ) {
    super(
      nowOwnedBy
        ? `run ${runId} was taken over by ${ownerName(nowOwnedBy)}; this process stopped driving it and wrote nothing more to it.`
        : `run ${runId} is no longer this process's to drive; it stopped driving it and wrote nothing more to it.`,
      'rolloff runs shows who drives it now; pause, stop or continue it there.',
    );
  }
}
