/** Plain-text summaries of runs for the terminal. */
import type { RunDetail, RunFigures, RunSummary } from '../../contract/contract';
import { shownStatus } from '../../contract/run-owner-text';
import { formatEngineering, formatFixed, formatPrecision, formatWithUncertainty } from '../../units';
import { BENCH_WORDS, FIGURE_NAMES, PHASE_MARGIN_ESTIMATE_BASIS, RUN_KIND_NAMES, pointCountText, summaryPointCountText, theoryAside } from '../../contract/vocabulary';
import { instantText } from '../../contract/bench-text';
import { offlinePeriodsText } from '../../record/pure';

/** Labels padded to one column wide enough for the longest figure name, so the values line up. */
const LABEL_WIDTH = Math.max(...Object.values(FIGURE_NAMES).map((name) => name.length)) + 2;

function line(label: string, value: string): string {
  return `${label.padEnd(LABEL_WIDTH - 1)} ${value}`;
}

/** A run's figures for the terminal, labelled with the table's names (app/contract/vocabulary.ts) as the window and the records are. */
export function figureLines(figures: RunFigures, theory?: { gainLimitHz?: number; minus3dbHz: number[] }): string[] {
  const lines: string[] = [];
  const hz = (v: number | undefined) => (v === undefined ? '—' : formatEngineering(v, 'Hz'));
  if (figures.passbandGainDb !== undefined) lines.push(line(FIGURE_NAMES.passbandGainDb, `${formatFixed(figures.passbandGainDb, 3)} dB`));
  if (figures.logFit) return [...lines, ...logFitLines(figures.logFit)];
  lines.push(line(FIGURE_NAMES.minus3dbHz, `${figures.minus3dbHz.length ? figures.minus3dbHz.map(hz).join(', ') : '—'}${theory ? `   ${theoryAside(theory.minus3dbHz.length ? theory.minus3dbHz.map(hz).join(', ') : '—')}` : ''}`));
  if (figures.rolloffDbPerDecade !== undefined) lines.push(line(FIGURE_NAMES.rolloffDbPerDecade, `${formatFixed(figures.rolloffDbPerDecade, 1)} dB/decade`));
  lines.push(line(FIGURE_NAMES.gainLimitHz, `${hz(figures.gainLimitHz)}${theory ? `   ${theoryAside(hz(theory.gainLimitHz))}` : ''}`));
  if (figures.gbwEstimateHz !== undefined) {
    lines.push(line(FIGURE_NAMES.gbwEstimateHz, figures.gbwUncertaintyHz !== undefined ? `${formatWithUncertainty(figures.gbwEstimateHz, figures.gbwUncertaintyHz, 'Hz')} (1σ)` : hz(figures.gbwEstimateHz)));
  }
  if (figures.maxDeviationDb !== undefined) lines.push(line(FIGURE_NAMES.maxDeviationDb, `${formatFixed(figures.maxDeviationDb, 3)} dB (pass band)`));
  lines.push(...stabilityLines(figures));
  return lines;
}

/** Measured closed-loop peaking and its phase-margin estimate, beside the computed values. */
export function stabilityLines(figures: RunFigures): string[] {
  const lines: string[] = [];
  const deg = (v: number | undefined) => (v === undefined ? '—' : `${formatFixed(v, 1)}°`);
  const db = (v: number | undefined) => (v === undefined ? '—' : `${formatFixed(v, 2)} dB`);
  if (figures.closedLoopPeakingDb !== undefined) lines.push(line(FIGURE_NAMES.closedLoopPeakingDb, `${db(figures.closedLoopPeakingDb)}   ${theoryAside(db(figures.theoryPeakingDb))}`));
  if (figures.phaseMarginEstimateDeg !== undefined) {
    const estimate = `${figures.phaseMarginEstimateIsLowerBound ? '≥ ' : ''}${deg(figures.phaseMarginEstimateDeg)}`;
    lines.push(line(FIGURE_NAMES.phaseMarginEstimateDeg, `${estimate} ${PHASE_MARGIN_ESTIMATE_BASIS}   ${theoryAside(deg(figures.theoryPhaseMarginDeg))}`));
  }
  for (const warning of figures.theoryWarnings ?? []) lines.push(line(FIGURE_NAMES.theoryWarning, warning));
  return lines;
}

function logFitLines(f: NonNullable<RunFigures['logFit']>): string[] {
  return [
    line(FIGURE_NAMES.diodeIdealityN, `${formatPrecision(f.n, 4)}  [${f.nCi.map((v) => formatPrecision(v, 4)).join(', ')}] (95 %)`),
    line(FIGURE_NAMES.diodeSaturationCurrentA, `${formatEngineering(f.isA, 'A')}  [${f.isCi.map((v) => formatEngineering(v, 'A')).join(', ')}]`),
    line(FIGURE_NAMES.diodeSeriesResistanceOhm, `${formatEngineering(f.rsOhm, 'Ω')}  [${f.rsCi.map((v) => formatEngineering(v, 'Ω')).join(', ')}]`),
  ];
}

/** The design's diode model, printed beside a log-stage fit so the two can be compared. */
export interface DiodeTheory {
  n: number;
  isA: number;
  rsOhm: number;
}

export function runDetailText(detail: RunDetail, diode?: DiodeTheory): string {
  const lines = [
    `run ${detail.id}  ${RUN_KIND_NAMES[detail.kind]}  ${detail.status}${detail.simulated ? `  (${BENCH_WORDS.simulated.toUpperCase()})` : ''}`,
    `build "${detail.buildLabel}" of design "${detail.designName}"`,
    `points ${pointCountText(detail.plannedCount, detail.points.flags)}   started ${timeText(detail.startedAt)}   ended ${timeText(detail.endedAt)}`,
    ...((detail.offlinePeriods ?? []).length > 0 ? [`store unreachable, points kept in the bench's outbox: ${offlinePeriodsText(detail.offlinePeriods)}`] : []),
    '',
    ...figureLines(detail.figures, detail.kind === 'ac' ? { gainLimitHz: detail.theoryGainLimitHz, minus3dbHz: detail.theoryMinus3dbHz } : undefined),
  ];
  if (detail.figures.logFit && diode) {
    lines.push(line('Theory (build)', `n ${diode.n}, IS ${formatEngineering(diode.isA, 'A')}, RS ${formatEngineering(diode.rsOhm, 'Ω')}`) +
      '   (the fit takes I = Vin/R: source resistance and op-amp input error shift IS and n slightly)');
  }
  if (detail.verdict) lines.push('', `verdict: ${detail.verdict.pass ? 'PASS' : 'FAIL'}`, ...detail.verdict.reasons.map((r) => `  ${r}`));
  return lines.join('\n') + '\n';
}

export function runTable(runs: RunSummary[]): string {
  if (runs.length === 0) return 'No runs.\n';
  const rows = runs.map((r) => [String(r.id), RUN_KIND_NAMES[r.kind], shownStatus(r), summaryPointCountText(r.plannedCount, r.pointCount), r.buildLabel, r.designName, r.benchName || '—', timeText(r.startedAt), r.simulated ? BENCH_WORDS.simulated : '']);
  const header = ['run', 'kind', 'status', 'points', 'build', 'design', 'bench', 'started', ''];
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((row) => row[c].length)));
  return [header, ...rows].map((row) => row.map((cell, c) => cell.padEnd(widths[c])).join('  ').trimEnd()).join('\n') + '\n';
}

/** An instant for people ("2026-12-02 04:43:38 UTC"), as the limit messages write it; '—' when there is none. */
export function timeText(iso: string | null | undefined): string {
  return iso ? instantText(iso) : '—';
}
