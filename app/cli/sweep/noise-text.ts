/** Plain-text summaries of noise runs for the terminal. */
import type { NoiseFigures, NoiseRunDetail } from '../../contract/contract';
import { BENCH_WORDS, RUN_KIND_NAMES, flagWords, WINDOW_NAMES } from '../../contract/vocabulary';
import { formatEngineering } from '../../units';
import { noiseFigureRows } from '../../analysis';

export function noiseRunText(detail: NoiseRunDetail): string {
  const a = detail.acquisition;
  const lines = [
    `run ${detail.id}  ${RUN_KIND_NAMES.noise}  ${detail.status}${detail.simulated ? `  (${BENCH_WORDS.simulated.toUpperCase()})` : ''}`,
    `build "${detail.buildLabel}" of design "${detail.designName}"`,
    `records ${detail.pointCount} of ${detail.plannedCount} planned   started ${detail.startedAt ?? '—'}   ended ${detail.endedAt ?? '—'}`,
    `generator held off; input held by its ${formatEngineering(a.sourceImpedanceOhm, 'Ω')} source resistance (computed so)`,
    '',
    a.measurement === 'scope'
      ? `scope records of ${a.recordPoints} samples at ${formatEngineering(a.sampleRateHz, 'Hz')}, Welch estimate on ${a.segmentLength}-sample ${WINDOW_NAMES[a.window]} segments`
      : `meter AC RMS readings of ${formatEngineering(a.recordS, 's')} each (the meter's own bandwidth; compared with the noise computed over the band)`,
    ...noiseFigureLines(detail.figures.noise),
  ];
  return lines.join('\n') + '\n';
}

export function noiseFigureLines(figures: NoiseFigures | undefined): string[] {
  if (!figures) return ['output noise: no usable record yet'];
  const rows = noiseFigureRows(figures);
  const width = Math.max(...rows.map(([label]) => label.length)) + 2;
  return rows.map(([label, value]) => `${label.padEnd(width)}${value}`);
}

/** The records of a noise run, one line each. */
export function noiseRecordTable(detail: NoiseRunDetail): string {
  const r = detail.records;
  const lines = [`${'record'.padEnd(7)} ${'RMS'.padEnd(12)} ${'mean'.padEnd(12)} ${'segments'.padEnd(9)} flags`];
  for (let i = 0; i < r.step.length; i++) {
    const mean = Number.isFinite(r.meanV[i]) ? formatEngineering(r.meanV[i], 'V') : '—';
    lines.push(`${String(r.step[i]).padEnd(7)} ${formatEngineering(r.rmsV[i], 'V').padEnd(12)} ${mean.padEnd(12)} ${String(r.segments[i]).padEnd(9)} ${flagWords(r.flags[i])}`);
  }
  return lines.join('\n') + '\n';
}

