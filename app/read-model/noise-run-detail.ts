/**
 * A noise run for the views and records: its records, the measured density
 * over the band (the records' Welch estimates combined, app/analysis
 * noise-figures) beside the density computed for the circuit the input saw —
 * the build with its input held by the generator's source resistance
 * (app/circuit withSourceResistance) — and its figures.
 */
import type { NoiseRunDetail, RunFigures } from '../contract/contract';
import { bandNoise, solveNoise, withSourceResistance, type Design } from '../circuit';
import { noiseRunResult } from '../analysis';
import type { RunReadStore, StoredNoiseRun } from '../store';
import { designForBuild, summaryOf, type OwnerJudge } from './run-detail';
import { RunKindError } from './run-kind-error';

/** The circuit a noise run measures: the build with its input held by the generator's source resistance. */
export async function noiseDesign(store: Pick<RunReadStore, 'getBuild' | 'getDesign'>, buildId: number, sourceImpedanceOhm: number): Promise<Design> {
  return withSourceResistance(await designForBuild(store as RunReadStore, buildId, undefined), sourceImpedanceOhm);
}

/** The run's records, its density beside the computed one, and its figures, from what is stored. */
export async function noiseRunResultOf(store: RunReadStore, run: StoredNoiseRun) {
  const records = await store.loadNoiseRecords(run.id);
  const design = await noiseDesign(store, run.buildId, run.plan.acquisition.sourceImpedanceOhm);
  const result = noiseRunResult(run.request, run.plan.acquisition, records.step.map((_, i) => ({
    sampleRateHz: records.sampleRateHz[i],
    segments: records.segments[i],
    degreesOfFreedom: records.degreesOfFreedom[i],
    psdV2PerHz: records.psdV2PerHz[i],
    rmsV: records.rmsV[i],
    flags: records.flags[i],
  })), {
    densityAt: (frequenciesHz) => (frequenciesHz.length === 0 ? [] : solveNoise(design, frequenciesHz).outputVPerRtHz),
    rmsOver: (fromHz, toHz) => bandNoise(design, fromHz, toHz).outputRmsV,
  });
  const figures: RunFigures = { minus3dbHz: [], ...(result.figures ? { noise: result.figures } : {}) };
  return { records, density: result.density, figures };
}

/** A noise run with its records, the measured density over the band beside the computed one, and its figures. */
export async function noiseRunDetail(store: RunReadStore, runId: number, judgeOwner: OwnerJudge): Promise<NoiseRunDetail> {
  const run = await store.getRun(runId);
  if (run.kind !== 'noise') throw new RunKindError(runId, run.kind, 'getRun');
  const { records, density, figures } = await noiseRunResultOf(store, run);
  const { psdV2PerHz: _spectra, ...recordColumns } = records;
  return {
    ...summaryOf(run, judgeOwner),
    kind: 'noise',
    offlinePeriods: run.offlinePeriods,
    request: run.request,
    acquisition: run.plan.acquisition,
    bench: run.bench,
    softwareVersion: run.softwareVersion,
    records: recordColumns,
    density,
    figures,
    events: await store.listEvents(runId),
  };
}
