/**
 * A record's points as one RFC 4180 table. Numbers are written in the
 * shortest form that reads back to the same double (ECMAScript Number→String),
 * empty fields stand for readings that were not finite (see the flags column).
 * A comparison writes every run's points with a run_id column and the
 * difference from the reference.
 */
import { writeCsv } from './csv';
import type { ComparisonRecord, MaybeNumber, RunRecord } from './model';
import { flagWords } from './record-formatting';

const AC_COLUMNS = ['run_id', 'build_label', 'step', 'frequency_hz', 'amplitude_vpp', 'gain_db', 'gain_uncertainty_db', 'phase_deg', 'phase_uncertainty_deg', 'output_v', 'flags', 'flag_names', 'measured_at'];
const DC_COLUMNS = ['run_id', 'build_label', 'step', 'input_v', 'amplitude_vpp', 'gain_db', 'gain_uncertainty_db', 'phase_deg', 'phase_uncertainty_deg', 'output_v', 'flags', 'flag_names', 'measured_at'];

const numberText = (value: MaybeNumber) => (value === null ? '' : String(value));

function pointRows(record: RunRecord): string[][] {
  const p = record.points;
  return p.step.map((step, i) => [
    String(record.run.id),
    record.build.label,
    String(step),
    numberText(p.stimulus[i]),
    numberText(p.amplitudeVpp[i]),
    numberText(p.gainDb[i]),
    numberText(p.gainUncertaintyDb[i]),
    numberText(p.phaseDeg[i]),
    numberText(p.phaseUncertaintyDeg[i]),
    numberText(p.outputV[i]),
    String(p.flags[i]),
    flagWords(p.flags[i]),
    p.measuredAt[i],
  ]);
}

function stimulusHeader(kinds: Array<'ac' | 'dc'>): string[] {
  if (kinds.every((k) => k === 'dc')) return DC_COLUMNS;
  if (kinds.every((k) => k === 'ac')) return AC_COLUMNS;
  return AC_COLUMNS.map((c) => (c === 'frequency_hz' ? 'stimulus_hz_or_v' : c));
}

export function runCsv(record: RunRecord): string {
  return writeCsv(stimulusHeader([record.run.kind]), pointRows(record));
}

export function comparisonCsv(record: ComparisonRecord): string {
  const header = [...stimulusHeader(record.runs.map((r) => r.run.kind)), 'delta_from_reference_db'];
  const rows = record.runs.flatMap((run) => {
    const difference = record.differences.find((d) => d.runId === run.run.id);
    return pointRows(run).map((row, i) => {
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
