/**
 * A record's points as one RFC 4180 table. Numbers are written in the
 * shortest form that reads back to the same double (ECMAScript Number→String),
 * empty fields stand for readings that were not finite (see the flags column).
 * Every column names what it holds and its unit (app/contract/vocabulary.ts):
 * the output is output_v_peak (scope), output_v_rms (meter) or output_v_dc
 * (DC runs); a DC table carries no gain or phase columns. A comparison writes
 * every run's points with a run_id column and the difference from the reference.
 * A noise run writes its density per bin (frequency_hz, noise_v_per_rthz as
 * rolloff theory --noise does, then the uncertainty columns and the computed
 * density); a meter noise run, its readings.
 */
import { writeCsv } from './csv';
import { recordOutputV, type ComparisonRecord, type MaybeNumber, type NoiseRunRecord, type RunRecord } from './model';
import { flagWords, NOISE_COLUMNS as N, OUTPUT_COLUMN, outputReadingOf, POINT_COLUMNS as C, type OutputReading } from '../contract/vocabulary';

const numberText = (value: MaybeNumber) => (value === null ? '' : String(value));

const readingOf = (record: RunRecord): OutputReading => outputReadingOf(record.run.kind, record.run.plan.measurement);

interface Table {
  header: string[];
  rows: (record: RunRecord) => string[][];
}

/** One table layout for the runs given: their stimulus kind and the output readings they hold. */
function tableFor(records: RunRecord[]): Table {
  const kinds = new Set(records.map((r) => r.run.kind));
  const readings = (['peak', 'rms', 'dc'] as const).filter((reading) => records.some((r) => readingOf(r) === reading));
  const stimulusColumn = kinds.size > 1 ? C.stimulusMixed : kinds.has('dc') ? C.inputV : C.frequencyHz;
  const withGain = kinds.has('ac');
  const header = [
    C.runId, C.buildLabel, C.step, stimulusColumn, C.stimulusSettingVpp,
    ...(withGain ? [C.gainDb, C.gainUncertaintyDb, C.phaseDeg, C.phaseUncertaintyDeg] : []),
    ...readings.map((reading) => OUTPUT_COLUMN[reading]),
    C.flags, C.flagWords, C.measuredAt,
  ];
  const rows = (record: RunRecord) => {
    const p = record.points;
    const own = readingOf(record);
    const output = recordOutputV(p);
    return p.step.map((step, i) => [
      String(record.run.id),
      record.build.label,
      String(step),
      numberText(p.stimulus[i]),
      numberText(p.stimulusSettingVpp[i]),
      ...(withGain ? [numberText(p.gainDb[i]), numberText(p.gainUncertaintyDb[i]), numberText(p.phaseDeg[i]), numberText(p.phaseUncertaintyDeg[i])] : []),
      ...readings.map((reading) => (reading === own ? numberText(output[i]) : '')),
      String(p.flags[i]),
      flagWords(p.flags[i]),
      p.measuredAt[i],
    ]);
  };
  return { header, rows };
}

export function runCsv(record: RunRecord): string {
  const table = tableFor([record]);
  return writeCsv(table.header, table.rows(record));
}

export function comparisonCsv(record: ComparisonRecord): string {
  const table = tableFor(record.runs);
  const header = [...table.header, C.deltaFromReferenceDb];
  const rows = record.runs.flatMap((run) => {
    const difference = record.differences.find((d) => d.runId === run.run.id);
    return table.rows(run).map((row, i) => {
      const stimulus = run.points.stimulus[i];
      // Differences normally share the run's stimulus grid; match by value so a thinned grid still lines up.
      let delta: MaybeNumber = null;
      if (difference) {
        const sameGrid = difference.stimulus.length === run.points.stimulus.length && difference.stimulus[i] === stimulus;
        const at = sameGrid ? i : difference.stimulus.findIndex((s) => s === stimulus);
        delta = at >= 0 ? difference.deltaDb[at] : null;
      }
      return [...row, numberText(delta)];
    });
  });
  return writeCsv(header, rows);
}

export function noiseCsv(record: NoiseRunRecord): string {
  if (record.run.acquisition.measurement === 'meter') {
    const r = record.records;
    return writeCsv(
      [C.step, OUTPUT_COLUMN.rms, C.flags, C.flagWords, C.measuredAt],
      r.step.map((step, i) => [String(step), numberText(r.rmsV[i]), String(r.flags[i]), flagWords(r.flags[i]), r.measuredAt[i]]),
    );
  }
  const d = record.density;
  return writeCsv(
    [N.frequencyHz, N.densityVPerRtHz, N.uncertaintyVPerRtHz, N.low95VPerRtHz, N.high95VPerRtHz, N.computedVPerRtHz],
    d.frequencyHz.map((f, i) => [f, d.measuredVPerRtHz[i], d.uncertaintyVPerRtHz[i], d.low95VPerRtHz[i], d.high95VPerRtHz[i], d.computedVPerRtHz[i]].map(numberText)),
  );
}
