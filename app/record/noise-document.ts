/** The content of a noise run's record, in reading order (see record-document.ts). */
import { formatEngineering, formatFixed } from '../units';
import { noiseFigureRows } from '../analysis/noise-figure-rows';
import { SETTINGS, WINDOW_NAMES, flagWords, pointCountText } from '../contract/vocabulary';
import type { Block, RecordDocument } from './record-document';
import type { NoiseRunRecord } from './model';
import { noisePlots } from './record-plots';
import { formatMaybe, formatVolts } from './record-formatting';
import { benchBlocks, designBlocks, eventBlocks, runFactsBlock, runRecordDocument } from './run-document';

export function noiseDocument(record: NoiseRunRecord): RecordDocument {
  return runRecordDocument(record, [
    runFactsBlock(record, 'noise run', ['Records', pointCountText(record.run.plannedCount, record.records.flags)]),
    ...benchBlocks(record),
    ...designBlocks(record.design, record),
    ...planBlocks(record),
    { kind: 'heading', text: 'Output noise' },
    ...noisePlots(record).map((spec) => ({ kind: 'plot' as const, spec })),
    record.figures
      ? { kind: 'keyValues', rows: noiseFigureRows(record.figures) }
      : { kind: 'paragraph', text: 'No usable record: no figures.' },
    ...recordBlocks(record),
    ...eventBlocks(record),
  ]);
}

function planBlocks(record: NoiseRunRecord): Block[] {
  const { plan, acquisition: a } = record.run;
  const how = a.measurement === 'scope'
    ? `scope (output on channel 2): records of ${a.recordPoints} samples at ${formatEngineering(a.sampleRateHz, 'Hz')}; Welch estimate on ${a.segmentLength}-sample ${WINDOW_NAMES[a.window]} segments overlapping ${formatFixed(a.overlap * 100, 0)} %, the window's equivalent noise bandwidth applied`
    : `meter: AC RMS readings of ${formatEngineering(a.recordS, 's')} each, over the meter's own bandwidth`;
  return [
    { kind: 'heading', text: 'Plan' },
    {
      kind: 'keyValues',
      rows: [
        ['Band', `${formatEngineering(plan.fromHz, 'Hz')} to ${formatEngineering(plan.toHz, 'Hz')}`],
        ['Records', String(plan.records)],
        ['Output read by', how],
        ['Generator', `held off (output off, smallest amplitude, no offset); the stage input sees its ${formatEngineering(a.sourceImpedanceOhm, 'Ω')} source resistance, and the computed density counts it`],
        [`${SETTINGS.maxStimulus.label} in force`, plan.maxStimulusVpp !== undefined ? formatEngineering(plan.maxStimulusVpp, 'Vpp') : 'not recorded'],
        ['Computed output noise the range was set for', `${formatEngineering(a.expectedRmsV, 'V')} RMS${a.measurement === 'scope' ? ` (range ±${formatEngineering(a.rangeV, 'V')} asked for)` : ''}`],
        ['Run notes', record.run.notes || '—'],
      ],
    },
  ];
}

function recordBlocks(record: NoiseRunRecord): Block[] {
  const r = record.records;
  const scope = record.run.acquisition.measurement === 'scope';
  const rows = r.step.map((step, i) => [
    String(step),
    formatMaybe(r.rmsV[i], formatVolts),
    ...(scope ? [formatMaybe(r.meanV[i], formatVolts), String(r.segments[i])] : []),
    flagWords(r.flags[i]),
    r.measuredAt[i],
  ]);
  const columns = ['#', scope ? 'RMS' : 'AC RMS reading', ...(scope ? ['Mean', 'Segments'] : []), 'Flags', 'Measured at'];
  return [
    { kind: 'heading', text: 'Records' },
    { kind: 'table', columns, rows, alignRight: columns.map((c) => c !== 'Flags' && c !== 'Measured at') },
  ];
}
