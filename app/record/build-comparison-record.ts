/**
 * Comparison (from the service) + each run's design and build → ComparisonRecord.
 * Each member run keeps its full run record, so the comparison carries every
 * number its plots and tables show and its JSON stands on its own.
 */
import { ValidationError } from '../errors';
import type { Comparison } from '../contract/contract';
import { SAFETY_NOTICE_POINTS } from '../contract/safety';
import { SOFTWARE_VERSION } from '../contract/version';
import { buildRunRecord, jsonSafe, type RunRecordContext } from './build-run-record';
import { comparisonDigest, referenceLabel } from './digest';
import { RECORD_FORMAT_VERSION, type ComparisonRecord } from './model';

export interface ComparisonRecordContext {
  /** Design and build of every compared run, by run id. */
  runs: Map<number, Omit<RunRecordContext, 'generatedAt'>> | Record<number, Omit<RunRecordContext, 'generatedAt'>>;
  generatedAt?: string;
}

export function buildComparisonRecord(comparison: Comparison, context: ComparisonRecordContext): ComparisonRecord {
  if (!comparison || !Array.isArray(comparison.runs) || comparison.runs.length < 1) {
    throw new ValidationError('comparison.runs', 'no runs to compare', 'Give at least two runs, or one run and --reference theory.');
  }
  const generatedAt = context.generatedAt ?? new Date().toISOString();
  const lookup = (runId: number) => (context.runs instanceof Map ? context.runs.get(runId) : context.runs[runId]);
  const runs = comparison.runs.map((detail) => {
    const runContext = lookup(detail.id);
    if (!runContext) throw new ValidationError(`comparison.runs[${detail.id}]`, 'the design and build of this run were not given');
    return buildRunRecord(detail, { ...runContext, generatedAt });
  });
  const kinds = new Set(runs.map((r) => r.run.kind));
  if (kinds.size > 1) {
    const list = runs.map((r) => `run ${r.run.id} is ${r.run.kind === 'ac' ? 'an AC sweep' : 'a DC transfer'}`).join(', ');
    throw new ValidationError('comparison.runs', `AC sweeps and DC transfers cannot share one plot (${list})`, 'Compare AC runs with AC runs and DC runs with DC runs.');
  }
  const runIds = new Set(runs.map((r) => r.run.id));
  const reference = comparison.referenceRunId;
  if (reference !== 'theory' && !runIds.has(reference)) {
    throw new ValidationError('comparison.reference', `run ${reference} is not among the compared runs (${[...runIds].join(', ')})`);
  }
  for (const difference of comparison.differences ?? []) {
    if (!runIds.has(difference.runId)) throw new ValidationError('comparison.differences', `run ${difference.runId} is not among the compared runs`);
    if (difference.stimulus.length !== difference.deltaDb.length) {
      throw new ValidationError(`comparison.differences[run ${difference.runId}]`, 'stimulus and deltaDb differ in length');
    }
  }
  const labels = runs.map((r) => r.build.label);
  return jsonSafe({
    recordType: 'comparison',
    formatVersion: RECORD_FORMAT_VERSION,
    title: `Comparison of ${runs.map((r) => `run ${r.run.id}`).join(', ')} (${[...new Set(labels)].join(' / ')}) against ${reference === 'theory' ? 'theory' : `run ${reference}`}`,
    generatedAt,
    generatedBy: `Rolloff ${SOFTWARE_VERSION}`,
    safetyNotice: [...SAFETY_NOTICE_POINTS],
    reference,
    runs,
    differences: (comparison.differences ?? []).map((d) => ({ runId: d.runId, stimulus: d.stimulus, deltaDb: d.deltaDb })),
    figureTable: (comparison.figureTable ?? []).map((row) => ({
      runId: row.runId,
      label: row.label,
      figures: row.figures,
      deltas: row.deltas ?? {},
      verdict: row.verdict ?? null,
    })),
    digest: comparisonDigest(referenceLabel(reference, runs), runs.map((r) => r.digest.hex)),
  }) as ComparisonRecord;
}
