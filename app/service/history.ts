/**
 * Read access to the stored runs: the History and Compare views, the run detail,
 * the records. Each run carries who drives it as this service judges its owner
 * (live unless its heartbeat is stale or its process is gone here).
 */
import { ValidationError } from '../errors';
import type { RolloffStore, RunOwnership } from '../store';
import type { Comparison, ExportedRecord, NoiseRunDetail, RecordFormat, RunDetail, RunFilter, RunSummary } from '../contract/contract';
import { noiseRunDetail } from '../read-model/noise-run-detail';
import { diodeOfRun, runDetail, summaryOf } from '../read-model/run-detail';
import { compareDetails } from '../read-model/compare';
import { exportRecordFor } from './export';
import { runOwnerOf } from './run-ownership';

export class RunHistory {
  /** A recorded owner as the contract shows it: live unless its heartbeat is older than staleAfterMs or its process is gone here. */
  private readonly judgeOwner = (ownership: RunOwnership) => runOwnerOf(ownership, this.staleAfterMs);

  constructor(
    readonly store: RolloffStore,
    private readonly staleAfterMs: number,
  ) {}

  /** Newest first, each with who drives it (RunSummary.owner: live or not, heartbeat age). */
  async listRuns(filter?: RunFilter): Promise<RunSummary[]> {
    return (await this.store.listRuns(filter ?? {})).map((run) => summaryOf(run, this.judgeOwner));
  }

  async getRun(runId: number): Promise<RunDetail> {
    return runDetail(this.store, runId, this.judgeOwner);
  }

  /** A noise run: its records and the measured density beside the computed one. */
  async getNoiseRun(runId: number): Promise<NoiseRunDetail> {
    return noiseRunDetail(this.store, runId, this.judgeOwner);
  }

  /** A run's summary, without the analysis getRun does. */
  async summary(runId: number): Promise<RunSummary> {
    return summaryOf(await this.store.getRun(runId), this.judgeOwner);
  }

  /** The build's diode model (log stage), for comparing a DC fit with theory. */
  async diodeOfRun(runId: number): Promise<{ n: number; isA: number; rsOhm: number } | undefined> {
    return diodeOfRun(this.store, runId);
  }

  async compareRuns(runIds: number[], reference: number | 'theory'): Promise<Comparison> {
    if (runIds.length === 0) throw new ValidationError('runIds', 'is empty', 'Give at least one run.');
    return compareDetails(await Promise.all(runIds.map((id) => runDetail(this.store, id, this.judgeOwner))), reference);
  }

  async exportRecord(runIds: number[], format: RecordFormat, reference: number | 'theory' = 'theory'): Promise<ExportedRecord> {
    if (runIds.length === 0) throw new ValidationError('runIds', 'is empty', 'Give at least one run.');
    return exportRecordFor(this, runIds, format, reference);
  }
}
