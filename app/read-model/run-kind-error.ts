/** A run was read by the reader of another kind of run (getRun for a noise run, getNoiseRun for a sweep). */
import { UserError } from '../errors';
import type { RunKind } from '../contract/contract';

const KIND_NAMES: Record<RunKind, string> = { ac: 'an AC sweep', dc: 'a DC transfer sweep', noise: 'a noise run' };

export class RunKindError extends UserError {
  readonly runId: number;
  readonly kind: RunKind;
  constructor(runId: number, kind: RunKind, reader: 'getRun' | 'getNoiseRun') {
    super(`run ${runId}: is ${KIND_NAMES[kind]}`, `Read it with ${reader}; rolloff show RUN shows runs of every kind.`);
    this.runId = runId;
    this.kind = kind;
  }
}
