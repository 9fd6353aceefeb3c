/** exportRecord: the run detail (or comparison) handed to the record module (app/record). */
import { buildComparisonRecord, buildNoiseRunRecord, buildRunRecord, renderRecord, type RecordDcFit } from '../record';
import type { ExportedRecord, RecordFormat, RunDetail, ServiceApi } from '../contract/contract';
import type { RolloffStore } from '../store';
import { inputResistor, logStageIdeal, type DiodePart } from '../circuit';
import { designOf } from '../read-model/stored-design';
import { formatEngineering, formatPrecision, logGrid } from '../units';
import { ValidationError } from '../errors';

/**
 * What an export reads: the run history's details and the store's builds and designs behind them — the
 * service's own history, or a read-only store behind the same three calls (`rolloff export`).
 */
export type RecordSource = Pick<ServiceApi, 'getRun' | 'getNoiseRun' | 'compareRuns'> & { store: Pick<RolloffStore, 'getBuild' | 'getDesign' | 'getRun'> };

export async function exportRecordFor(service: RecordSource, runIds: number[], format: RecordFormat, reference: number | 'theory'): Promise<ExportedRecord> {
  const store = service.store;
  const contextOf = async (detail: RunDetail) => {
    const build = await store.getBuild(detail.buildId);
    const design = await store.getDesign(build.designId);
    return { design: design.design, designId: design.id, designUid: design.uid, build, dcFit: dcFitCurve(detail, design) };
  };
  const kinds = await Promise.all(runIds.map(async (id) => (await store.getRun(id)).kind));
  let rendered;
  if (runIds.length === 1 && kinds[0] === 'noise') {
    const detail = await service.getNoiseRun(runIds[0]);
    const build = await store.getBuild(detail.buildId);
    const design = await store.getDesign(build.designId);
    rendered = await renderRecord(buildNoiseRunRecord(detail, { design: design.design, designId: design.id, designUid: design.uid, build }), format);
  } else if (kinds.includes('noise')) {
    const noiseRun = runIds[kinds.indexOf('noise')];
    throw new ValidationError('runIds', `run ${noiseRun} is a noise run, and a comparison record compares sweeps`, 'Export a noise run on its own (one run id).');
  } else if (runIds.length === 1) {
    const detail = await service.getRun(runIds[0]);
    rendered = await renderRecord(buildRunRecord(detail, await contextOf(detail)), format);
  } else {
    const comparison = await service.compareRuns(runIds, reference);
    const runs = new Map(await Promise.all(comparison.runs.map(async (detail) => [detail.id, await contextOf(detail)] as const)));
    rendered = await renderRecord(buildComparisonRecord(comparison, { runs }), format);
  }
  const binary = format === 'pdf';
  return {
    fileName: rendered.fileName,
    mimeType: rendered.mimeType,
    content: binary ? Buffer.from(rendered.bytes).toString('base64') : new TextDecoder().decode(rendered.bytes),
    encoding: binary ? 'base64' : 'utf8',
  };
}

/** The fitted log-stage curve over the run's input range, drawn with the measured points. */
function dcFitCurve(detail: RunDetail, designRecord: { id: number; name: string; design: unknown; createdAt: string }): RecordDcFit | null {
  const fit = detail.figures.logFit;
  if (detail.kind !== 'dc' || !fit || detail.points.stimulus.length === 0) return null;
  const design = designOf(designRecord);
  const resistor = inputResistor(design);
  const diode = design.parts.find((p): p is DiodePart => p.type === 'diode');
  if (!resistor || !diode) return null;
  const magnitudes = detail.points.stimulus.map(Math.abs);
  const sign = Math.sign(detail.points.stimulus[0]) || 1;
  const inputV = Array.from(logGrid(Math.min(...magnitudes), Math.max(...magnitudes), 50), (m) => sign * m);
  const model = { ...diode.model, n: fit.n, is: fit.isA, rs: fit.rsOhm };
  return {
    inputV,
    outputV: inputV.map((v) => logStageIdeal(v, resistor.value, model, design.temperatureC)),
    description: `fitted n = ${formatPrecision(fit.n, 4)}, IS = ${formatEngineering(fit.isA, 'A', 3)}, RS = ${formatEngineering(fit.rsOhm, 'Ω', 3)}`,
  };
}
